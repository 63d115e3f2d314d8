package org.forkscape.run;

import java.io.IOException;
import java.io.OutputStream;
import java.io.UncheckedIOException;
import java.nio.file.AtomicMoveNotSupportedException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.StandardCopyOption;

/**
 * Writes a file so that a crash at any moment leaves either the old file or the new one: the content
 * goes to a temporary file in the same folder, is forced to disk, then moved over the target.
 */
public final class AtomicFiles {
    private AtomicFiles() {
    }

    /** Something that writes a file's content to a stream. */
    @FunctionalInterface
    public interface Content {
        void writeTo(OutputStream out) throws IOException;
    }

    public static void write(Path target, Content content) {
        Path folder = target.toAbsolutePath().getParent();
        Path temp = null;
        try {
            Files.createDirectories(folder);
            temp = Files.createTempFile(folder, "." + target.getFileName(), ".tmp");
            readableByAll(temp);
            try (var channel = java.nio.channels.FileChannel.open(temp, java.nio.file.StandardOpenOption.WRITE);
                    OutputStream out = new java.io.BufferedOutputStream(java.nio.channels.Channels.newOutputStream(channel),
                            1 << 16)) {
                content.writeTo(out);
                out.flush();
                channel.force(true);
            }
            try {
                Files.move(temp, target, StandardCopyOption.ATOMIC_MOVE, StandardCopyOption.REPLACE_EXISTING);
            } catch (AtomicMoveNotSupportedException e) {
                Files.move(temp, target, StandardCopyOption.REPLACE_EXISTING);
            }
            temp = null;
        } catch (IOException e) {
            throw new UncheckedIOException("cannot write " + target + ": " + e.getMessage(), e);
        } finally {
            if (temp != null) {
                try {
                    Files.deleteIfExists(temp);
                } catch (IOException ignored) {
                    // the temporary file is hidden and harmless; the error that got us here is what matters
                }
            }
        }
    }

    /** Temporary files are created owner-only; results are meant to be shared, like any file a user writes. */
    private static void readableByAll(Path file) throws IOException {
        if (file.getFileSystem().supportedFileAttributeViews().contains("posix")) {
            Files.setPosixFilePermissions(file, java.nio.file.attribute.PosixFilePermissions.fromString("rw-r--r--"));
        }
    }

    public static void writeString(Path target, String text) {
        write(target, out -> out.write(text.getBytes(java.nio.charset.StandardCharsets.UTF_8)));
    }
}
