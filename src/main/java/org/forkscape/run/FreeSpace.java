package org.forkscape.run;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;

/** How many bytes a folder's file system still lets this process write; tests give a full disk. */
@FunctionalInterface
public interface FreeSpace {
    /** The file store's usable space, what the operating system would let this process write. */
    FreeSpace OF_FILE_STORE = folder -> Files.getFileStore(folder).getUsableSpace();

    long usableBytes(Path folder) throws IOException;
}
