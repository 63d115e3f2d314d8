package org.forkscape.web.system;

import java.util.function.BooleanSupplier;
import org.forkscape.data.MemoryAllowance;
import org.forkscape.data.TableFootprint;
import org.forkscape.run.MemoryEstimate;
import org.forkscape.run.RunCancelledException;

/**
 * The memory that runs computing and tables being read share. One run or one upload may hold what one run
 * may ({@link ServerLimits#maxMemory}, setting {@code forkscape.runs.max-memory}); all of them together
 * that times the runs computing at once (by default 60% of the Java heap). An upload is priced before it
 * is parsed ({@link TableFootprint}), refused when that alone is above the limit or when what the others
 * hold leaves too little, and otherwise holds a reservation while it is read, which grows as the reader
 * counts its text levels. A run reserves its {@link MemoryEstimate} when it starts and waits for room when
 * uploads hold it. Every method holds the budget's lock only for its arithmetic (and a run's wait), never
 * while a file is read.
 */
public final class MemoryBudget {
    /** The setting the limit comes from, for messages. */
    static final String SETTING = "forkscape.runs.max-memory";

    private final long limit;
    private final long capacity;
    private long held;

    /**
     * @param limit  what one run or one upload may hold
     * @param shares how many of those the capacity holds (the runs computing at once)
     */
    public MemoryBudget(long limit, int shares) {
        this.limit = limit;
        this.capacity = limit > Long.MAX_VALUE / Math.max(1, shares) ? Long.MAX_VALUE : limit * Math.max(1, shares);
    }

    /** A budget that never refuses, for services built by hand without the server's limits. */
    public static MemoryBudget unlimited() {
        return new MemoryBudget(Long.MAX_VALUE, 1);
    }

    /** What one run or one upload may hold. */
    public long limit() {
        return limit;
    }

    /** Bytes the runs and the tables being read hold now. */
    public synchronized long held() {
        return held;
    }

    /**
     * Reserves what reading {@code source} holds at first.
     *
     * @param consequence what the refusal leaves, for its message ("the upload was not kept")
     * @throws MemoryBudgetException when the footprint is above the limit (never fits) or above what the runs
     *                               and other uploads leave (fits later)
     */
    public synchronized Reservation reserve(String source, TableFootprint footprint, String consequence) {
        long bytes = footprint.bytes();
        String need = String.format("reading %s would take about %s of memory (%,d rows by %,d columns at up to 8 "
                + "bytes a cell, before its text levels)", source, MemoryEstimate.format(bytes), footprint.rows(),
                footprint.columns());
        if (bytes > limit) {
            throw new MemoryBudgetException(true, need + ", " + overLimit() + "; " + consequence);
        }
        if (held + bytes > capacity) {
            throw new MemoryBudgetException(false, need + ", " + busy() + "; " + consequence);
        }
        held += bytes;
        return new Reservation(source, consequence, bytes);
    }

    /**
     * Reserves a run's estimate, waiting while the runs and uploads holding memory leave too little.
     *
     * @param cancelled asked while waiting
     * @throws RunCancelledException when cancelled while waiting
     */
    public synchronized Reservation awaitRoom(String run, long bytes, BooleanSupplier cancelled) {
        long need = Math.min(bytes, capacity);
        while (held + need > capacity) {
            if (cancelled.getAsBoolean()) {
                throw new RunCancelledException();
            }
            try {
                wait(100);
            } catch (InterruptedException e) {
                Thread.currentThread().interrupt();
                throw new RunCancelledException();
            }
        }
        held += need;
        return new Reservation(run, "", need);
    }

    /** Whether {@code bytes} would have to wait for room now. */
    public synchronized boolean wouldWait(long bytes) {
        return held + Math.min(bytes, capacity) > capacity;
    }

    private String overLimit() {
        return "above the limit of " + MemoryEstimate.format(limit) + " that one run or upload may hold (setting "
                + SETTING + ", by default 60% of the Java heap shared among the concurrent runs; raise it, and the "
                + "heap with java -Xmx)";
    }

    private String busy() {
        return "and the runs computing and uploads being read now hold " + MemoryEstimate.format(held) + " of the "
                + MemoryEstimate.format(capacity) + " they may hold together (setting " + SETTING + " times "
                + "forkscape.runs.concurrent); try again when they are done";
    }

    /** What one reading or run holds: grows when the reader asks, released when closed. */
    public final class Reservation implements MemoryAllowance, AutoCloseable {
        private final String source;
        private final String consequence;
        private long granted;

        private Reservation(String source, String consequence, long granted) {
            this.source = source;
            this.consequence = consequence;
            this.granted = granted;
        }

        /** Grants {@code bytes}, and a quarter more so that the reader asks rarely, within the limit. */
        @Override
        public long require(long bytes) {
            synchronized (MemoryBudget.this) {
                if (bytes <= granted) {
                    return granted;
                }
                String need = "reading " + source + " needs more than " + MemoryEstimate.format(bytes)
                        + " of memory (its cells and the distinct texts of its text columns)";
                if (bytes > limit) {
                    throw new MemoryBudgetException(true, need + ", " + overLimit() + "; " + consequence);
                }
                long others = held - granted;
                if (others + bytes > capacity) {
                    throw new MemoryBudgetException(false, need + ", " + busy() + "; " + consequence);
                }
                long grant = Math.min(Math.min(limit, capacity - others), bytes + bytes / 4);
                held = others + grant;
                granted = grant;
                return grant;
            }
        }

        @Override
        public void close() {
            synchronized (MemoryBudget.this) {
                held -= granted;
                granted = 0;
                MemoryBudget.this.notifyAll();
            }
        }
    }
}
