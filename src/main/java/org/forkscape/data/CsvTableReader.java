package org.forkscape.data;

import java.io.BufferedInputStream;
import java.io.ByteArrayInputStream;
import java.io.IOException;
import java.io.InputStream;
import java.io.UncheckedIOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.Set;
import java.util.regex.Matcher;
import java.util.regex.Pattern;
import org.apache.commons.csv.CSVFormat;
import org.apache.commons.csv.CSVParser;
import org.apache.commons.csv.CSVRecord;

/**
 * Reads a comma-separated file (RFC 4180: Shafranovich 2005, "Common Format and MIME Type for
 * Comma-Separated Values (CSV) Files"; UTF-8, optional byte-order mark) into a {@link Table}.
 *
 * <p>Surrounding spaces are removed from every cell and column name, quoted or not. A column whose
 * non-missing cells all look like decimal numbers (see {@link NumberSyntax}) is numeric; any other column
 * is categorical, its levels sorted. Missing cells are the empty string, {@code NA}, {@code NaN} and
 * {@code .}. Empty lines and lines holding only spaces are skipped. Every problem becomes a
 * {@link DataException} naming the file and, where it applies, the line and column.
 */
public final class CsvTableReader {
    /** The spellings of a missing cell, for messages. */
    public static final String MISSING_SPELLINGS = "an empty cell, NA, NaN or .";
    private static final Set<String> MISSING = Set.of("", "NA", "NaN", ".");
    private static final CSVFormat FORMAT = CSVFormat.RFC4180.builder()
            .setIgnoreSurroundingSpaces(true)
            .setIgnoreEmptyLines(true)
            .get();
    private static final Pattern UNCLOSED_QUOTE = Pattern.compile(
            "\\(startline (\\d+)\\) EOF reached before encapsulated token finished");
    private static final Pattern TEXT_AFTER_QUOTE = Pattern.compile(
            "Invalid character between encapsulated token and delimiter at line: (\\d+)");
    /** Bytes inspected for NUL, the mark of a binary file (a spreadsheet, an archive, an image). */
    private static final int BINARY_PROBE = 8192;

    private final CsvLimits limits;

    public CsvTableReader(CsvLimits limits) {
        this.limits = limits;
    }

    public CsvTableReader() {
        this(CsvLimits.DEFAULT);
    }

    public Table read(Path file) {
        return read(file, file.getFileName() == null ? file.toString() : file.getFileName().toString(),
                MemoryAllowance.UNLIMITED);
    }

    /**
     * Reads a file, naming it {@code source} in messages, and holding no more memory than {@code allowance}
     * grants (see {@link #read(Opener, String, MemoryAllowance)}).
     */
    public Table read(Path file, String source, MemoryAllowance allowance) {
        if (!Files.isRegularFile(file)) {
            throw new DataException(source, "no such data file (looked for " + file + ")");
        }
        return read(() -> Files.newInputStream(file), source, allowance);
    }

    /**
     * Reads from a stream; {@code source} names the file in messages. The stream is not closed. It is read
     * into memory first (a column of numbers that turns to text is read twice), so large files are better
     * read with {@link #read(Path, String, MemoryAllowance)}.
     */
    public Table read(InputStream input, String source) {
        byte[] bytes;
        try {
            bytes = input.readAllBytes();
        } catch (IOException e) {
            throw new DataException(source, "cannot be read: " + e.getMessage());
        }
        return read(() -> new ByteArrayInputStream(bytes), source, MemoryAllowance.UNLIMITED);
    }

    /** Opens the file's content again from its start, for each pass. */
    @FunctionalInterface
    private interface Opener {
        InputStream open() throws IOException;
    }

    /**
     * Reads the content {@code opener} gives, column by column into compact storage: numbers as
     * {@code double[]}, text as {@code int[]} codes with each distinct text kept once, and no cell's text
     * kept once its row is read. A column of numbers that turns to text further down is read a second time
     * for the spelling of its numbers. What the columns, the levels and the final arrays hold is counted as
     * it grows (see {@link HeapSizes}) and asked of {@code allowance}, which may stop the reading.
     */
    private Table read(Opener opener, String source, MemoryAllowance allowance) {
        FirstPass first = new FirstPass(source, allowance);
        eachRecord(opener, source, first);
        if (first.columns == null) {
            throw new DataException(source, "is empty: a header line and at least one data row are needed");
        }
        if (first.rows == 0) {
            throw new DataException(source, "has a header but no data rows");
        }
        List<ColumnBuilder> again = first.columns.stream().filter(ColumnBuilder::needsEarlierRows).toList();
        if (!again.isEmpty()) {
            eachRecord(opener, source, new EarlierRows(again, first));
        }
        return first.toTable();
    }

