package org.forkscape.data;

import java.io.IOException;
import java.io.InputStream;
import java.nio.file.Files;
import java.nio.file.Path;

/**
 * What reading a CSV file into a {@link Table} will hold at most, known before it is read: one pass over
 * its bytes counts the header's fields (commas outside double quotes) and the line ends after it, and
 * nothing is parsed. Rows are at most the line ends (a quoted line break or a blank line only makes the
 * count higher) and at most what the cell limit lets {@link CsvTableReader} keep. Every cell is priced as
 * a number (8 bytes; a text cell's code takes 4) in the reader's blocks, plus the one column's final
 * array that is assembled beside its blocks. What the text levels take depends on how many distinct
 * texts there are, which only reading tells: the reader counts them as they come and asks its
 * {@link MemoryAllowance} for them.
 *
 * @param rows    rows at most
 * @param columns fields of the header
 * @param bytes   bytes the reader's columns hold at most, before text levels
 */
public record TableFootprint(long rows, int columns, long bytes) {
    private static final int BUFFER = 1 << 16;

    public static TableFootprint of(Path file, CsvLimits limits) throws IOException {
        try (InputStream in = Files.newInputStream(file)) {
            LineCount count = LineCount.of(in);
            int columns = count.headerFields();
            long rows = columns == 0 ? 0 : Math.min(count.linesAfterHeader(), limits.maxCells() / columns);
            return of(rows, columns);
        }
    }

    /** The bound for a table of {@code rows} rows and {@code columns} columns, every cell a number. */
    public static TableFootprint of(long rows, int columns) {
        int shift = Chunks.shiftFor(columns);
        long bytes = columns * Chunks.bytes(rows, Double.BYTES, shift) + HeapSizes.array(rows, Double.BYTES);
        return new TableFootprint(rows, columns, columns == 0 ? 0 : bytes);
    }

    /** What a table read holds: its arrays and its levels' texts. */
    public static long heldBy(Table table) {
        long bytes = 0;
        for (Column c : table.columns()) {
            if (c instanceof CategoricalColumn cat) {
                bytes += HeapSizes.array(cat.codes().length, Integer.BYTES);
                for (String level : cat.levels()) {
                    bytes += HeapSizes.string(level) + Integer.BYTES;
                }
            } else {
                bytes += HeapSizes.array(c.size(), Double.BYTES);
            }
        }
        return bytes;
    }

    /**
     * The header's fields and the line ends after it (LF, CR LF or a lone CR; a last line without one
     * counts too), skipping lines of spaces before the header as the reader does.
     */
    private record LineCount(int headerFields, long linesAfterHeader) {
        static LineCount of(InputStream in) throws IOException {
            byte[] buffer = new byte[BUFFER];
            int fields = 0;
            boolean inHeader = true;
            boolean headerHasText = false;
            boolean quoted = false;
            boolean afterCr = false;
            boolean lineOpen = false;
            long lines = 0;
            for (int n = in.read(buffer); n >= 0; n = in.read(buffer)) {
                for (int i = 0; i < n; i++) {
                    byte b = buffer[i];
                    boolean lineEnd = b == '\n' && !afterCr || b == '\r';
                    afterCr = b == '\r';
                    if (inHeader) {
                        if (b == '"') {
                            quoted = !quoted;
                        }
                        if (!quoted && b == ',') {
                            fields++;
                        } else if (!quoted && lineEnd) {
                            inHeader = !headerHasText && fields == 0;
                        } else if (b != ' ' && b != '\t' && b != '\n' && b != '\r') {
                            headerHasText = true;
                        }
                        continue;
                    }
                    if (lineEnd) {
                        lines++;
                        lineOpen = false;
                    } else if (b != '\n') {
                        lineOpen = true;
                    }
                }
            }
            int headerFields = headerHasText || fields > 0 ? fields + 1 : 0;
            return new LineCount(headerFields, lines + (lineOpen ? 1 : 0));
        }
    }
}
