package org.forkscape.spark;

import java.io.ByteArrayOutputStream;
import java.io.IOException;
import java.io.PrintStream;
import java.io.UncheckedIOException;
import java.lang.management.ManagementFactory;
import java.lang.management.MemoryPoolMXBean;
import java.lang.management.MemoryType;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;
import org.apache.spark.sql.Column;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.SparkSession;
import org.apache.spark.storage.RDDInfo;
import org.apache.spark.util.SizeEstimator;
import org.forkscape.cli.CommandLine;
import org.forkscape.data.Table;
import org.forkscape.fit.BootstrapByParts;
import org.forkscape.fit.BootstrapDesign;
import org.forkscape.fit.DataVariant;
import org.forkscape.fit.VariantKey;
import org.forkscape.fit.VariantSource;
import org.forkscape.plan.Plan;
import org.forkscape.run.RunData;

import static org.apache.spark.sql.functions.col;
import static org.apache.spark.sql.functions.lit;
import static org.apache.spark.sql.functions.pmod;
import static org.apache.spark.sql.functions.sum;
import static org.apache.spark.sql.functions.when;
import static org.apache.spark.sql.functions.xxhash64;

/**
 * The Spark runner at scale, measured on the machine it runs on: {@code java -jar forkscape-spark-local.jar
 * scale --rows 1000000,10000000 --out DIR [--master local[N]] [--single-machine JAR]}. For each row count it
 * generates an invented table into Parquet on the fly ({@link #generate}), runs a plan of every subset of ten
 * controls with HC1 and cluster errors through the Spark runner, and times beside it, on the same data in the
 * same session, Spark's own {@code groupBy().agg(sum)} over the same columns (once over the whole table and
 * once per cluster, the shape of the cluster cells). It reports the time of the aggregation passes (the
 * building of the data variant) and of the rest (the driver's solves and the writing), the JVM's peak heap,
 * the executors' cached rows, and the size of the statistics the driver keeps, which must not grow with the
 * rows. With {@code --single-machine JAR} it also runs {@code java -jar JAR run} on the same plan and data
 * in a child JVM with the JVM's default heap and reports its time and peak resident memory, or that it did
 * not fit. With {@code --null-draws R} the plan also asks for R bootstrap null draws (whole clusters), whose
 * time summary.json records. With {@code --model logit} the plan's outcome is the table's 0/1 column b
 * (whether y is positive) fitted by logit, so that the run times the generalized linear fits' passes
 * ({@link org.forkscape.fit.GlmFitsByParts}).
 */
final class SparkScale {
    static final int CONTROLS = 10;
    static final int CLUSTERS = 1000;
    private static final String USAGE = "usage: scale --rows N[,N...] --out DIR [--master URL] [--partitions N] "
            + "[--null-draws R] [--single-machine JAR] [--model logit] [--absorb two-way]";

    private SparkScale() {
    }

    static int execute(List<String> args, SparkSession spark, int partitions) {
        String rows = take(args, "--rows");
        String out = take(args, "--out");
        String single = take(args, "--single-machine");
        String drawsText = take(args, "--null-draws");
        String model = take(args, "--model");
        String absorb = take(args, "--absorb");
        int draws;
        try {
            draws = drawsText == null ? 0 : Integer.parseInt(drawsText.trim());
        } catch (NumberFormatException e) {
            draws = -1;
        }
        boolean logit = "logit".equals(model);
        boolean twoWay = "two-way".equals(absorb);
        if (rows == null || out == null || !args.isEmpty() || draws < 0 || model != null && !logit
                || absorb != null && !twoWay) {
            System.err.println("forkscape: " + USAGE);
            return 2;
        }
        System.out.println("| rows | aggregation passes (s) | groupBy().agg(sum) (s) | groupBy(g).agg(sum) (s) "
                + "| ratio to groupBy(g) | the rest: levels, row count, solves, writing (s) | whole run (s) | peak heap of the JVM (MB) "
                + "| cached rows on the executors (MB) | statistics kept on the driver (KB) | null draws (s) | single machine |");
        System.out.println("|---|---|---|---|---|---|---|---|---|---|---|---|");
        for (String n : rows.split(",")) {
            long count = Long.parseLong(n.trim().replace("_", ""));
            Path folder = Path.of(out, "rows-" + count);
            System.out.println(measure(spark, count, folder, partitions, draws, single, logit, twoWay));
        }
        return 0;
    }

