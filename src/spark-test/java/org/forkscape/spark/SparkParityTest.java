package org.forkscape.spark;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.concurrent.atomic.AtomicBoolean;
import org.apache.spark.sql.SparkSession;
import org.forkscape.data.CsvTableReader;
import org.forkscape.data.Table;
import org.forkscape.fit.PlanEdits;
import org.forkscape.fit.VarianceRoute;
import org.forkscape.plan.Plan;
import org.forkscape.plan.PlanReader;
import org.forkscape.run.MultiverseRunner;
import org.forkscape.run.ResultTable;
import org.forkscape.run.RunProgress;
import org.forkscape.reference.ReferenceFiles;
import org.forkscape.run.RunResult;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.ValueSource;

/**
 * The Spark runner in local mode against the single-machine engine on the same data, read from CSV there
 * and from a Parquet copy written by Spark here: every specification's estimate, standard error and p-value
 * within {@value #RELATIVE} relative (the two sum the same cells in a different order, and the level
 * shifts are merged means rather than one mean; the largest difference measured is written to
 * {@code target/spark-reports/}), and the counts exact. Three plans: the AirQuality reference plan, whose
 * constant Month dummies send some specifications to the precision guard's QR refit, made here from the
 * partitions' triangular factors, and whose HC2 and HC3 come from the row passes by batches (at 3
 * partitions, also against R); the ToothGrowth reference plan of {@code src/test/r/make-reference.R}, its HC3
 * from the row passes, also held against R's lm() with sandwich (toothgrowth-expected.csv, same tolerance as
 * {@code RLmSandwichReferenceTest}); and the demo plan without the zone control, whose collinearity with the
 * absorbed zone sends hundreds of specifications to the QR refit (the whole plan, refits reduced in batches,
 * at 3 partitions only). It still has a log, a standardize, a winsorize, a trim, a keep rule, missing cells,
 * an absorbed fixed effect, cluster errors, and HC1 and HC3 beside the absorbed zone (row passes by
 * batches). Each at 1, 3 and 8 partitions; {@code SparkRowPassTest}
 * has the ChickWeight plan's leverages of 1 and the batch size.
 */
class SparkParityTest {
    static final double RELATIVE = 1e-10;
    static final double R_RELATIVE = 1e-9;
    static final Path REFERENCE = Path.of("src/test/resources/reference");
    static final Path SAMPLE = Path.of("sample-data");

    static SparkSession spark;
    @TempDir
    static Path folder;
    static Path toothParquet;
    static Path demoParquet;

    @BeforeAll
    static void start() {
        // the test class path has Spring Boot's Logback as the logging backend, with no configuration: quiet it
        ((ch.qos.logback.classic.Logger) org.slf4j.LoggerFactory.getLogger(org.slf4j.Logger.ROOT_LOGGER_NAME))
                .setLevel(ch.qos.logback.classic.Level.WARN);
        spark = SparkSession.builder().master("local[2]").appName("forkscape-spark-test")
                .config("spark.ui.enabled", "false").config("spark.sql.shuffle.partitions", "4").getOrCreate();
        toothParquet = ParquetCopy.write(spark, new CsvTableReader().read(REFERENCE.resolve("toothgrowth.csv")),
                folder.resolve("toothgrowth.parquet"), 3);
        demoParquet = ParquetCopy.write(spark, new CsvTableReader().read(SAMPLE.resolve("civic-demo.csv")),
                folder.resolve("civic-demo.parquet"), 4);
    }

    @AfterAll
    static void stop() {
        spark.stop();
    }

    @ParameterizedTest(name = "{0} partitions")
    @ValueSource(ints = {1, 3, 8})
    void toothGrowthEqualsTheEngineAndR(int partitions) throws IOException {
        String planText = Files.readString(REFERENCE.resolve("toothgrowth-plan.json"));
        Comparison c = compare(planText, REFERENCE, toothParquet, partitions);
        assertTrue(c.spark.routes().getOrDefault(VarianceRoute.FOURTH_MOMENTS, 0L) > 0
                && c.spark.routes().getOrDefault(VarianceRoute.CLUSTER_CELLS, 0L) > 0, "HC1 from fourth moments and "
                + "cluster errors from cluster cells on Spark: " + c.spark.routes());
        // HC3: 3 outcomes x 2 dose controls x 2 samples, every one from the row passes
        assertEquals(12, SparkRowPassTest.served(c.spark), "specifications served by the row passes");
        report("toothgrowth-" + partitions, c.worst);

        // and against R: every specification of the plan joined by its labels
        List<Map<String, String>> expected = ReferenceFiles.rows("toothgrowth-expected.csv");
        ResultTable r = c.spark.results();
        assertEquals(expected.size(), r.size(), "specifications against toothgrowth-expected.csv");
        Map<String, Integer> slots = ReferenceFiles.slotsByLabels(c.spark);
        for (Map<String, String> row : expected) {
            String key = String.join(" | ", row.get("outcome"), row.get("supplement"), row.get("dose"), row.get("doses"),
                    row.get("errors"));
            int slot = slots.get(key);
            String where = "R lm() and sandwich, toothgrowth-expected.csv (" + ReferenceFiles.versions() + "), " + key;
            assertClose(Double.parseDouble(row.get("estimate")), r.estimate(slot), R_RELATIVE, where + " estimate");
            assertClose(Double.parseDouble(row.get("std_error")), r.stdError(slot), R_RELATIVE, where + " std_error");
            assertClose(Double.parseDouble(row.get("p_value")), r.pValue(slot), R_RELATIVE, where + " p_value");
            assertEquals(Integer.parseInt(row.get("n_obs")), r.nObs(slot), where + " n_obs");
        }
    }

