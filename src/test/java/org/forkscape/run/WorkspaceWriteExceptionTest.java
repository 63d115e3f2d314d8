package org.forkscape.run;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import java.io.UncheckedIOException;
import java.nio.file.AccessDeniedException;
import java.nio.file.FileSystemException;
import org.junit.jupiter.api.Test;

/**
 * The failures a workspace's writes meet, told apart as the JDK reports them on Linux (from memory: ENOSPC
 * as an IOException "No space left on device", EROFS as a FileSystemException whose reason is "Read-only
 * file system", EACCES as an AccessDeniedException), each worded without the path it carries.
 */
class WorkspaceWriteExceptionTest {
    private static final String PATH = "/srv/forkscape/analyses/20260101-000000-abcdef/plan.json";

    @Test
    void noSpaceLeftIsAFullDisk() {
        WorkspaceWriteException e = WorkspaceWriteException.of(wrapped(new IOException("No space left on device")),
                false, "the plan was not saved");
        assertTrue(e.diskFull());
        assertEquals("the workspace's disk is full; the plan was not saved; earlier analyses and runs are intact",
                e.getMessage());
    }

    @Test
    void aReadOnlyFileSystemOrAFolderClosedToTheServerCannotBeWritten() {
        for (IOException cause : new IOException[] {new FileSystemException(PATH, null, "Read-only file system"),
                new AccessDeniedException(PATH)}) {
            WorkspaceWriteException e = WorkspaceWriteException.of(wrapped(cause), false, "the plan was not saved");
            assertFalse(e.diskFull());
            assertEquals("the workspace cannot be written (its folder is read-only, or closed to this server); the plan "
                    + "was not saved; earlier analyses and runs are intact", e.getMessage());
        }
    }

    @Test
    void anyFailureWithLittleSpaceLeftIsAFullDisk() {
        WorkspaceWriteException e = WorkspaceWriteException.of(wrapped(new FileSystemException(PATH, null,
                "Input/output error")), true, "the upload was not kept");
        assertTrue(e.diskFull());
        assertFalse(e.getMessage().contains("/srv"));
    }

    /** As {@link AtomicFiles} throws it: the path in the message. */
    private static UncheckedIOException wrapped(IOException cause) {
        return new UncheckedIOException("cannot write " + PATH + ": " + cause.getMessage(), cause);
    }
}
