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
 * two-column variant's row sets solved by the partitions' exact route, HC0 and HC1 from the fourth moments and
 * cluster errors from the clusters' cells the partitions summed from their within values (and, with the routes
 * without rows off, from the row passes over those values and the clusters' scores summed over them). And the
 * refusals at their JSON paths.
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
        org.forkscape.fit.TwoWayRoutes.assertWithinPass(c.spark());
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

    /** The same plans with the routes without rows off: every robust error from the row passes on Spark. */
    @Test
    void twoWayPlansByRowPassesEqualTheEngine() throws IOException {
        for (String[] planAndData : List.of(new String[] {"school-panel-plan.json", panelParquet.toString()},
                new String[] {"school-panel-weighted-plan.json", weightedParquet.toString()})) {
            SparkParityTest.Comparison c = SparkParityTest.compare(plan(planAndData[0]), SparkParityTest.REFERENCE,
                    Path.of(planAndData[1]), 3, false);
            org.forkscape.fit.TwoWayRoutes.assertRowPasses(c.spark());
            SparkParityTest.report("school-panel-row-passes-" + planAndData[0].replace("-plan.json", ""),
                    c.worst());
        }
    }

    @ParameterizedTest(name = "{0} partitions")
    @ValueSource(ints = {1, 3, 8})
    void weightedTwoWayPlanEqualsTheEngineAndR(int partitions) throws IOException {
        SparkParityTest.Comparison c = SparkParityTest.compare(plan("school-panel-weighted-plan.json"),
                SparkParityTest.REFERENCE, weightedParquet, partitions);
        org.forkscape.fit.TwoWayRoutes.assertWithinPass(c.spark());
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

    /**
     * Bootstrap null draws beside pupil and term (classical, HC1, pupil clusters, pupil and term clusters, and term
     * and school clusters, whose intersection spans partitions and takes its cells keyed over the whole table), of
     * whole pupils at 3 and 8 partitions and of single rows at 3: each draw's sets of usable rows solved again
     * over the draw's partitions, HC1 and cluster errors from the fourth moments and clusters' cells summed from
     * each draw's within values (each drawn copy of a pupil a new cluster; the pupil x term intersection from the
     * fourth moments where every copy is a cluster of its own, from its cells where a drawn row's copies share
     * it), against one machine's fit of the same rows repeated by the same Poisson counts
     * ({@code PartsOfTable.oneMachine}, demeaned by alternating projections) within 1e-10 relative, df exact.
     */
    @Test
    void drawsBesideTwoColumnsAsOneMachineWithTheSameCounts() throws IOException {
        Path parquet = ParquetCopy.write(spark, new CsvTableReader().read(SparkParityTest.REFERENCE.resolve(
                "school-panel.csv")), folder.resolve("school-panel-draws.parquet"), 4);
        Table readBack = org.forkscape.data.DataFiles.read(parquet);
        List<Path> files;
        try (java.util.stream.Stream<Path> list = Files.list(parquet)) {
            files = list.filter(f -> f.getFileName().toString().endsWith(".parquet")).sorted().toList();
        }
        long[] rowKeys = new long[readBack.rowCount()];
        int at = 0;
        for (Path f : files) {
            long name = org.forkscape.fit.PoissonCounts.textHash(f.getFileName().toString());
            int rows = org.forkscape.data.DataFiles.read(f).rowCount();
            for (int i = 0; i < rows; i++) {
                rowKeys[at++] = org.forkscape.fit.PoissonCounts.rowKey(name, i);
            }
        }
        double[] pupils = drawsAsOneMachine(parquet, readBack, rowKeys, "pupil", new int[] {3, 8});
        // single rows: a drawn row's copies share its pupil x term cluster, whose cells the draws sum
        double[] rows = drawsAsOneMachine(parquet, readBack, rowKeys, "rows", new int[] {3});
        SparkParityTest.report("school-panel-draws", new double[] {Math.max(pupils[0], rows[0]),
                Math.max(pupils[1], rows[1]), Double.NaN});
    }

    /** Every draw fit beside pupil and term at each partitioning against one machine's of the same counts. */
    private static double[] drawsAsOneMachine(Path parquet, Table readBack, long[] rowKeys, String nullCluster,
            int[] partitionings) throws IOException {
        String text = plan("school-panel-plan.json").replace("\"data\": \"school-panel.csv\",",
                "\"data\": \"school-panel.csv\", \"nullDraws\": 4, \"seed\": 43, \"nullCluster\": \"" + nullCluster + "\",")
                .replace("[\"classical\", \"HC0\", \"HC1\", \"cluster:pupil\", \"cluster:pupil+term\"]",
                        "[\"classical\", \"HC1\", \"cluster:pupil\", \"cluster:pupil+term\", \"cluster:term+school\"]");
        assertTrue(text.contains("\"nullCluster\": \"" + nullCluster + "\"") && text.contains("\"cluster:term+school\"]"),
                "the plan edits took");
        Plan plan = new PlanReader(false).read(text, SparkParityTest.REFERENCE.toAbsolutePath());
        org.forkscape.fit.BootstrapDesign design = new org.forkscape.fit.BootstrapDesign(plan.seed(),
                nullCluster.equals("rows") ? null : nullCluster);
        RunResult inMemory = new org.forkscape.run.MultiverseRunner(1).run(plan, readBack,
                org.forkscape.run.RunProgress.SILENT, new java.util.concurrent.atomic.AtomicBoolean());
        double[] worst = new double[2];
        for (int partitions : partitionings) {
            RunResult run = SparkParityTest.sparkRun(text, SparkParityTest.REFERENCE, parquet, partitions);
            org.forkscape.infer.RunVariants indexed = org.forkscape.infer.RunVariants.of(run);
            org.forkscape.fit.BootstrapByParts draws = run.models().bootstrap(design);
            org.forkscape.fit.SpecificationFitter fitter = new org.forkscape.fit.SpecificationFitter()
                    .deferringRowPasses();
            int compared = 0;
            long solves = 0;
            long cells = 0;
            for (int v = 0; v < indexed.variantCount(); v++) {
                int[] specs = indexed.specificationsOf(v);
                DataVariant observed = indexed.variant(v);
                if (specs.length == 0 || observed.crossedSolves() == 0) {
                    continue;
                }
                org.forkscape.fit.VariantKey key = run.models().variantKey(v);
                List<org.forkscape.fit.SpecificationModel> models = new java.util.ArrayList<>();
                for (int i : specs) {
                    models.add(indexed.model(i));
                }
                DataVariant[] inDraw = draws.draws(key, observed, 0, 4);
                for (int d = 0; d < inDraw.length; d++) {
                    org.forkscape.fit.DrawFit[] one = org.forkscape.fit.PartsOfTable.oneMachine(inMemory.models()
                            .variant(key), 1, models, readBack, rowKeys, design, d);
                    org.forkscape.fit.KeyFit[] fits = org.forkscape.fit.RowPassesByParts.fitEach(fitter, inDraw[d],
                            models, () -> { });
                    solves += inDraw[d].crossedSolves();
                    cells += inDraw[d].partsClusterCells();
                    for (int s = 0; s < specs.length; s++) {
                        String where = partitions + " partitions, variant " + v + ", draw " + d + ", specification "
                                + s;
                        boolean fitted = fits[s].ok() && fits[s].stdError() > 0;
                        assertEquals(one[s] != null && one[s].stdError() > 0, fitted, where + ": fitted");
                        if (!fitted) {
                            continue;
                        }
                        worst[0] = Math.max(worst[0], SparkParityTest.assertClose(one[s].estimate(),
                                fits[s].estimate(), SparkParityTest.RELATIVE, where + " estimate"));
                        worst[1] = Math.max(worst[1], SparkParityTest.assertClose(one[s].stdError(),
                                fits[s].stdError(), SparkParityTest.RELATIVE, where + " std_error"));
                        assertEquals(one[s].df(), fits[s].df(), 0.0, where + " df");
                        compared++;
                    }
                }
            }
            assertTrue(solves > 0, "each draw's sets solved again over the draw's partitions");
            assertTrue(cells > 0, "the drawn pupils' cells summed from each draw's within values");
            assertTrue(compared > 100, compared + " draw fits compared");
        }
        return worst;
    }

    @Test
    void logitBesideTwoColumnsIsRefusedAtItsPath() throws IOException {
        String text = plan("school-panel-plan.json").replace("[\"classical\", \"HC0\", \"HC1\", \"cluster:pupil\", "
                + "\"cluster:pupil+term\"]}", "[\"classical\"]},\n    {\"name\": \"model\", \"kind\": \"model\", "
                + "\"alternatives\": [\"ols\", \"logit\"]}");
        assertTrue(text.contains("\"logit\""), "the plan edit took");
        InputException e = refusal(text, panelParquet);
        assertEquals("decisions[6].alternatives[1]", e.where());
        assertTrue(e.problem().startsWith("logit beside two absorbed columns (decisions[4].alternatives[3].columns) "
                + "is not fitted on Spark"), e.problem());
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
