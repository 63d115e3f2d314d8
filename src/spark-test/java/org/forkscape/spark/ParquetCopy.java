package org.forkscape.spark;

import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.RowFactory;
import org.apache.spark.sql.SparkSession;
import org.apache.spark.sql.types.DataTypes;
import org.apache.spark.sql.types.StructField;
import org.apache.spark.sql.types.StructType;
import org.forkscape.data.CategoricalColumn;
import org.forkscape.data.Column;
import org.forkscape.data.NumericColumn;
import org.forkscape.data.Table;

/**
 * A Parquet copy of a table read from CSV, written by Spark: numeric columns as doubles, categorical ones as
 * strings, missing cells as nulls, in a given number of part files.
 */
final class ParquetCopy {
    private ParquetCopy() {
    }

    static Path write(SparkSession spark, Table table, Path folder, int files) {
        List<StructField> fields = new ArrayList<>();
        for (Column c : table.columns()) {
            fields.add(DataTypes.createStructField(c.name(), c instanceof CategoricalColumn ? DataTypes.StringType
                    : DataTypes.DoubleType, true));
        }
        List<Row> rows = new ArrayList<>(table.rowCount());
        for (int r = 0; r < table.rowCount(); r++) {
            Object[] values = new Object[table.columns().size()];
            for (int c = 0; c < values.length; c++) {
                Column col = table.columns().get(c);
                if (col.isMissing(r)) {
                    values[c] = null;
                } else if (col instanceof CategoricalColumn cat) {
                    values[c] = cat.levels().get(cat.codes()[r]);
                } else {
                    values[c] = ((NumericColumn) col).values()[r];
                }
            }
            rows.add(RowFactory.create(values));
        }
        spark.createDataFrame(rows, DataTypes.createStructType(fields)).coalesce(1).repartition(files).write()
                .parquet(folder.toString());
        return folder;
    }
}
