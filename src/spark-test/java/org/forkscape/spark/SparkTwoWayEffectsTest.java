package org.forkscape.spark;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import org.apache.spark.sql.SparkSession;
import org.forkscape.InputException;
import org.forkscape.data.CsvTableReader;
import org.forkscape.data.Table;
import org.forkscape.fit.DataVariant;
import org.forkscape.plan.Plan;
import org.forkscape.plan.PlanReader;
import org.forkscape.run.RunResult;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.ValueSource;

/**
 * Two absorbed columns (pupil and term) on Spark local mode: the two-way reference plans from Parquet copies
 * at 1, 3 and 8 partitions against the single-machine engine on the CSV within 1e-10 relative
 * ({@link SparkParityTest#compare}: estimates, standard errors, p-values; statuses, rows, coefficients and df
 * exact), and at 3 partitions against R's {@code lm()} with factor() dummies and sandwich ({@code
 * school-panel-expected.csv} from {@code src/test/r/two-way-effects-reference.R}, {@code
 * school-panel-weighted-expected.csv} from {@code two-way-weights-reference.R}; the tolerance of
 * {@link SparkParityTest#R_RELATIVE}). {@code school-panel-plan.json}: two connected components of the
 * pupil-term graph, a singleton pupil, controls constant within pupils and within terms (QR refits from the
 * partitions' factors of their within values), a control with missing cells (several row sets per variant),
 * classical, HC0, HC1, pupil and pupil x term clusters; {@code school-panel-weighted-plan.json}: the same with
 * analytic weights holding zeros and missing cells. Asserted taken: the rows partitioned by pupil, every
 * two-column variant's row sets solved by the partitions' exact route, HC0 and HC1 from the row passes over
 * their within values, cluster errors from the clusters' scores summed over them. And the refusals at their
 * JSON paths.
 */
class SparkTwoWayEffectsTest {
    static SparkSession spark;
    @TempDir
    static Path folder;
    static Path panelParquet;
    static Path weightedParquet;
    static Path leverageParquet;

    @BeforeAll
    static void start() {
        ((ch.qos.logback.classic.Logger) org.slf4j.LoggerFactory.getLogger(org.slf4j.Logger.ROOT_LOGGER_NAME))
                .setLevel(ch.qos.logback.classic.Level.WARN);
        spark = SparkSession.builder().master("local[2]").appName("forkscape-spark-test")
                .config("spark.ui.enabled", "false").config("spark.sql.shuffle.partitions", "4").getOrCreate();
        SparkParityTest.spark = spark;
        panelParquet = ParquetCopy.write(spark, new CsvTableReader().read(
                SparkParityTest.REFERENCE.resolve("school-panel.csv")), folder.resolve("school-panel.parquet"), 3);
        weightedParquet = ParquetCopy.write(spark, new CsvTableReader().read(SparkParityTest.REFERENCE.resolve(
                "school-panel-weighted.csv")), folder.resolve("school-panel-weighted.parquet"), 3);
        leverageParquet = ParquetCopy.write(spark, new CsvTableReader().read(SparkParityTest.REFERENCE.resolve(
                "school-panel-leverage.csv")), folder.resolve("school-panel-leverage.parquet"), 3);
    }

    @AfterAll
    static void stop() {
        spark.stop();
    }

    @ParameterizedTest(name = "{0} partitions")
    @ValueSource(ints = {1, 3, 8})
    void twoWayPlanEqualsTheEngineAndR(int partitions) throws IOException {
        SparkParityTest.Comparison c = SparkParityTest.compare(plan("school-panel-plan.json"),
                SparkParityTest.REFERENCE, panelParquet, partitions);
        assertRoutes(c.spark());
        assertTrue(c.spark().refitByQr() > 0, "controls the effects explain, dropped by QR refits from the "
                + "partitions' factors");
        SparkParityTest.report("school-panel-" + partitions, c.worst());
        if (partitions == 3) {
            SparkWeightsAndClustersTest.AgainstR r = SparkWeightsAndClustersTest.againstR(c,
                    "school-panel-expected.csv", List.of("outcome", "tutoring", "controls", "rows", "effects",
                            "errors"), "R lm() with factor() dummies and sandwich");
            assertEquals(640, r.compared(), "specifications compared with R");
        }
    }

    @ParameterizedTest(name = "{0} partitions")
    @ValueSource(ints = {1, 3, 8})
    void weightedTwoWayPlanEqualsTheEngineAndR(int partitions) throws IOException {
        SparkParityTest.Comparison c = SparkParityTest.compare(plan("school-panel-weighted-plan.json"),
                SparkParityTest.REFERENCE, weightedParquet, partitions);
        assertRoutes(c.spark());
        SparkParityTest.report("school-panel-weighted-" + partitions, c.worst());
        if (partitions == 3) {
            SparkWeightsAndClustersTest.AgainstR r = SparkWeightsAndClustersTest.againstR(c,
                    "school-panel-weighted-expected.csv", List.of("outcome", "tutoring", "controls", "effects",
                            "weights", "errors"), "R lm(weights = ) with factor() dummies and sandwich");
            assertEquals(320, r.compared(), "specifications compared with R");
        }
    }

