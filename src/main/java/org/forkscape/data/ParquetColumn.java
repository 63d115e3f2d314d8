package org.forkscape.data;

import java.math.BigDecimal;
import java.math.BigInteger;
import java.nio.ByteBuffer;
import java.nio.charset.CharacterCodingException;
import java.nio.charset.CodingErrorAction;
import java.nio.charset.StandardCharsets;
import java.util.HashMap;
import java.util.Map;
import org.apache.parquet.column.ColumnDescriptor;
import org.apache.parquet.column.ColumnReader;
import org.apache.parquet.io.api.Binary;
import org.apache.parquet.schema.LogicalTypeAnnotation.DecimalLogicalTypeAnnotation;
import tools.jackson.core.io.schubfach.FloatToDecimal;

/**
 * One column of a Parquet read: its values written straight into the table's final array, since Parquet
 * states the row count before any value is read. A null is a missing cell. Numbers become doubles as the
 * same value written in a CSV file would: integers and decimals rounded once to the nearest double (as
 * {@link Double#parseDouble} rounds their decimal text), a FLOAT as the double of its shortest decimal
 * (the text other tools print for it), by the Schubfach algorithm that Jackson bundles (Giulietti 2020, "The
 * Schubfach way to render doubles"): Java 17's {@link Float#toString} is not always shortest (it writes
 * -8.1109158E8 for the float whose shortest decimal is -8.110916E8, two different doubles), and Java 19's
 * is, so the JDK's own would make a table depend on the Java release; NaN as missing as in CSV. Text is
 * stripped of surrounding spaces and the CSV reader's missing spellings mark missing cells, so a CSV file
 * and a Parquet copy of it give one table; each distinct text is decoded once and kept once in a
 * {@link LevelPool}.
 */
final class ParquetColumn {
    /** Bytes a distinct text's key holds beyond its bytes: the Binary object and its entry in the map. */
    private static final int KEY_OVERHEAD = 32 + HeapSizes.MAP_ENTRY;

    private final String name;
    private final ParquetValue value;
    private final ColumnDescriptor descriptor;
    private final int scale;
    private final double[] numbers;
    private final int[] codes;
    private final LevelPool pool;
    private final Map<Binary, Integer> seen;
    private long keyBytes;

    ParquetColumn(String name, ParquetValue value, ColumnDescriptor descriptor, int rows) {
        this.name = name;
        this.value = value;
        this.descriptor = descriptor;
        this.scale = descriptor.getPrimitiveType().getLogicalTypeAnnotation() instanceof DecimalLogicalTypeAnnotation d
                ? d.getScale() : 0;
        this.numbers = value.isText() ? null : new double[rows];
        this.codes = value.isText() ? new int[rows] : null;
        this.pool = value.isText() ? new LevelPool() : null;
        this.seen = value.isText() ? new HashMap<>() : null;
    }

    /** What the final array of {@code rows} rows of a column read as {@code value} holds. */
    static long arrayBytes(ParquetValue value, long rows) {
        return HeapSizes.array(rows, value.isText() ? Integer.BYTES : Double.BYTES);
    }

    ColumnDescriptor descriptor() {
        return descriptor;
    }

    /**
     * Reads {@code count} values into rows {@code from} onwards.
     *
     * @param where the file, for messages
     * @param firstRow the 1-based number of row {@code from} in the data, for messages
     * @return the bytes the text levels grew by
     */
    long read(ColumnReader reader, int from, int count, String where, long firstRow) {
        int defined = descriptor.getMaxDefinitionLevel();
        long before = heldByTexts();
        for (int i = 0; i < count; i++) {
            boolean present = reader.getCurrentDefinitionLevel() == defined;
            if (value.isText()) {
                codes[from + i] = present ? code(reader.getBinary(), where, firstRow + i) : -1;
            } else {
                numbers[from + i] = present ? number(reader, where, firstRow + i) : Double.NaN;
            }
            reader.consume();
        }
        return heldByTexts() - before;
    }

    /** What the distinct texts hold: the levels, and each distinct text's key as read. */
    private long heldByTexts() {
        return value.isText() ? pool.bytes() + keyBytes : 0;
    }

    private double number(ColumnReader reader, String where, long row) {
        double v = switch (value) {
            case INT32 -> reader.getInteger();
            case UINT32 -> Integer.toUnsignedLong(reader.getInteger());
            case INT64 -> reader.getLong();
            case UINT64 -> unsigned(reader.getLong());
            case FLOAT -> Double.parseDouble(FloatToDecimal.toString(reader.getFloat()));
            case DOUBLE -> reader.getDouble();
            case BOOLEAN -> reader.getBoolean() ? 1 : 0;
            case DECIMAL_INT32 -> BigDecimal.valueOf(reader.getInteger(), scale).doubleValue();
            case DECIMAL_INT64 -> BigDecimal.valueOf(reader.getLong(), scale).doubleValue();
            case DECIMAL_BYTES -> new BigDecimal(new BigInteger(reader.getBinary().getBytes()), scale).doubleValue();
            case TEXT -> throw new IllegalStateException("text is coded, not read as a number");
        };
        if (Double.isInfinite(v)) {
            throw new DataException(where + ", row " + row, "the value " + v + " in column \"" + name
                    + "\" is not a finite number");
        }
        return v;
    }

    /** An unsigned 64-bit integer as the nearest double. */
    private static double unsigned(long v) {
        return v >= 0 ? v : Double.parseDouble(Long.toUnsignedString(v));
    }

    private int code(Binary text, String where, long row) {
        Integer known = seen.get(text);
        if (known != null) {
            return known;
        }
        String cell = utf8(text, where, row).strip();
        int code = CsvTableReader.isMissing(cell) ? -1 : pool.code(cell);
        seen.put(text.copy(), code);
        keyBytes += KEY_OVERHEAD + HeapSizes.array(text.length(), 1);
        return code;
    }

    private String utf8(Binary text, String where, long row) {
        try {
            return StandardCharsets.UTF_8.newDecoder().onMalformedInput(CodingErrorAction.REPORT)
                    .onUnmappableCharacter(CodingErrorAction.REPORT).decode(ByteBuffer.wrap(text.getBytes())).toString();
        } catch (CharacterCodingException e) {
            throw new DataException(where + ", row " + row, "the text in column \"" + name
                    + "\" is not valid UTF-8, which a Parquet STRING must be");
        }
    }

    /** The finished column; text codes are renumbered in place to the sorted levels. */
    Column build() {
        if (!value.isText()) {
            return new NumericColumn(name, numbers);
        }
        LevelPool.Sorted sorted = pool.sorted();
        int[] recode = sorted.recode();
        for (int i = 0; i < codes.length; i++) {
            if (codes[i] >= 0) {
                codes[i] = recode[codes[i]];
            }
        }
        return new CategoricalColumn(name, codes, sorted.levels(), true);
    }
}
