package org.forkscape.bench;

import java.io.IOException;
import java.io.PrintStream;
import java.io.UncheckedIOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.Collections;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import org.forkscape.data.CategoricalColumn;
import org.forkscape.data.Column;
import org.forkscape.data.CsvTableReader;
import org.forkscape.data.NumericColumn;
import org.forkscape.data.ParquetTableReader;
import org.forkscape.data.Table;

/**
 * Reading the benchmark's rows from CSV and from a Parquet copy of them ({@link ParquetCopy}), interleaved
 * (CSV, Parquet, CSV, Parquet ...) after one reading of each, with the median of three. The copy must read
 * back to the CSV table's cells, bit for bit, or the case fails rather than time a wrong reading.
 */
final class ParquetLoadBenchmark {
    private static final int REPS = 3;

    private ParquetLoadBenchmark() {
    }

    static Map<String, Object> run(PrintStream out, Path folder, int rows, long seed) {
        try {
            Path csv = folder.resolve("data-" + rows + ".csv");
            if (!Files.exists(csv)) {
                BenchData.write(csv, rows, seed);
            }
            CsvTableReader csvReader = new CsvTableReader();
            ParquetTableReader parquetReader = new ParquetTableReader();
            Table table = csvReader.read(csv);
            Path parquet = ParquetCopy.write(table, folder.resolve("data-" + rows + ".parquet"));
            requireSameCells(table, parquetReader.read(parquet));
            List<Double> csvSeconds = new ArrayList<>();
            List<Double> parquetSeconds = new ArrayList<>();
            for (int r = 0; r < REPS; r++) {
                long start = System.nanoTime();
                csvReader.read(csv);
                csvSeconds.add((System.nanoTime() - start) / 1e9);
                start = System.nanoTime();
                parquetReader.read(parquet);
                parquetSeconds.add((System.nanoTime() - start) / 1e9);
            }
            double csvMedian = median(csvSeconds);
            double parquetMedian = median(parquetSeconds);
            out.printf("loading %,d rows x %d columns: CSV %.3f s (%,d bytes), Parquet %.3f s (%,d bytes, SNAPPY); "
                    + "median of %d%n", rows, table.columns().size(), csvMedian, Files.size(csv), parquetMedian,
                    Files.size(parquet), REPS);
            Map<String, Object> json = new LinkedHashMap<>();
            json.put("case", "load-parquet-n" + rows);
            json.put("rows", rows);
            json.put("columns", table.columns().size());
            json.put("csv_seconds", csvSeconds);
            json.put("parquet_seconds", parquetSeconds);
            json.put("csv_bytes", Files.size(csv));
            json.put("parquet_bytes", Files.size(parquet));
            return json;
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
    }

    private static void requireSameCells(Table csv, Table parquet) {
        for (Column c : csv.columns()) {
            Column p = parquet.column(c.name());
            boolean same;
            if (c instanceof NumericColumn n) {
                same = p instanceof NumericColumn q && Arrays.equals(n.values(), q.values());
            } else {
                CategoricalColumn t = (CategoricalColumn) c;
                same = p instanceof CategoricalColumn q && t.levels().equals(q.levels())
                        && Arrays.equals(t.codes(), q.codes());
            }
            if (!same) {
                throw new IllegalStateException("the Parquet copy of column " + c.name() + " reads back differently");
            }
        }
    }

    private static double median(List<Double> values) {
        List<Double> sorted = new ArrayList<>(values);
        Collections.sort(sorted);
        return sorted.get(sorted.size() / 2);
    }
}
