package org.forkscape.data;

import java.util.Locale;
import org.apache.parquet.schema.LogicalTypeAnnotation;
import org.apache.parquet.schema.LogicalTypeAnnotation.DecimalLogicalTypeAnnotation;
import org.apache.parquet.schema.LogicalTypeAnnotation.EnumLogicalTypeAnnotation;
import org.apache.parquet.schema.LogicalTypeAnnotation.IntLogicalTypeAnnotation;
import org.apache.parquet.schema.LogicalTypeAnnotation.StringLogicalTypeAnnotation;
import org.apache.parquet.schema.PrimitiveType;
import org.apache.parquet.schema.Type;

/**
 * How one Parquet column's values become a {@link Table} column, from its physical type and logical
 * annotation (Apache Parquet format specification, LogicalTypes.md): integers, floating point, decimals and
 * booleans (as 1 and 0) become numbers; STRING and ENUM text becomes levels. Every other type (dates, times,
 * timestamps, INT96, intervals, UUID, JSON, bytes without a STRING annotation, nested or repeated columns)
 * is refused with its name, since no reading of it as a number or a level would be the user's own.
 */
enum ParquetValue {
    INT32, UINT32, INT64, UINT64, FLOAT, DOUBLE, BOOLEAN, DECIMAL_INT32, DECIMAL_INT64, DECIMAL_BYTES, TEXT;

    boolean isText() {
        return this == TEXT;
    }

    /**
     * The reading of {@code field}.
     *
     * @param where the file and column, for the message
     * @throws DataException naming the column's type when it cannot be read
     */
    static ParquetValue of(Type field, String where) {
        if (!field.isPrimitive()) {
            LogicalTypeAnnotation a = field.getLogicalTypeAnnotation();
            throw unsupported(where, "is a nested column (" + (a == null ? "a group" : a.toString()) + ")");
        }
        if (field.isRepetition(Type.Repetition.REPEATED)) {
            throw unsupported(where, "is a repeated column (a list of values in each row)");
        }
        PrimitiveType p = field.asPrimitiveType();
        LogicalTypeAnnotation a = p.getLogicalTypeAnnotation();
        ParquetValue value = switch (p.getPrimitiveTypeName()) {
            case BOOLEAN -> a == null ? BOOLEAN : null;
            case INT32 -> integer(a, INT32, UINT32, DECIMAL_INT32);
            case INT64 -> integer(a, INT64, UINT64, DECIMAL_INT64);
            case FLOAT -> a == null ? FLOAT : null;
            case DOUBLE -> a == null ? DOUBLE : null;
            case BINARY -> a instanceof StringLogicalTypeAnnotation || a instanceof EnumLogicalTypeAnnotation ? TEXT
                    : a instanceof DecimalLogicalTypeAnnotation ? DECIMAL_BYTES : null;
            case FIXED_LEN_BYTE_ARRAY -> a instanceof DecimalLogicalTypeAnnotation ? DECIMAL_BYTES : null;
            case INT96 -> null;
        };
        if (value == null) {
            throw unsupported(where, "has the Parquet type " + describe(p));
        }
        return value;
    }

    /** The physical type with its annotation, as Parquet's own schema text writes them: INT32 (DATE). */
    static String describe(PrimitiveType p) {
        LogicalTypeAnnotation a = p.getLogicalTypeAnnotation();
        String physical = p.getPrimitiveTypeName().name();
        if (a == null && p.getPrimitiveTypeName() == PrimitiveType.PrimitiveTypeName.BINARY) {
            return physical + " (bytes without a STRING annotation)";
        }
        if (a == null && p.getPrimitiveTypeName() == PrimitiveType.PrimitiveTypeName.INT96) {
            return physical + " (a legacy timestamp)";
        }
        return a == null ? physical : physical + " (" + a.toString().toUpperCase(Locale.ROOT) + ")";
    }

    private static ParquetValue integer(LogicalTypeAnnotation a, ParquetValue signed, ParquetValue unsigned,
            ParquetValue decimal) {
        if (a == null) {
            return signed;
        }
        if (a instanceof IntLogicalTypeAnnotation i) {
            return i.isSigned() ? signed : unsigned;
        }
        return a instanceof DecimalLogicalTypeAnnotation ? decimal : null;
    }

    private static DataException unsupported(String where, String what) {
        return new DataException(where, what + ", which Forkscape does not read; a column is read when it holds "
                + "numbers (integers, floating point, decimals), booleans (as 1 and 0) or text (STRING, ENUM): convert "
                + "this one to a number or to text first");
    }
}