    @Test
    void airqualityWithQrRefitsEqualsTheEngineAndR() throws IOException {
        Path parquet = ParquetCopy.write(spark, new CsvTableReader().read(REFERENCE.resolve("airquality.csv")),
                folder.resolve("airquality.parquet"), 3);
        String planText = Files.readString(REFERENCE.resolve("airquality-plan.json"));
        Comparison c = compare(planText, REFERENCE, parquet, 3);
        assertTrue(c.spark.refitByQr() > 0 && c.spark.refitByQr() < c.spark.results().size(), c.spark.refitByQr()
                + " specifications refit by QR from the partitions' triangular factors");
        // HC2 and HC3: 2 of the 7 error types of 3 x 3 x 8 x 2 x 2 specifications, all from the row passes
        assertTrue(SparkRowPassTest.served(c.spark) >= 2 * 288, SparkRowPassTest.served(c.spark)
                + " specifications served by the row passes");
        report("airquality-3", c.worst);
        List<Map<String, String>> expected = ReferenceFiles.rows("airquality-expected.csv");
        ResultTable r = c.spark.results();
        assertEquals(expected.size(), r.size(), "specifications against airquality-expected.csv");
        Map<String, Integer> slots = ReferenceFiles.slotsByLabels(c.spark);
        for (Map<String, String> row : expected) {
            String key = String.join(" | ", row.get("outcome"), row.get("temperature"), row.get("controls"),
                    row.get("season"), row.get("radiation outliers"), row.get("errors"));
            int slot = slots.get(key);
            if (!row.get("status").equals("ok")) {
                continue;
            }
            String where = "R lm() and sandwich, airquality-expected.csv (" + ReferenceFiles.versions() + "), " + key;
            assertClose(Double.parseDouble(row.get("estimate")), r.estimate(slot), R_RELATIVE, where + " estimate");
            assertClose(Double.parseDouble(row.get("std_error")), r.stdError(slot), R_RELATIVE, where + " std_error");
        }
    }

    @ParameterizedTest(name = "{0} partitions")
    @ValueSource(ints = {1, 3, 8})
    void demoPlanEqualsTheEngine(int partitions) throws IOException {
        String planText = PlanEdits.withoutZoneControl(Files.readString(SAMPLE.resolve("civic-demo.plan.json")));
        Comparison c = compare(planText, SAMPLE, demoParquet, partitions);
        assertTrue(c.spark.routes().getOrDefault(VarianceRoute.CLUSTER_CELLS, 0L) > 0, "cluster cells on Spark: "
                + c.spark.routes());
        assertTrue(SparkRowPassTest.served(c.spark) > 0, "HC1 and HC3 beside the absorbed zone from the row passes");
        report("demo-" + partitions, c.worst);
    }

    /**
     * The whole demo plan at 3 partitions: its zone control, collinear with the absorbed zone, sends hundreds
     * of specifications to the precision guard, whose QR refits are reduced in batches, one Spark job for up
     * to 64 of them ({@code fit.RefitsByParts}).
     */
    @Test
    void demoPlanWithItsQrRefitsEqualsTheEngine() throws IOException {
        Comparison c = compare(Files.readString(SAMPLE.resolve("civic-demo.plan.json")), SAMPLE, demoParquet, 3);
        long passes = 0;
        for (int v = 0; v < c.spark.models().variantCount(); v++) {
            passes += c.spark.models().variant(c.spark.models().variantKey(v)).refitBatches.get();
        }
        assertTrue(passes > 0 && c.spark.refitByQr() > 8 * passes, c.spark.refitByQr() + " QR refits in " + passes
                + " Spark jobs");
        report("demo-refits", c.worst);
    }

