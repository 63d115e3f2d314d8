package org.forkscape.cli;

import java.io.PrintStream;
import org.forkscape.run.RunProgress;

/**
 * One phase's progress on a terminal's stderr: the phase's name as soon as it begins (a phase may have
 * nothing to count), then items done / total, rate and time left, at most 5 times a second.
 */
final class TerminalProgress implements RunProgress {
    private final PrintStream err;
    private final String phase;
    private final String unit;
    private final long start = System.nanoTime();
    private long lastPrint;
    private boolean printed;

    /**
     * @param phase the phase's name ("inference")
     * @param unit  what is counted, in the plural ("null draws")
     */
    TerminalProgress(PrintStream err, String phase, String unit) {
        this.err = err;
        this.phase = phase;
        this.unit = unit;
        err.printf("\r%s   ", phase);
        printed = true;
    }

    @Override
    public synchronized void update(long done, long total) {
        long now = System.nanoTime();
        if (now - lastPrint < 200_000_000L && done < total) {
            return;
        }
        lastPrint = now;
        double seconds = (now - start) / 1e9;
        double rate = done / Math.max(seconds, 1e-9);
        double left = rate > 0 ? (total - done) / rate : Double.NaN;
        err.printf("\r%s: %,d / %,d %s  %,.0f/s  %s left   ", phase, done, total, unit, rate,
                Double.isNaN(left) ? "?" : String.format("%.0f s", left));
        printed = true;
    }

    synchronized void finish() {
        if (printed) {
            err.print("\r\033[K");
        }
    }
}
