package org.forkscape.web.system;

import org.forkscape.data.MemoryAllowance;
import org.forkscape.data.TableFootprint;
import org.forkscape.run.MemoryEstimate;

/**
 * The memory that tables being read may hold at once. Its capacity is what one run may hold
 * ({@link ServerLimits#maxMemory}, setting {@code forkscape.runs.max-memory}): an upload is priced before
 * it is parsed ({@link TableFootprint}), refused when that alone is above the capacity, and otherwise
 * holds a reservation while it is read, which grows as the reader counts its text levels and which the
 * uploads read at the same time share. Every method holds the budget's lock only for its arithmetic,
 * never while a file is read.
 */
public final class MemoryBudget {
    /** The setting the capacity comes from, for messages. */
    static final String SETTING = "forkscape.runs.max-memory";

    private final long capacity;
    private long held;

    public MemoryBudget(long capacity) {
        this.capacity = capacity;
    }

    /** A budget that never refuses, for services built by hand without the server's limits. */
    public static MemoryBudget unlimited() {
        return new MemoryBudget(Long.MAX_VALUE);
    }

    public long capacity() {
        return capacity;
    }

    /** Bytes the tables being read hold now. */
    public synchronized long held() {
        return held;
    }

    /**
     * Reserves what reading {@code source} holds at first.
     *
     * @param consequence what the refusal leaves, for its message ("the upload was not kept")
     * @throws MemoryBudgetException when the footprint is above the capacity (never fits) or above what the
     *                               uploads being read leave (fits later)
     */
    public synchronized Reservation reserve(String source, TableFootprint footprint, String consequence) {
        long bytes = footprint.bytes();
        String need = String.format("reading %s would take about %s of memory (%,d rows by %,d columns at up to 8 "
                + "bytes a cell, before its text levels)", source, MemoryEstimate.format(bytes), footprint.rows(),
                footprint.columns());
        if (bytes > capacity) {
            throw new MemoryBudgetException(true, need + ", " + overLimit() + "; " + consequence);
        }
        if (held + bytes > capacity) {
            throw new MemoryBudgetException(false, need + ", " + busy() + "; " + consequence);
        }
        held += bytes;
        return new Reservation(source, consequence, bytes);
    }

    private String overLimit() {
        return "above the limit of " + MemoryEstimate.format(capacity) + " that one run or upload may hold "
                + "(setting " + SETTING + ", by default 60% of the Java heap shared among the concurrent runs; raise "
                + "it, and the heap with java -Xmx)";
    }

    private String busy() {
        return "and the uploads being read now hold " + MemoryEstimate.format(held) + " of the "
                + MemoryEstimate.format(capacity) + " they may hold together (setting " + SETTING + "); try again when "
                + "they are done";
    }

    /** What one reading holds: grows when the reader asks, released when closed. */
    public final class Reservation implements MemoryAllowance, AutoCloseable {
        private final String source;
        private final String consequence;
        private long granted;

        private Reservation(String source, String consequence, long granted) {
            this.source = source;
            this.consequence = consequence;
            this.granted = granted;
        }

        /** Grants {@code bytes}, and a quarter more so that the reader asks rarely, within the capacity. */
        @Override
        public long require(long bytes) {
            synchronized (MemoryBudget.this) {
                if (bytes <= granted) {
                    return granted;
                }
                String need = "reading " + source + " needs more than " + MemoryEstimate.format(bytes)
                        + " of memory (its cells and the distinct texts of its text columns)";
                if (bytes > capacity) {
                    throw new MemoryBudgetException(true, need + ", " + overLimit() + "; " + consequence);
                }
                long others = held - granted;
                if (others + bytes > capacity) {
                    throw new MemoryBudgetException(false, need + ", " + busy() + "; " + consequence);
                }
                long grant = Math.min(capacity - others, bytes + bytes / 4);
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
            }
        }
    }
}