    /** Receives the records of a file in order, the header first; answers false to stop the reading. */
    private interface RecordSink {
        boolean accept(CSVRecord record, long line);
    }

    private static void eachRecord(Opener opener, String source, RecordSink sink) {
        long lastLine = 0;
        InputStream opened;
        try {
            opened = opener.open();
        } catch (IOException e) {
            throw new DataException(source, "cannot be read: " + e.getMessage());
        }
        try (InputStream raw = opened) {
            BufferedInputStream in = new BufferedInputStream(raw, 1 << 16);
            int skipped = skipByteOrderMarkRejectingBinary(in, source);
            StrictUtf8Reader text = new StrictUtf8Reader(in, skipped);
            try (CSVParser parser = CSVParser.builder().setReader(text).setFormat(FORMAT).get()) {
                for (CSVRecord record : parser) {
                    long line = parser.getCurrentLineNumber();
                    if (!isBlankLine(record) && !sink.accept(record, line)) {
                        return;
                    }
                    lastLine = line;
                }
            }
        } catch (UncheckedIOException e) {
            throw translate(e.getCause(), source, lastLine);
        } catch (IOException e) {
            throw translate(e, source, lastLine);
        } catch (IllegalStateException e) {
            throw new DataException(source + ", after line " + lastLine, "is not valid CSV: " + e.getMessage());
        }
    }

    static boolean isMissing(String cell) {
        return MISSING.contains(cell);
    }

    /** A line holding nothing but spaces reads as one empty field. */
    private static boolean isBlankLine(CSVRecord record) {
        return record.size() == 1 && record.get(0).isBlank();
    }

    private static List<String> readHeader(CSVRecord record, long line, String source, CsvLimits limits) {
        String where = source + ", line " + line;
        if (record.size() > limits.maxColumns()) {
            throw new DataException(where, String.format("the header has %,d columns; at most %,d are accepted",
                    record.size(), limits.maxColumns()));
        }
        List<String> names = new ArrayList<>(record.size());
        Map<String, Integer> seen = new HashMap<>();
        for (int j = 0; j < record.size(); j++) {
            String name = record.get(j).strip();
            if (name.isEmpty()) {
                String hint = j == record.size() - 1 && j > 0 ? " (does the header end with a comma?)" : "";
                throw new DataException(where, "column " + (j + 1) + " of the header has an empty name" + hint);
            }
            Integer earlier = seen.putIfAbsent(name, j);
            if (earlier != null) {
                throw new DataException(where, "the column name \"" + name + "\" appears twice (columns "
                        + (earlier + 1) + " and " + (j + 1) + "); column names must be unique");
            }
            names.add(name);
        }
        return names;
    }

    /**
     * Skips a UTF-8 byte-order mark (EF BB BF) and refuses a file with NUL bytes near its start.
     *
     * @return the number of bytes skipped
     */
    private static int skipByteOrderMarkRejectingBinary(BufferedInputStream in, String source) {
        try {
            in.mark(BINARY_PROBE);
            byte[] head = in.readNBytes(BINARY_PROBE);
            in.reset();
            if (head.length >= 4 && head[0] == 'P' && head[1] == 'A' && head[2] == 'R' && head[3] == '1') {
                throw new DataException(source, "looks like a Parquet file (it begins with PAR1), which is read as "
                        + "Parquet when its name ends in .parquet; rename it");
            }
            for (byte b : head) {
                if (b == 0) {
                    throw new DataException(source, "looks like a binary file (it contains NUL bytes), not CSV "
                            + "text; export the data as CSV in UTF-8");
                }
            }
            if (head.length >= 3 && (head[0] & 0xFF) == 0xEF && (head[1] & 0xFF) == 0xBB && (head[2] & 0xFF) == 0xBF) {
                in.skipNBytes(3);
                return 3;
            }
            return 0;
        } catch (IOException e) {
            throw new DataException(source, "cannot be read: " + e.getMessage());
        }
    }

