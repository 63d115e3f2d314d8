package org.forkscape.data;

import java.io.BufferedInputStream;
import java.io.IOException;
import java.io.InputStream;
import java.io.UncheckedIOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.Set;
import java.util.TreeSet;
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
        String name = file.getFileName() == null ? file.toString() : file.getFileName().toString();
        if (!Files.isRegularFile(file)) {
            throw new DataException(name, "no such data file (looked for " + file + ")");
        }
        try (InputStream in = Files.newInputStream(file)) {
            return read(in, name);
        } catch (IOException e) {
            throw new DataException(name, "cannot be read: " + e.getMessage());
        }
    }

    /** Reads from a stream; {@code source} names the file in messages. The stream is not closed. */
    public Table read(InputStream input, String source) {
        BufferedInputStream in = new BufferedInputStream(input, 1 << 16);
        int skipped = skipByteOrderMarkRejectingBinary(in, source);
        Cells cells = null;
        long lastLine = 0;
        StrictUtf8Reader text = new StrictUtf8Reader(in, skipped);
        try (CSVParser parser = CSVParser.builder().setReader(text).setFormat(FORMAT).get()) {
            for (CSVRecord record : parser) {
                long line = parser.getCurrentLineNumber();
                if (isBlankLine(record)) {
                    lastLine = line;
                    continue;
                }
                if (cells == null) {
                    cells = new Cells(readHeader(record, line, source));
                } else {
                    cells.add(record, line, source, limits);
                }
                lastLine = line;
            }
        } catch (UncheckedIOException e) {
            throw translate(e.getCause(), source, lastLine);
        } catch (IOException e) {
            throw translate(e, source, lastLine);
        } catch (IllegalStateException e) {
            throw new DataException(source + ", after line " + lastLine, "is not valid CSV: " + e.getMessage());
        }
        if (cells == null) {
            throw new DataException(source, "is empty: a header line and at least one data row are needed");
        }
        if (cells.rows == 0) {
            throw new DataException(source, "has a header but no data rows");
        }
        return cells.toTable(source);
    }

    /** A line holding nothing but spaces reads as one empty field. */
    private static boolean isBlankLine(CSVRecord record) {
        return record.size() == 1 && record.get(0).isBlank();
    }

    private List<String> readHeader(CSVRecord record, long line, String source) {
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

    /** The cells read so far, column by column, with the line each row ended on for messages. */
    private static final class Cells {
        private final List<String> header;
        private final String[][] columns;
        private int[] lineOfRow = new int[16];
        private int rows;

        Cells(List<String> header) {
            this.header = header;
            this.columns = new String[header.size()][16];
        }

        void add(CSVRecord record, long line, String source, CsvLimits limits) {
            if (record.size() != header.size()) {
                String hint = record.size() > header.size()
                        ? " (a value holding a comma must be put in double quotes)" : "";
                throw new DataException(source + ", line " + line, "expected " + header.size()
                        + " fields as in the header, found " + record.size() + hint);
            }
            if ((long) (rows + 1) * header.size() > limits.maxCells()) {
                throw new DataException(source, String.format("has more than %,d cells (rows times columns), the "
                        + "limit of this server", limits.maxCells()));
            }
            if (rows == lineOfRow.length) {
                int grown = rows * 2;
                lineOfRow = Arrays.copyOf(lineOfRow, grown);
                for (int j = 0; j < columns.length; j++) {
                    columns[j] = Arrays.copyOf(columns[j], grown);
                }
            }
            for (int j = 0; j < columns.length; j++) {
                columns[j][rows] = record.get(j).strip();
            }
            lineOfRow[rows] = (int) Math.min(line, Integer.MAX_VALUE);
            rows++;
        }

        Table toTable(String source) {
            List<Column> out = new ArrayList<>(columns.length);
            for (int j = 0; j < columns.length; j++) {
                out.add(toColumn(j, source));
                columns[j] = null;
            }
            return new Table(source, out);
        }

        private Column toColumn(int j, String source) {
            String name = header.get(j);
            String[] raw = columns[j];
            double[] values = new double[rows];
            boolean numeric = true;
            int tooLarge = -1;
            for (int i = 0; i < rows && numeric; i++) {
                String cell = raw[i];
                if (MISSING.contains(cell)) {
                    values[i] = Double.NaN;
                } else if (NumberSyntax.isDecimal(cell)) {
                    values[i] = Double.parseDouble(cell);
                    if (Double.isInfinite(values[i]) && tooLarge < 0) {
                        tooLarge = i;
                    }
                } else {
                    numeric = false;
                }
            }
            if (numeric) {
                if (tooLarge >= 0) {
                    throw new DataException(source + ", line " + lineOfRow[tooLarge], "the value "
                            + abbreviate(raw[tooLarge]) + " in column \"" + name + "\" is too large for a number "
                            + "(the limit is about 1.8e308)");
                }
                return new NumericColumn(name, values);
            }
            TreeSet<String> distinct = new TreeSet<>();
            for (int i = 0; i < rows; i++) {
                if (!MISSING.contains(raw[i])) {
                    distinct.add(raw[i]);
                }
            }
            List<String> levels = new ArrayList<>(distinct);
            Map<String, Integer> code = new HashMap<>();
            for (int k = 0; k < levels.size(); k++) {
                code.put(levels.get(k), k);
            }
            int[] codes = new int[rows];
            for (int i = 0; i < rows; i++) {
                codes[i] = MISSING.contains(raw[i]) ? -1 : code.get(raw[i]);
            }
            return new CategoricalColumn(name, codes, levels);
        }

        private static String abbreviate(String cell) {
            return cell.length() <= 40 ? cell : cell.substring(0, 20) + "..." + cell.substring(cell.length() - 10);
        }
    }
}
