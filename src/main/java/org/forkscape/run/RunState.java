package org.forkscape.run;

import java.util.Locale;

/** Where a run stands; written in a run's {@code status} file as the lower-case word. */
public enum RunState {
    QUEUED, RUNNING, FINISHED, FAILED, CANCELLED,
    /** The server stopped while the run was queued or computing; its partial work is gone. */
    INTERRUPTED;

    public String word() {
        return name().toLowerCase(Locale.ROOT);
    }

    /** Whether the run will not change any more. */
    public boolean ended() {
        return this != QUEUED && this != RUNNING;
    }

    public static RunState of(String word) {
        return valueOf(word.strip().toUpperCase(Locale.ROOT));
    }
}