    /**
     * HC2 and HC3 ({@code school-panel-leverage-plan.json}: unweighted, positive design weights, survey weights
     * with zeros and missing cells; every pupil or only those seen twice, so singleton pupils whose leverage is
     * 1): the dummies' part of each row's leverage from the driver's inverse of the Schur complement, against
     * one machine and R's {@code hatvalues} with {@code sandwich::vcovHC} ({@code school-panel-leverage-expected.csv}
     * from {@code two-way-leverage-reference.R}), R's leverage-1 statuses among them.
     */
    @ParameterizedTest(name = "{0} partitions")
    @ValueSource(ints = {1, 3, 8})
    void leveragePlanEqualsTheEngineAndR(int partitions) throws IOException {
        SparkParityTest.Comparison c = SparkParityTest.compare(plan("school-panel-leverage-plan.json"),
                SparkParityTest.REFERENCE, leverageParquet, partitions);
        assertTrue(SparkRowPassTest.served(c.spark()) > 0, "HC2 and HC3 from the row passes");
        long crossed = 0;
        for (int v = 0; v < c.spark().models().variantCount(); v++) {
            crossed += c.spark().models().variant(c.spark().models().variantKey(v)).crossedSolves();
        }
        assertTrue(crossed > 0, "sets of usable rows beside pupil and term solved by the partitions");
        SparkParityTest.report("school-panel-leverage-" + partitions, c.worst());
        if (partitions == 3) {
            SparkWeightsAndClustersTest.AgainstR r = SparkWeightsAndClustersTest.againstR(c,
                    "school-panel-leverage-expected.csv", List.of("outcome", "tutoring", "controls", "rows",
                            "effects", "weights", "errors"), "R lm() with factor() dummies, hatvalues and "
                            + "sandwich::vcovHC");
            assertTrue(r.compared() > 0 && r.notPositive() > 0, r.compared() + " compared with R, "
                    + r.notPositive() + " with R's leverage-1 status");
        }
    }

    @Test
    void nullDrawsBesideTwoColumnsAreRefusedAtTheirPath() throws IOException {
        String text = plan("school-panel-plan.json").replace("\"data\": \"school-panel.csv\",",
                "\"data\": \"school-panel.csv\", \"nullDraws\": 20,");
        assertTrue(text.contains("\"nullDraws\": 20"), "the plan edit took");
        InputException e = refusal(text, panelParquet);
        assertEquals("nullDraws", e.where());
        assertTrue(e.problem().startsWith("null draws beside two absorbed columns (decisions[4].alternatives[3]"
                + ".columns) are not made on Spark"), e.problem());
    }

    @Test
    void threeColumnsAreRefusedAtTheirPath() throws IOException {
        String text = plan("school-panel-plan.json").replace("[\"pupil\", \"term\"]", "[\"pupil\", \"term\", \"school\"]");
        InputException e = refusal(text, panelParquet);
        assertEquals("decisions[4].alternatives[3].columns", e.where());
        assertTrue(e.problem().startsWith("three or more absorbed columns"), e.problem());
    }

    /** The smaller column's level count bounds the driver's solve: above it, both counts and the way out. */
    @Test
    void aSmallerColumnWithTooManyLevelsIsRefusedAtItsPath() throws IOException {
        Plan plan = new PlanReader(false).read(plan("school-panel-plan.json"), SparkParityTest.REFERENCE
                .toAbsolutePath());
        InputException e = assertThrows(InputException.class, () -> CrossedPartitioning.column(plan,
                java.util.Map.of("pupil", 5000, "term", 2001)));
        assertEquals("decisions[4].alternatives[3].columns", e.where());
        assertTrue(e.problem().startsWith("\"pupil\" has 5,000 levels and \"term\" 2,001; beside two absorbed "
                + "columns the Spark runner solves for the effects of the one with fewer levels on the driver, at "
                + "most 2,000 of them; run this plan on one machine"), e.problem());
        assertEquals("pupil", CrossedPartitioning.column(plan, java.util.Map.of("pupil", 5000, "term", 2000)));
    }

    private static void assertRoutes(RunResult run) {
        long crossed = 0;
        long served = 0;
        long scorePasses = 0;
        for (int v = 0; v < run.models().variantCount(); v++) {
            DataVariant variant = run.models().variant(run.models().variantKey(v));
            if (variant.crossedSolves() > 0) {
                crossed++;
                served += variant.rowPassesServed();
                scorePasses += variant.clusterScorePasses();
            }
        }
        assertTrue(crossed > 0, "variants beside pupil and term solved by the partitions");
        assertTrue(served > 0, "HC0 and HC1 from the row passes over the partitions' within values");
        assertTrue(scorePasses > 0, "cluster errors from the clusters' scores over the partitions' within values");
    }

    private static InputException refusal(String text, Path parquet) {
        Plan plan = new PlanReader(false).read(text, SparkParityTest.REFERENCE.toAbsolutePath());
        SparkData data = new SparkData(spark, parquet.toString(), 0, text, SparkParityTest.REFERENCE.toAbsolutePath());
        Table shape = data.table(plan);
        return assertThrows(InputException.class, () -> data.variants(plan, shape));
    }

    private static String plan(String name) throws IOException {
        return Files.readString(SparkParityTest.REFERENCE.resolve(name));
    }
}
