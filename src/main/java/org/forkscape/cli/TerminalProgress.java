package org.forkscape.cli;

import java.io.PrintStream;
import org.forkscape.run.RunProgress;

/** Progress on a terminal's stderr: items done / total, rate and time left, at most 5 times a second. */
final class TerminalProgress implements RunProgress {
    private final PrintStream err;
    private final String unit;
    private final long start = System.nanoTime();
    private long lastPrint;
    private boolean printed;

    TerminalProgress(PrintStream err) {
        this(err, "specifications");
    }

    /** @param unit what is counted, in the plural ("null draws") */
    TerminalProgress(PrintStream err, String unit) {
        this.err = err;
        this.unit = unit;
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
        err.printf("\r%,d / %,d %s  %,.0f/s  %s left   ", done, total, unit, rate,
                Double.isNaN(left) ? "?" : String.format("%.0f s", left));
        printed = true;
    }

    synchronized void finish() {
        if (printed) {
            err.print("\r\033[K");
        }
    }
}
