package org.forkscape.web.system;

/**
 * A table the server's memory has no room for: above the limit, answered 507 (Insufficient Storage) like a
 * full disk, since only a larger limit makes it fit; or above what other uploads being read leave now,
 * answered 503, since the same request succeeds when they are done.
 */
public final class MemoryBudgetException extends RuntimeException {
    private final boolean overLimit;

    MemoryBudgetException(boolean overLimit, String message) {
        super(message);
        this.overLimit = overLimit;
    }

    /** Whether the table is above the limit itself, not only above what is free now. */
    public boolean overLimit() {
        return overLimit;
    }
}
