package org.forkscape.run;

import java.io.UncheckedIOException;
import java.nio.file.AccessDeniedException;
import java.nio.file.FileSystemException;
import java.util.Locale;

/**
 * The workspace could not keep something because its disk is full or it cannot be written. The message is
 * a sentence for the user that names no path (the cause, logged on the server, has it): what happened,
 * what was not kept, and that what was kept before is intact, since every write replaces a file whole
 * ({@link AtomicFiles}).
 */
public final class WorkspaceWriteException extends RuntimeException {
    private static final String INTACT = "earlier analyses and runs are intact";

    private final boolean diskFull;

    private WorkspaceWriteException(boolean diskFull, String message, Throwable cause) {
        super(message, cause);
        this.diskFull = diskFull;
    }

    /** True when the disk is full; false when the workspace cannot be written for another reason. */
    public boolean diskFull() {
        return diskFull;
    }

    /**
     * A refusal before anything is written: {@code need} bytes are expected, {@code free} are left.
     *
     * @param notKept what is not kept, as a clause ("this run was not started")
     */
    static WorkspaceWriteException noRoom(long need, long free, String notKept) {
        return new WorkspaceWriteException(true, "the workspace's disk is full: this needs about " + size(need)
                + " and " + size(free) + " are free; " + notKept + "; " + INTACT, null);
    }

    /**
     * The write that failed, in words. A disk is taken as full when the file system says so or when
     * less than {@code Workspace.MIN_FREE} is left after the failure.
     */
    static WorkspaceWriteException of(Exception failure, boolean littleLeft, String notKept) {
        boolean full = littleLeft || says(failure, "no space left", "not enough space", "quota exceeded");
        if (full) {
            return new WorkspaceWriteException(true, "the workspace's disk is full; " + notKept + "; " + INTACT,
                    failure);
        }
        boolean readOnly = says(failure, "read-only file system") || cause(failure) instanceof AccessDeniedException;
        return new WorkspaceWriteException(false, "the workspace cannot be written (" + (readOnly
                ? "its folder is read-only, or closed to this server" : "the file system refused the write")
                + "); " + notKept + "; " + INTACT, failure);
    }

    private static Throwable cause(Exception failure) {
        return failure instanceof UncheckedIOException u ? u.getCause() : failure;
    }

    private static boolean says(Exception failure, String... words) {
        for (Throwable t = failure; t != null; t = t.getCause()) {
            String text = (t instanceof FileSystemException f ? f.getReason() + " " : "") + t.getMessage();
            for (String w : words) {
                if (text.toLowerCase(Locale.ROOT).contains(w)) {
                    return true;
                }
            }
        }
        return false;
    }

    private static String size(long bytes) {
        double mb = bytes / (1024.0 * 1024.0);
        return mb >= 10 ? String.format(Locale.ROOT, "%,.0f MB", mb) : String.format(Locale.ROOT, "%.1f MB", mb);
    }
}