    @Test
    void theSameBitsEveryTimeForTheSamePartitioning() throws IOException {
        String planText = Files.readString(REFERENCE.resolve("toothgrowth-plan.json"));
        RunResult first = sparkRun(planText, REFERENCE, toothParquet, 3);
        RunResult second = sparkRun(planText, REFERENCE, toothParquet, 3);
        for (int slot = 0; slot < first.results().size(); slot++) {
            assertEquals(first.results().estimate(slot), second.results().estimate(slot), 0.0);
            assertEquals(first.results().stdError(slot), second.results().stdError(slot), 0.0);
        }
    }

    record Comparison(RunResult spark, double[] worst) {
    }

    /** Both runs of one plan, every specification compared; {@code worst} = largest relative differences. */
    static Comparison compare(String planText, Path planFolder, Path parquet, int partitions) {
        return compare(planText, planFolder, parquet, partitions, true);
    }

    /** The same; {@code rowFree} false turns the Spark run's routes without rows off (the runner's comparison switch). */
    static Comparison compare(String planText, Path planFolder, Path parquet, int partitions, boolean rowFree) {
        Plan plan = new PlanReader(false).read(planText, planFolder.toAbsolutePath());
        Table csv = new CsvTableReader().read(plan.dataFile());
        RunResult local = new MultiverseRunner(2).run(plan, csv, RunProgress.SILENT, new AtomicBoolean());
        RunResult onSpark = sparkRun(planText, planFolder, parquet, partitions, rowFree);
        for (int v = 0; v < onSpark.models().variantCount(); v++) {
            assertFalse(onSpark.models().variant(onSpark.models().variantKey(v)).holdsRows(),
                    "the Spark run's variants hold statistics, not rows");
        }
        ResultTable a = local.results();
        ResultTable b = onSpark.results();
        assertEquals(a.size(), b.size());
        assertEquals(csv.rowCount(), onSpark.table().rowCount(), "rows counted on Spark");
        double[] worst = new double[3];
        int fitted = 0;
        for (int slot = 0; slot < a.size(); slot++) {
            String where = "specification " + a.specNumber(slot);
            assertEquals(a.specIndex(slot), b.specIndex(slot));
            assertEquals(a.status(slot), b.status(slot), where + " status");
            assertEquals(a.nObs(slot), b.nObs(slot), where + " n_obs");
            assertEquals(a.nParams(slot), b.nParams(slot), where + " n_params");
            assertEquals(a.df(slot), b.df(slot), 0.0, where + " df");
            if (!a.fitted(slot)) {
                continue;
            }
            fitted++;
            worst[0] = Math.max(worst[0], assertClose(a.estimate(slot), b.estimate(slot), RELATIVE, where + " estimate"));
            worst[1] = Math.max(worst[1], assertClose(a.stdError(slot), b.stdError(slot), RELATIVE, where + " std_error"));
            worst[2] = Math.max(worst[2], assertClose(a.pValue(slot), b.pValue(slot), RELATIVE, where + " p_value"));
        }
        // at least half: the leverage plan leaves half its specifications with the leverage-1 status
        assertTrue(fitted >= a.size() / 2, fitted + " of " + a.size() + " fitted");
        return new Comparison(onSpark, worst);
    }

    static RunResult sparkRun(String planText, Path planFolder, Path parquet, int partitions) {
        return sparkRun(planText, planFolder, parquet, partitions, true);
    }

    static RunResult sparkRun(String planText, Path planFolder, Path parquet, int partitions, boolean rowFree) {
        Plan plan = new PlanReader(false).read(planText, planFolder.toAbsolutePath());
        SparkData data = new SparkData(spark, parquet.toString(), partitions, planText, planFolder.toAbsolutePath());
        Table columns = data.table(plan);
        return new MultiverseRunner(2, rowFree).withVariants(data.variants(plan, columns)).run(plan, columns,
                RunProgress.SILENT, new AtomicBoolean());
    }

    /** The relative difference, failing above {@code tolerance}; exact zeros and equal NaNs agree. */
    static double assertClose(double expected, double actual, double tolerance, String what) {
        if (Double.isNaN(expected) && Double.isNaN(actual) || expected == actual) {
            return 0;
        }
        double relative = Math.abs(actual - expected) / Math.max(Math.abs(expected), Double.MIN_NORMAL);
        assertTrue(relative <= tolerance, what + ": " + actual + " against " + expected + ", relative " + relative);
        return relative;
    }

    static void report(String name, double[] worst) {
        try {
            Path dir = Path.of("target/spark-reports");
            Files.createDirectories(dir);
            Files.writeString(dir.resolve("parity-" + name + ".txt"), String.format(Locale.ROOT,
                    "largest relative difference, Spark local mode against the single-machine engine: estimate %.3g, "
                            + "std_error %.3g, p_value %.3g%n", worst[0], worst[1], worst[2]), StandardCharsets.UTF_8);
        } catch (IOException e) {
            throw new java.io.UncheckedIOException(e);
        }
    }
}
