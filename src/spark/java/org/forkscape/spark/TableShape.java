package org.forkscape.spark;

import java.io.Serializable;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.HashMap;
import java.util.Iterator;
import java.util.List;
import java.util.Map;
import org.apache.spark.sql.catalyst.InternalRow;
import org.apache.spark.sql.types.BooleanType;
import org.apache.spark.sql.types.DataType;
import org.apache.spark.sql.types.DecimalType;
import org.apache.spark.sql.types.NumericType;
import org.apache.spark.sql.types.StringType;
import org.apache.spark.sql.types.StructField;
import org.forkscape.InputException;
import org.forkscape.data.CategoricalColumn;
import org.forkscape.data.Column;
import org.forkscape.data.NumericColumn;
import org.forkscape.data.Table;

/**
 * The columns a plan reads from a Parquet data set, as Forkscape types them: integers, floats, decimals
 * and booleans (as 0/1) are numeric, strings are categorical with their distinct values as levels in sorted
 * order (as the CSV reader orders them), nulls and NaN are missing. Turns one partition's rows into a
 * {@link Table} whose codes are the whole data set's, and gives the driver the same columns without rows.
 */
final class TableShape implements Serializable {
    private static final long serialVersionUID = 1L;

    private final String[] names;
    private final boolean[] categorical;
    private final String[][] levels;

    /** @param schema the data set's schema, whose types {@link #part} reads the columns by */
    TableShape(String[] names, boolean[] categorical, String[][] levels, org.apache.spark.sql.types.StructType schema) {
        this.names = names;
        this.categorical = categorical;
        this.levels = levels;
        readers = new Reader[names.length];
        decimalShape = new int[names.length][];
        for (int c = 0; c < names.length; c++) {
            DataType t = schema.apply(names[c]).dataType();
            if (t instanceof DecimalType d) {
                decimalShape[c] = new int[] {d.precision(), d.scale()};
            }
            readers[c] = reader(t);
        }
    }

    /** Whether Forkscape reads a Parquet column of this type; if so, whether it is categorical. */
    static boolean categorical(StructField field, String source) {
        DataType t = field.dataType();
        if (t instanceof StringType) {
            return true;
        }
        if (t instanceof NumericType || t instanceof BooleanType || t instanceof DecimalType) {
            return false;
        }
        throw new InputException("data", "column \"" + field.name() + "\" of " + source + " has the Parquet type "
                + t.simpleString() + ", which Forkscape does not read; give numbers, booleans or text");
    }

    String[] names() {
        return names.clone();
    }

    /** The columns with no rows, for a table of {@code rows} rows held elsewhere; {@code others} are the data's further columns (for messages). */
    Table withoutRows(String source, int rows, List<String> others) {
        List<Column> columns = new ArrayList<>();
        for (int c = 0; c < names.length; c++) {
            columns.add(categorical[c] ? new CategoricalColumn(names[c], new int[0], List.of(levels[c]))
                    : new NumericColumn(names[c], new double[0]));
        }
        for (String other : others) {
            columns.add(new NumericColumn(other, new double[0]));
        }
        return Table.withoutRows(source, columns, rows);
    }

    /**
     * How each column of {@link #names} is read from Spark's internal rows, by its Parquet type (the
     * dataset's schema): the getter that gives the value itself, with no boxing of an external row.
     */
    private enum Reader { DOUBLE, FLOAT, LONG, INT, SHORT, BYTE, BOOLEAN, DECIMAL, TEXT }

    private final Reader[] readers;
    private final int[][] decimalShape;

    private static Reader reader(DataType t) {
        if (t instanceof StringType) {
            return Reader.TEXT;
        }
        if (t instanceof DecimalType) {
            return Reader.DECIMAL;
        }
        if (t instanceof BooleanType) {
            return Reader.BOOLEAN;
        }
        return switch (t.typeName()) {
            case "double" -> Reader.DOUBLE;
            case "float" -> Reader.FLOAT;
            case "long" -> Reader.LONG;
            case "integer" -> Reader.INT;
            case "short" -> Reader.SHORT;
            case "byte" -> Reader.BYTE;
            default -> throw new IllegalStateException("a type the shape does not read: " + t.simpleString());
        };
    }

    /**
     * One partition's rows (the columns of {@link #names}, in order, as Spark's internal rows, read by
     * the getters of their types) as a table coded like the whole; with {@code keyed}, each row's two further
     * fields (file name, row index; {@link RowIdentity}) give its identity. Each value is the one the CSV
     * reader would give for the same number: integers and floats widened exactly, a decimal by
     * {@code BigDecimal.doubleValue} (correctly rounded), booleans as 0/1.
     */
    SparkPart part(Iterator<InternalRow> rows, boolean keyed) {
        int p = names.length;
        List<Map<String, Integer>> codeOf = new ArrayList<>();
        for (int c = 0; c < p; c++) {
            Map<String, Integer> m = new HashMap<>();
            if (categorical[c]) {
                for (int k = 0; k < levels[c].length; k++) {
                    m.put(levels[c][k], k);
                }
            }
            codeOf.add(m);
        }
        double[][] numbers = new double[p][];
        int[][] codes = new int[p][];
        for (int c = 0; c < p; c++) {
            if (categorical[c]) {
                codes[c] = new int[1024];
            } else {
                numbers[c] = new double[1024];
            }
        }
        long[] keys = keyed ? new long[1024] : null;
        Map<String, Long> fileHash = new HashMap<>();
        int n = 0;
        while (rows.hasNext()) {
            InternalRow row = rows.next();
            if (n == (categorical[0] ? codes[0].length : numbers[0].length)) {
                if (keyed) {
                    keys = Arrays.copyOf(keys, 2 * n);
                }
                for (int c = 0; c < p; c++) {
                    if (categorical[c]) {
                        codes[c] = Arrays.copyOf(codes[c], 2 * n);
                    } else {
                        numbers[c] = Arrays.copyOf(numbers[c], 2 * n);
                    }
                }
            }
            for (int c = 0; c < p; c++) {
                if (categorical[c]) {
                    codes[c][n] = row.isNullAt(c) ? -1 : codeOf.get(c).get(row.getUTF8String(c).toString());
                } else {
                    numbers[c][n] = row.isNullAt(c) ? Double.NaN : number(row, c);
                }
            }
            if (keyed) {
                keys[n] = RowIdentity.key(fileHash, row.getUTF8String(p).toString(), row.getLong(p + 1));
            }
            n++;
        }
        List<Column> columns = new ArrayList<>(p);
        for (int c = 0; c < p; c++) {
            columns.add(categorical[c] ? new CategoricalColumn(names[c], Arrays.copyOf(codes[c], n),
                    List.of(levels[c])) : new NumericColumn(names[c], Arrays.copyOf(numbers[c], n)));
        }
        return new SparkPart(new Table("partition", columns), keyed ? Arrays.copyOf(keys, n) : null);
    }

    private double number(InternalRow row, int c) {
        return switch (readers[c]) {
            case DOUBLE -> row.getDouble(c);
            case FLOAT -> row.getFloat(c);
            case LONG -> row.getLong(c);
            case INT -> row.getInt(c);
            case SHORT -> row.getShort(c);
            case BYTE -> row.getByte(c);
            case BOOLEAN -> row.getBoolean(c) ? 1 : 0;
            case DECIMAL -> row.getDecimal(c, decimalShape[c][0], decimalShape[c][1]).toJavaBigDecimal().doubleValue();
            case TEXT -> throw new IllegalStateException("a text column read as a number");
        };
    }
}
