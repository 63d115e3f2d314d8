package org.forkscape.spark;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import org.apache.spark.sql.SparkSession;
import org.forkscape.InputException;
import org.forkscape.data.Column;
import org.forkscape.data.CsvTableReader;
import org.forkscape.data.NumericColumn;
import org.forkscape.data.Table;
import org.forkscape.fit.VarianceRoute;
import org.forkscape.plan.PlanReader;
import org.forkscape.reference.ReferenceFiles;
import org.forkscape.run.ResultTable;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.ValueSource;

/**
 * Analytic weights and multi-way clustering on Spark local mode, each reference plan from a Parquet copy at 1, 3
 * and 8 partitions against the single-machine engine on the CSV within 1e-10 relative
 * ({@link SparkParityTest#compare}), with the routes asserted taken, and at 3 partitions also against R (the
 * tolerance of {@link SparkParityTest#R_RELATIVE}). The weights reference plan ({@code water-survey-plan.json}:
 * zero weights, a district whose weights are all zero, missing weights, district effects absorbed or not, a
 * control constant within districts so QR refits, classical, HC0 to HC3, district and district x wave
 * clusters): weighted fourth moments, weighted per-cluster cells of the columns and their intersection,
 * weighted row passes, QR refits from the partitions' weighted factors; against R's {@code lm(weights = )} with
 * sandwich (water-survey-expected.csv from {@code src/test/r/weights-reference.R}). The multi-way reference
 * plan ({@code plot-panel-plan.json}: two- and three-way clusters over plots, seasons and observers, plot
 * effects absorbed or not, variances that are not positive): every component from the partitions' cells, or
 * where they could lose digits from the clusters' scores summed over the partitions' rows; against R's
 * {@code lm} with {@code sandwich::vcovCL(multi0 = FALSE)} (plot-panel-expected.csv from
 * {@code src/test/r/multiway-cluster-reference.R}), R's statuses where its variance is not positive. And a
 * negative weight refused at its JSON path, as the plan check refuses it on one machine.
 */
class SparkWeightsAndClustersTest {
    static SparkSession spark;
    @TempDir
    static Path folder;
    static Path waterParquet;
    static Path plotParquet;

    @BeforeAll
    static void start() {
        ((ch.qos.logback.classic.Logger) org.slf4j.LoggerFactory.getLogger(org.slf4j.Logger.ROOT_LOGGER_NAME))
                .setLevel(ch.qos.logback.classic.Level.WARN);
        spark = SparkSession.builder().master("local[2]").appName("forkscape-spark-test")
                .config("spark.ui.enabled", "false").config("spark.sql.shuffle.partitions", "4").getOrCreate();
        SparkParityTest.spark = spark;
        waterParquet = ParquetCopy.write(spark, new CsvTableReader().read(
                SparkParityTest.REFERENCE.resolve("water-survey.csv")), folder.resolve("water-survey.parquet"), 3);
        plotParquet = ParquetCopy.write(spark, new CsvTableReader().read(
                SparkParityTest.REFERENCE.resolve("plot-panel.csv")), folder.resolve("plot-panel.parquet"), 3);
    }

    @AfterAll
    static void stop() {
        spark.stop();
    }

    @ParameterizedTest(name = "{0} partitions")
    @ValueSource(ints = {1, 3, 8})
    void weightedPlanEqualsTheEngine(int partitions) throws IOException {
        SparkParityTest.Comparison c = SparkParityTest.compare(weightsPlan(), SparkParityTest.REFERENCE,
                waterParquet, partitions);
        Map<VarianceRoute, Long> routes = c.spark().routes();
        assertTrue(routes.getOrDefault(VarianceRoute.FOURTH_MOMENTS, 0L) > 0
                && routes.getOrDefault(VarianceRoute.CLUSTER_CELLS, 0L) > 0, "HC0 and HC1 from the weighted fourth "
                + "moments, district clusters from the weighted cells: " + routes);
        assertTrue(SparkRowPassTest.served(c.spark()) > 0, "weighted HC2 and HC3 from the row passes");
        assertTrue(c.spark().refitByQr() > 0, "QR refits from the partitions' weighted factors");
        SparkParityTest.report("water-survey-" + partitions, c.worst());
        if (partitions == 3) {
            AgainstR r = againstR(c, "water-survey-expected.csv", List.of("outcome", "garden", "controls", "rows",
                    "effects", "weights", "errors"), "R lm(weights = ) and sandwich");
            assertTrue(r.compared() > 700, r.compared() + " specifications compared with R");
        }
    }