    private static DataException translate(Throwable e, String source, long lastLine) {
        if (e instanceof StrictUtf8Reader.InvalidUtf8Exception bad) {
            String value = bad.firstByte < 0 ? "the file ends inside a multi-byte character"
                    : String.format("the byte 0x%02X (byte %,d of the file) does not belong to a UTF-8 character",
                            bad.firstByte, bad.byteOffset + 1);
            return new DataException(source + ", line " + bad.line, "is not UTF-8 text: " + value
                    + "; save the file as UTF-8 (files in Latin-1 or Windows-1252 need converting)");
        }
        if (e instanceof StrictUtf8Reader.NulCharacterException nul) {
            return new DataException(source + ", line " + nul.line, "contains a NUL character, which CSV text never "
                    + "holds (a binary file, or a name or cell with a NUL in it); export the data as CSV in UTF-8");
        }
        String message = e == null ? "unreadable" : String.valueOf(e.getMessage());
        Matcher unclosed = UNCLOSED_QUOTE.matcher(message);
        if (unclosed.find()) {
            return new DataException(source + ", line " + unclosed.group(1),
                    "a quoted field starts here and its closing quote never comes");
        }
        Matcher afterQuote = TEXT_AFTER_QUOTE.matcher(message);
        if (afterQuote.find()) {
            return new DataException(source + ", line " + afterQuote.group(1), "a quoted field is followed by other "
                    + "characters before the next comma; a quote inside a quoted field is written twice (\"\")");
        }
        return new DataException(source + ", after line " + lastLine, "is not valid CSV: " + message);
    }

    /** The first reading: the header, then every row into its columns, counting what they hold. */
    private final class FirstPass implements RecordSink {
        private final String source;
        private final MemoryAllowance allowance;
        private List<ColumnBuilder> columns;
        private int rows;
        private long held;
        private long granted;

        FirstPass(String source, MemoryAllowance allowance) {
            this.source = source;
            this.allowance = allowance;
        }

        @Override
        public boolean accept(CSVRecord record, long line) {
            if (columns == null) {
                List<String> names = readHeader(record, line, source, limits);
                int shift = Chunks.shiftFor(names.size());
                columns = names.stream().map(name -> new ColumnBuilder(name, shift)).toList();
                return true;
            }
            if (record.size() != columns.size()) {
                String hint = record.size() > columns.size()
                        ? " (a value holding a comma must be put in double quotes)" : "";
                throw new DataException(source + ", line " + line, "expected " + columns.size()
                        + " fields as in the header, found " + record.size() + hint);
            }
            if ((long) (rows + 1) * columns.size() > limits.maxCells()) {
                throw new DataException(source, String.format("has more than %,d cells (rows times columns), the "
                        + "limit of this server", limits.maxCells()));
            }
            for (int j = 0; j < columns.size(); j++) {
                held(columns.get(j).add(rows, record.get(j).strip(), line));
            }
            rows++;
            return true;
        }

        void held(long change) {
            held += change;
            if (held > granted) {
                granted = allowance.require(held);
            }
        }

        /** The columns assembled one at a time, so that only one holds its blocks and its array at once. */
        Table toTable() {
            List<Column> out = new ArrayList<>(columns.size());
            for (ColumnBuilder c : columns) {
                long array = c.finalArrayBytes(rows);
                held(array);
                long blocks = c.blockBytes();
                out.add(c.build(rows, source));
                held(-blocks);
            }
            return new Table(source, out);
        }
    }

    /** The second reading, of the rows before each turned column's first text, for their numbers' spelling. */
    private static final class EarlierRows implements RecordSink {
        private final List<ColumnBuilder> columns;
        private final int[] positions;
        private final FirstPass first;
        private final int until;
        private boolean header = true;
        private int row;

        EarlierRows(List<ColumnBuilder> columns, FirstPass first) {
            this.columns = columns;
            this.first = first;
            this.positions = columns.stream().mapToInt(first.columns::indexOf).toArray();
            this.until = columns.stream().mapToInt(ColumnBuilder::textFrom).max().orElse(0);
        }

        @Override
        public boolean accept(CSVRecord record, long line) {
            if (header) {
                header = false;
                return true;
            }
            for (int k = 0; k < columns.size(); k++) {
                ColumnBuilder c = columns.get(k);
                if (row < c.textFrom()) {
                    first.held(c.addEarlier(row, record.get(positions[k]).strip()));
                }
            }
            return ++row < until;
        }
    }
}