    private static String measure(SparkSession spark, long rows, Path folder, int partitions, int draws,
            String single, boolean logit, boolean twoWay) {
        Path data = folder.resolve("data");
        Path plan = folder.resolve("plan.json");
        try {
            Files.createDirectories(folder);
            generate(spark, rows, data, twoWay);
            Files.writeString(plan, plan("data", draws, logit, twoWay), StandardCharsets.UTF_8);
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
        String[] columns = columns();
        Column[] sums = new Column[columns.length];
        for (int i = 0; i < columns.length; i++) {
            sums[i] = sum(col(columns[i]));
        }
        // each baseline twice, the second timed: the first warms the file cache and the code
        time(() -> spark.read().parquet(data.toString()).groupBy().agg(sums[0], tail(sums)).collect());
        double global = time(() -> spark.read().parquet(data.toString()).groupBy().agg(sums[0], tail(sums)).collect());
        time(() -> spark.read().parquet(data.toString()).groupBy("g").agg(sums[0], tail(sums)).collect());
        double perCluster = time(() -> spark.read().parquet(data.toString()).groupBy("g").agg(sums[0], tail(sums))
                .collect());

        String text = readString(plan);
        Timed timed = new Timed(new SparkData(spark, null, partitions, text, folder));
        resetPeaks();
        ByteArrayOutputStream captured = new ByteArrayOutputStream();
        PrintStream sink = new PrintStream(captured, true, StandardCharsets.UTF_8);
        long start = System.nanoTime();
        int code = CommandLine.run(new String[] {"run", plan.toString(), "--out", folder.resolve("spark-run")
                .toString()}, sink, sink, timed);
        double whole = (System.nanoTime() - start) / 1e9;
        if (code != 0) {
            throw new IllegalStateException("the Spark run failed: " + captured.toString(StandardCharsets.UTF_8));
        }
        long heap = peakHeap();
        long cached = 0;
        for (RDDInfo info : spark.sparkContext().getRDDStorageInfo()) {
            cached += info.memSize();
        }
        // what the driver keeps: the variants and the objects they reach, less what the Spark session and the
        // cached data set reach anyway (the estimator counts each object once)
        List<Object> session = new ArrayList<>(List.of(spark));
        spark.sparkContext().getPersistentRDDs().values().foreach(session::add);
        List<Object> both = new ArrayList<>(session);
        both.add(timed.variants);
        long kept = SizeEstimator.estimate(both) - SizeEstimator.estimate(session);
        spark.sparkContext().getPersistentRDDs().values().foreach(r -> r.unpersist(true));
        String singleMachine = single == null ? "not run" : SingleMachineRun.measure(Path.of(single), plan,
                folder.resolve("single-run"));
        String drawSeconds = draws == 0 ? "none" : String.format(Locale.ROOT, "%.1f (%,d draws)",
                nullDrawSeconds(folder.resolve("spark-run").resolve("summary.json")), draws);
        return String.format(Locale.ROOT, "| %,d | %.1f | %.1f | %.1f | %.1fx | %.1f | %.1f | %,d | %,d | %,d | %s | %s |",
                rows, timed.seconds, global, perCluster, timed.seconds / perCluster, whole - timed.seconds, whole,
                heap >> 20, cached >> 20, kept >> 10, drawSeconds, singleMachine);
    }

    /**
     * An invented table of {@code rows} rows written as Parquet: ten controls, a key predictor related to the
     * first two, an outcome with a planted effect of 0.2, whether it is positive (b, 1 or 0), and a cluster
     * column of 1,000 groups; with {@code twoWay} also a unit column of rows / 10 levels and a period column
     * of 10, each row's drawn from its number (the crossed effects of a registry panel). Every value is
     * a function of the row's number through Spark's xxhash64, so the same row count gives the same table
     * whatever the partitioning.
     */
    static void generate(SparkSession spark, long rows, Path folder, boolean twoWay) {
        Dataset<Row> t = spark.range(rows).withColumn("common", uniform(0));
        for (int j = 1; j <= CONTROLS; j++) {
            t = t.withColumn("c" + j, uniform(j).plus(col("common").multiply(0.3)));
        }
        t = t.withColumn("x", col("c1").multiply(0.5).plus(col("c2").multiply(0.25)).plus(uniform(20)));
        Column y = col("x").multiply(0.2).plus(uniform(21));
        for (int j = 1; j <= CONTROLS; j++) {
            y = y.plus(col("c" + j).multiply(0.05 * j));
        }
        t = t.withColumn("y", y).withColumn("b", when(col("y").gt(0), 1.0).otherwise(0.0))
                .withColumn("g", pmod(xxhash64(col("id"), lit(99)), lit(CLUSTERS)));
        List<String> rest = new ArrayList<>(List.of(columnsBut("y")));
        if (twoWay) {
            t = t.withColumn("unit", pmod(xxhash64(col("id"), lit(98)), lit(Math.max(1, rows / 10))))
                    .withColumn("period", pmod(xxhash64(col("id"), lit(97)), lit(10L)));
            rest.add("unit");
            rest.add("period");
        }
        t.select("y", rest.toArray(new String[0])).write().mode("overwrite").parquet(folder.toString());
    }

    /** A uniform value on (-0.5, 0.5) from the row's number and {@code stream}. */
    private static Column uniform(int stream) {
        return pmod(xxhash64(col("id"), lit(stream)), lit(1L << 24)).divide((double) (1L << 24)).minus(0.5);
    }

    /** The null draws' time as summary.json records it ({@code null.seconds}). */
    private static double nullDrawSeconds(Path summary) {
        try {
            return new com.fasterxml.jackson.databind.ObjectMapper().readTree(summary.toFile()).get("null").get("seconds")
                    .asDouble();
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
    }

    /**
     * Every subset of the ten controls (1,024), with HC1 and cluster errors: 2,048 specifications; with
     * {@code draws} bootstrap null draws (whole clusters of g, the errors' clusters, by default); with
     * {@code logit}, of the outcome b by logit; with {@code twoWay}, beside the unit and period effects absorbed.
     */
    static String plan(String data, int draws, boolean logit, boolean twoWay) {
        StringBuilder optional = new StringBuilder();
        for (int j = 1; j <= CONTROLS; j++) {
            optional.append(j == 1 ? "" : ", ").append("\"c").append(j).append('"');
        }
        return """
                {"data": "%s", "nullDraws": %d, "seed": 2026, "decisions": [
                  {"name": "outcome", "kind": "outcome", "alternatives": [{"label": "%s", "column": "%s"}]},
                  {"name": "key", "kind": "predictor", "alternatives": [{"label": "x", "column": "x"}]},
                  {"name": "controls", "kind": "controls", "optional": [%s]},
                  %s%s{"name": "errors", "kind": "errors", "alternatives": ["HC1", "cluster:g"]}]}
                """.formatted(data, draws, logit ? "b" : "y", logit ? "b" : "y", optional,
                logit ? "{\"name\": \"model\", \"kind\": \"model\", \"alternatives\": [\"logit\"]},\n      " : "",
                twoWay ? "{\"name\": \"effects\", \"kind\": \"absorb\", \"alternatives\": [{\"label\": "
                        + "\"unit and period\", \"columns\": [\"unit\", \"period\"]}]},\n      " : "");
    }

    private static String[] columns() {
        List<String> c = new ArrayList<>(List.of("y", "x"));
        for (int j = 1; j <= CONTROLS; j++) {
            c.add("c" + j);
        }
        return c.toArray(new String[0]);
    }

    private static String[] columnsBut(String first) {
        List<String> c = new ArrayList<>();
        for (String s : columns()) {
            if (!s.equals(first)) {
                c.add(s);
            }
        }
        c.add("b");
        c.add("g");
        return c.toArray(new String[0]);
    }

    private static Column[] tail(Column[] all) {
        return java.util.Arrays.copyOfRange(all, 1, all.length);
    }

    private static double time(Runnable r) {
        long start = System.nanoTime();
        r.run();
        return (System.nanoTime() - start) / 1e9;
    }

    private static String readString(Path p) {
        try {
            return Files.readString(p, StandardCharsets.UTF_8);
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
    }

    private static void resetPeaks() {
        System.gc();
        for (MemoryPoolMXBean pool : ManagementFactory.getMemoryPoolMXBeans()) {
            pool.resetPeakUsage();
        }
    }

    /** The sum of the heap pools' peaks since {@link #resetPeaks}: an upper bound of the heap at its peak. */
    private static long peakHeap() {
        long peak = 0;
        for (MemoryPoolMXBean pool : ManagementFactory.getMemoryPoolMXBeans()) {
            if (pool.getType() == MemoryType.HEAP) {
                peak += pool.getPeakUsage().getUsed();
            }
        }
        return peak;
    }

    private static String take(List<String> args, String option) {
        int at = args.indexOf(option);
        if (at < 0 || at + 1 >= args.size()) {
            return null;
        }
        String value = args.remove(at + 1);
        args.remove(at);
        return value;
    }

    /** The Spark data with the time spent building variants (the aggregation passes) and the variants kept. */
    private static final class Timed implements RunData {
        private final SparkData data;
        final List<DataVariant> variants = new ArrayList<>();
        double seconds;

        Timed(SparkData data) {
            this.data = data;
        }

        @Override
        public Table table(Plan plan) {
            return data.table(plan);
        }

        @Override
        public VariantSource variants(Plan plan, Table table) {
            VariantSource source = data.variants(plan, table);
            return new VariantSource() {
                @Override
                public DataVariant variant(VariantKey key, java.util.concurrent.ExecutorService pool) {
                    long start = System.nanoTime();
                    DataVariant v = source.variant(key, pool);
                    synchronized (Timed.this) {
                        seconds += (System.nanoTime() - start) / 1e9;
                        if (!variants.contains(v)) {
                            variants.add(v);
                        }
                    }
                    return v;
                }

                @Override
                public BootstrapByParts bootstrap(BootstrapDesign design) {
                    return source.bootstrap(design);
                }
            };
        }

        @Override
        public java.nio.file.Path hashedFile(Plan plan) {
            return null;
        }
    }
}