    @ParameterizedTest(name = "{0} partitions")
    @ValueSource(ints = {1, 3, 8})
    void multiwayPlanEqualsTheEngine(int partitions) throws IOException {
        SparkParityTest.Comparison c = SparkParityTest.compare(Files.readString(SparkParityTest.REFERENCE.resolve(
                "plot-panel-plan.json")), SparkParityTest.REFERENCE, plotParquet, partitions);
        long cells = c.spark().routes().getOrDefault(VarianceRoute.CLUSTER_CELLS, 0L);
        long scorePasses = 0;
        for (int v = 0; v < c.spark().models().variantCount(); v++) {
            scorePasses += c.spark().models().variant(c.spark().models().variantKey(v)).clusterScorePasses();
        }
        assertTrue(cells > 100 && scorePasses > 0, cells + " multi-way variances from the partitions' cells, "
                + scorePasses + " clusterings' scores summed over the partitions' rows");
        SparkParityTest.report("plot-panel-" + partitions, c.worst());
        if (partitions != 3) {
            return;
        }
        AgainstR r = againstR(c, "plot-panel-expected.csv", List.of("outcome", "rain", "controls", "rows", "effects",
                "errors"), "R lm() and sandwich::vcovCL");
        assertTrue(r.compared() > 200 && r.notPositive() == 10, r.compared() + " specifications compared with R, "
                + r.notPositive() + " not positive");
    }

    @Test
    void aNegativeWeightIsRefusedAtItsPath() throws IOException {
        Table table = new CsvTableReader().read(SparkParityTest.REFERENCE.resolve("water-survey.csv"));
        List<Column> columns = new ArrayList<>();
        for (Column col : table.columns()) {
            if (col.name().equals("weight")) {
                double[] w = ((NumericColumn) col).values().clone();
                w[10] = -1;
                col = new NumericColumn("weight", w);
            }
            columns.add(col);
        }
        Path parquet = ParquetCopy.write(spark, new Table(table.source(), columns), folder.resolve("negative.parquet"),
                2);
        String planText = weightsPlan();
        SparkData data = new SparkData(spark, parquet.toString(), 0, planText, SparkParityTest.REFERENCE
                .toAbsolutePath());
        org.forkscape.plan.Plan plan = new PlanReader(false).read(planText, SparkParityTest.REFERENCE.toAbsolutePath());
        Table shape = data.table(plan);
        InputException e = assertThrows(InputException.class, () -> data.variants(plan, shape));
        assertEquals("decisions[5].alternatives[1].column", e.where());
        assertTrue(e.problem().startsWith("the weights in \"weight\" must be finite and not negative; 1 row of"),
                e.problem());
    }

    private static String weightsPlan() throws IOException {
        return Files.readString(SparkParityTest.REFERENCE.resolve("water-survey-plan.json"));
    }

    record AgainstR(int compared, int notPositive) {
    }

    /**
     * Every specification of an R reference file, joined by its labels (the script's own loops number them):
     * rows, and where R fitted it estimate, standard error and df; where R's multi-way variance is not positive,
     * the same status. The largest differences are reported.
     */
    static AgainstR againstR(SparkParityTest.Comparison c, String expectedFile, List<String> labels,
            String source) throws IOException {
        ResultTable r = c.spark().results();
        Map<String, Integer> slots = ReferenceFiles.slotsByLabels(c.spark());
        int compared = 0;
        int notPositive = 0;
        double[] worst = new double[2];
        for (Map<String, String> row : ReferenceFiles.rows(expectedFile)) {
            String key = String.join(" | ", labels.stream().map(row::get).toList());
            int slot = slots.get(key);
            String where = source + ", " + expectedFile + ", " + key;
            String status = row.get("status");
            if (!row.get("n_obs").isEmpty()) {
                assertEquals(Integer.parseInt(row.get("n_obs")), r.nObs(slot), where + " n_obs");
            }
            if (status.startsWith("undefined")) {
                assertTrue(r.status(slot).startsWith(status), where + ": " + r.status(slot));
                notPositive++;
            }
            if (!status.equals("ok")) {
                continue;
            }
            worst[0] = Math.max(worst[0], SparkParityTest.assertClose(Double.parseDouble(row.get("estimate")),
                    r.estimate(slot), SparkParityTest.R_RELATIVE, where + " estimate"));
            worst[1] = Math.max(worst[1], SparkParityTest.assertClose(Double.parseDouble(row.get("std_error")),
                    r.stdError(slot), SparkParityTest.R_RELATIVE, where + " std_error"));
            assertEquals(Double.parseDouble(row.get("df")), r.df(slot), 0.0, where + " df");
            compared++;
        }
        reportAgainstR(expectedFile.replace("-expected.csv", "-3"), worst);
        return new AgainstR(compared, notPositive);
    }

    /** The largest relative differences from R's values, in {@code target/spark-reports/}. */
    private static void reportAgainstR(String name, double[] worst) throws IOException {
        Path dir = Path.of("target/spark-reports");
        Files.createDirectories(dir);
        Files.writeString(dir.resolve("r-" + name + ".txt"), String.format(java.util.Locale.ROOT, "largest relative "
                + "difference, Spark local mode against R: estimate %.3g, std_error %.3g%n", worst[0], worst[1]));
    }
}
