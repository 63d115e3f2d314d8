package org.forkscape.run;

/** Receives progress of a run: specifications done out of the total. Called from worker threads. */
@FunctionalInterface
public interface RunProgress {
    RunProgress SILENT = (done, total) -> {
    };

    void update(long done, long total);
}
