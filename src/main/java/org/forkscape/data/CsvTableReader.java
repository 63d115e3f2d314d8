package org.forkscape.data;

import java.io.BufferedInputStream;
import java.io.IOException;
import java.io.InputStream;
import java.io.InputStreamReader;
import java.io.Reader;
import java.io.UncheckedIOException;
import java.nio.charset.CharacterCodingException;
import java.nio.charset.CharsetDecoder;
import java.nio.charset.CodingErrorAction;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.HashMap;
import java.util.HashSet;
import java.util.List;
import java.util.Map;
import java.util.Set;
import java.util.TreeSet;
import org.apache.commons.csv.CSVFormat;
import org.apache.commons.csv.CSVParser;
import org.apache.commons.csv.CSVRecord;

/**
 * Reads a comma-separated file (RFC 4180, UTF-8, optional byte-order mark) into a {@link Table}.
 *
 * <p>A column whose non-missing cells all look like decimal numbers is numeric; any other column is
 * categorical. Missing cells are the empty string, {@code NA}, {@code NaN} and {@code .}, after surrounding
 * spaces are removed. Every problem becomes a {@link DataException} naming the file and line.
 */
public final class CsvTableReader {
    private static final Set<String> MISSING = Set.of("", "NA", "NaN", ".");
    private static final CSVFormat FORMAT = CSVFormat.RFC4180.builder()
            .setIgnoreSurroundingSpaces(true)
            .setIgnoreEmptyLines(true)
            .get();

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
        rejectBinary(in, source);
        CharsetDecoder decoder = StandardCharsets.UTF_8.newDecoder()
                .onMalformedInput(CodingErrorAction.REPORT)
                .onUnmappableCharacter(CodingErrorAction.REPORT);
        Reader reader = new InputStreamReader(in, decoder);
        List<String> header = null;
        List<String[]> cells = null;
        long lastLine = 1;
        try (CSVParser parser = CSVParser.builder().setReader(reader).setFormat(FORMAT).get()) {
            for (CSVRecord record : parser) {
                long line = parser.getCurrentLineNumber();
                if (header == null) {
                    header = readHeader(record, source);
                    cells = new ArrayList<>(header.size());
                    for (int j = 0; j < header.size(); j++) {
                        cells.add(new String[1024]);
                    }
                    lastLine = line;
                    continue;
                }
                if (record.size() != header.size()) {
                    throw new DataException(source + ", line " + line, "expected " + header.size()
                            + " fields as in the header, found " + record.size());
                }
                int row = (int) record.getRecordNumber() - 2;
                if ((long) (row + 1) * header.size() > limits.maxCells()) {
                    throw new DataException(source, "has more than " + limits.maxCells()
                            + " cells (rows times columns), the limit of this server");
                }
                for (int j = 0; j < header.size(); j++) {
                    String[] column = cells.get(j);
                    if (row == column.length) {
                        column = java.util.Arrays.copyOf(column, column.length * 2);
                        cells.set(j, column);
                    }
                    column[row] = record.get(j);
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
        if (header == null) {
            throw new DataException(source, "is empty: a header line and at least one data row are needed");
        }
        int rows = 0;
        // the record count is implied by the first column's filled prefix
        String[] first = cells.get(0);
        while (rows < first.length && first[rows] != null) {
            rows++;
        }
        if (rows == 0) {
            throw new DataException(source, "has a header but no data rows");
        }
        List<Column> columns = new ArrayList<>(header.size());
        for (int j = 0; j < header.size(); j++) {
            columns.add(toColumn(header.get(j), cells.get(j), rows));
            cells.set(j, null);
        }
        return new Table(source, columns);
    }

    private List<String> readHeader(CSVRecord record, String source) {
        if (record.size() > limits.maxColumns()) {
            throw new DataException(source + ", line 1", "has " + record.size() + " columns; this server accepts at most "
                    + limits.maxColumns());
        }
        List<String> names = new ArrayList<>(record.size());
        Set<String> seen = new HashSet<>();
        for (int j = 0; j < record.size(); j++) {
            String name = record.get(j);
            if (j == 0 && !name.isEmpty() && name.charAt(0) == '\uFEFF') {
                name = name.substring(1).strip();
            }
            if (name.isEmpty()) {
                throw new DataException(source + ", line 1", "column " + (j + 1) + " has an empty name");
            }
            if (!seen.add(name)) {
                throw new DataException(source + ", line 1", "the column name \"" + name + "\" appears twice");
            }
            names.add(name);
        }
        return names;
    }

    private static void rejectBinary(BufferedInputStream in, String source) {
        try {
            in.mark(8192);
            byte[] head = in.readNBytes(8192);
            in.reset();
            for (byte b : head) {
                if (b == 0) {
                    throw new DataException(source, "looks like a binary file (it contains NUL bytes), not CSV text");
                }
            }
        } catch (IOException e) {
            throw new DataException(source, "cannot be read: " + e.getMessage());
        }
    }

    private static DataException translate(Throwable e, String source, long lastLine) {
        if (e instanceof CharacterCodingException) {
            return new DataException(source + ", after line " + lastLine, "is not UTF-8 text (invalid byte sequence)");
        }
        String message = e == null ? "unreadable" : String.valueOf(e.getMessage());
        if (message.contains("EOF reached before encapsulated token finished")) {
            return new DataException(source + ", after line " + lastLine, "has a quote that is never closed");
        }
        if (message.contains("invalid char between encapsulated token and delimiter")) {
            return new DataException(source + ", after line " + lastLine,
                    "has a quoted field followed by other characters before the next comma");
        }
        return new DataException(source + ", after line " + lastLine, "is not valid CSV: " + message);
    }

    private static Column toColumn(String name, String[] raw, int rows) {
        double[] values = new double[rows];
        boolean numeric = true;
        for (int i = 0; i < rows; i++) {
            String cell = raw[i];
            if (MISSING.contains(cell)) {
                values[i] = Double.NaN;
            } else if (numeric && NumberSyntax.isDecimal(cell) && Double.isFinite(Double.parseDouble(cell))) {
                values[i] = Double.parseDouble(cell);
            } else {
                numeric = false;
            }
        }
        if (numeric) {
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
}
