package org.forkscape.data;

import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.Arrays;
import java.util.Comparator;
import java.util.List;
import java.util.Locale;
import java.util.stream.Stream;

/**
 * The Parquet files a plan's {@code data} names: one file, or every file ending in {@code .parquet} directly
 * inside a folder (the part files a distributed writer leaves, in the order of their names' UTF-8 bytes, as
 * {@code LC_ALL=C ls} lists them). Files whose name starts with {@code .} or {@code _} (a writer's checksums
 * and markers) are not parts. Rows are read part after part in that order, and the data's SHA-256 is taken
 * over the parts in that order too ({@code run.Provenance}), so both are defined by this one list.
 *
 * @param root  the file or folder as named
 * @param files the part files, sorted; the file itself when {@code root} is a file
 */
public record ParquetParts(Path root, List<Path> files) {
    static final String EXTENSION = ".parquet";
    private static final Comparator<Path> BY_NAME_BYTES = (a, b) -> Arrays.compareUnsigned(nameBytes(a), nameBytes(b));

    public ParquetParts {
        files = List.copyOf(files);
    }

    /** Whether {@code path} names Parquet data: a folder, or a file whose name ends in {@code .parquet}. */
    public static boolean isParquet(Path path) {
        return Files.isDirectory(path) || hasParquetName(path.getFileName() == null ? "" : path.getFileName().toString());
    }

    /** Whether a file name (an upload's, say) ends in {@code .parquet}, in any case. */
    public static boolean hasParquetName(String name) {
        return name.toLowerCase(Locale.ROOT).endsWith(EXTENSION);
    }

    /**
     * The parts of a file or folder.
     *
     * @param source the name of the data in messages
     * @throws DataException when there is no such file or folder, or the folder holds no part file
     */
    public static ParquetParts of(Path root, String source) {
        if (Files.isRegularFile(root)) {
            return new ParquetParts(root, List.of(root));
        }
        if (!Files.isDirectory(root)) {
            throw new DataException(source, "no such data file or folder (looked for " + root + ")");
        }
        List<Path> parts;
        try (Stream<Path> children = Files.list(root)) {
            parts = children.filter(ParquetParts::isPart).sorted(BY_NAME_BYTES).toList();
        } catch (IOException e) {
            throw new DataException(source, "the folder cannot be listed: " + e.getMessage());
        }
        if (parts.isEmpty()) {
            throw new DataException(source, "is a folder without Parquet part files (files ending in " + EXTENSION
                    + " directly inside it); name a CSV file, a Parquet file or a folder of Parquet files");
        }
        return new ParquetParts(root, parts);
    }

    /** A part's name relative to the folder (the file's own name), as messages and the hash use it. */
    public String name(Path part) {
        return part.getFileName().toString();
    }

    /** Whether the data is a folder of parts rather than one file. */
    public boolean isFolder() {
        return Files.isDirectory(root);
    }

    private static boolean isPart(Path p) {
        String name = p.getFileName().toString();
        return hasParquetName(name) && !name.startsWith(".") && !name.startsWith("_") && Files.isRegularFile(p);
    }

    private static byte[] nameBytes(Path p) {
        return p.getFileName().toString().getBytes(StandardCharsets.UTF_8);
    }
}
