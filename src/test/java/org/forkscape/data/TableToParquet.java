package org.forkscape.data;

import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;

/**
 * A Parquet copy of a table read from CSV, written by {@link ParquetFiles}: numeric columns as optional
 * DOUBLE, categorical ones as optional STRING, missing cells as nulls. The copy holds the same cells, so the
 * Parquet reader must give the same table back and a run on the copy the same results.
 */
public final class TableToParquet {
    private TableToParquet() {
    }

    public static Path write(Table table, Path file, ParquetFiles.Options options) {
        StringBuilder schema = new StringBuilder("message copy {");
        for (Column c : table.columns()) {
            schema.append(c instanceof NumericColumn ? " optional double " : " optional binary ")
                    .append(c.name()).append(c instanceof NumericColumn ? ";" : " (STRING);");
        }
        schema.append(" }");
        List<List<Object>> rows = new ArrayList<>(table.rowCount());
        for (int i = 0; i < table.rowCount(); i++) {
            List<Object> row = new ArrayList<>(table.columns().size());
            for (Column c : table.columns()) {
                if (c.isMissing(i)) {
                    row.add(null);
                } else if (c instanceof NumericColumn n) {
                    row.add(n.values()[i]);
                } else {
                    CategoricalColumn cat = (CategoricalColumn) c;
                    row.add(cat.levels().get(cat.codes()[i]));
                }
            }
            rows.add(row);
        }
        return ParquetFiles.write(file, schema.toString(), rows, options);
    }

    /** Writes a CSV file's Parquet copy: {@code java ... TableToParquet IN.csv OUT.parquet}. */
    public static void main(String[] args) {
        write(new CsvTableReader().read(Path.of(args[0])), Path.of(args[1]), ParquetFiles.Options.DEFAULT);
    }
}
