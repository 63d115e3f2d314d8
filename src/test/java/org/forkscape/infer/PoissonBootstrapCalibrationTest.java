package org.forkscape.infer;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Path;
import java.util.Arrays;
import java.util.concurrent.atomic.AtomicBoolean;
import org.apache.commons.math3.distribution.BinomialDistribution;
import org.forkscape.data.Table;
import org.forkscape.fit.BootstrapDesign;
import org.forkscape.fit.PartsOfTable;
import org.forkscape.plan.Plan;
import org.forkscape.plan.PlanReader;
import org.forkscape.run.MultiverseRunner;
import org.forkscape.run.RunProgress;
import org.forkscape.run.RunResult;
import org.junit.jupiter.api.Test;

/**
 * Calibration of the Poisson bootstrap that the Spark runner's null draws use, tested the way
 * {@link NullDrawsCalibrationTest} and {@link NullDrawsClusteredCalibrationTest} test the single-machine
 * multinomial bootstrap, on the same simulated data sets and plans, through the same code as on Spark (the
 * variants and every draw's statistics summed by parts, here 3 slices of the table in memory; that this equals
 * Spark's partitions is {@code spark.SparkNullDrawsTest}'s part). On pure noise each of the four tests (median,
 * share significant, Stouffer, and the min-p adjusted p of the best specification) must reject at 5% within the
 * central 99.9% of Binomial(N, 0.05) (Commons Math) over N data sets, at the
 * single-machine tests' sizes: 400 data sets of 80 rows with 199 draws (range 7 to 36), and 200 clustered data sets
 * with 99 draws (range 2 to 21); with a planted effect at least 39 of 40 rejections. Seeds are fixed; the counts
 * of each run are written to {@code target/calibration-reports/}; when this test was written the rows rejected
 * 27, 22, 26 and 14 times of 400 (the multinomial bootstrap: 27, 20, 25 and 14) and the clusters 15, 5, 9 and 8
 * times of 200 (the multinomial: 18, 4, 9 and 9).
 */
class PoissonBootstrapCalibrationTest {
    private static final double LEVEL = 0.05;
    private static final String[] TESTS = {"median", "share significant", "Stouffer", "best specification (min-p)"};

    /** The single-machine calibration's plans, so that the two bootstraps are judged on the same curves. */
    private static final String ROWS_PLAN = NullDrawsCalibrationTest.PLAN;
    private static final String CLUSTERED_PLAN = NullDrawsClusteredCalibrationTest.PLAN;
    /** Logit of the rows plan's binary outcome, every subset of its controls, classical and HC1 errors. */
    private static final String LOGIT_PLAN = """
            {"data": "simulated.csv",
             "decisions": [
               {"name": "outcome", "kind": "outcome", "alternatives": [{"label": "passed", "column": "pass"}]},
               {"name": "key", "kind": "predictor", "alternatives": [{"label": "x", "column": "x"}]},
               {"name": "controls", "kind": "controls", "optional": ["a", "b"]},
               {"name": "model", "kind": "model", "alternatives": ["logit"]},
               {"name": "errors", "kind": "errors", "alternatives": ["classical", "HC1"]}
             ]}
            """;

    @Test
    void rowDrawsOnPureNoiseRejectAboutFivePercent() {
        int datasets = 400;
        int[] rejected = new int[4];
        for (int k = 0; k < datasets; k++) {
            long seed = 1_000 + k;
            count(rejected, ROWS_PLAN, Scenarios.table(80, 0, seed, 8), 199, seed, null);
        }
        assertWithinRange("rows", rejected, datasets);
    }

    @Test
    void clusterDrawsOnClusteredPureNoiseRejectAboutFivePercent() {
        int datasets = 200;
        int[] rejected = new int[4];
        for (int k = 0; k < datasets; k++) {
            long seed = 70_000 + k;
            count(rejected, CLUSTERED_PLAN, Scenarios.clusteredTable(30, 20, 0.3, seed), 99, seed, "g");
        }
        assertWithinRange("clusters", rejected, datasets);
    }

    /**
     * Logit on pure noise: the 0/1 outcome {@code pass} (y above 0, y independent of x), each specification
     * refit in every draw by the single-machine estimator with its passes over the draw's parts
     * ({@code fit.GlmFitsByParts}), started from the observed fit, and its draw estimate centred on the observed
     * one as for least squares. 200 data sets of 80 rows with 99 draws: the central 99.9% of Binomial(200, 0.05)
     * is 2 to 21.
     */
    @Test
    void logitDrawsOnPureNoiseRejectAboutFivePercent() {
        int datasets = 200;
        int[] rejected = new int[4];
        for (int k = 0; k < datasets; k++) {
            long seed = 90_000 + k;
            count(rejected, LOGIT_PLAN, Scenarios.table(80, 0, seed, 8), 99, seed, null);
        }
        assertWithinRange("logit", rejected, datasets);
    }

    @Test
    void withAPlantedEffectEveryTestRejectsNearlyAlways() {
        int[] rejected = new int[4];
        for (int k = 0; k < 40; k++) {
            long seed = 50_000 + k;
            count(rejected, ROWS_PLAN, Scenarios.table(80, 0.6, seed, 8), 99, seed, null);
        }
        for (int t = 0; t < 4; t++) {
            assertTrue(rejected[t] >= 39, TESTS[t] + " rejected only " + rejected[t] + " of 40");
        }
    }

    /** Adds each test's rejection at 5% on one data set, its draws made by parts. */
    private static void count(int[] rejected, String planJson, Table table, int draws, long seed,
            String expectedUnit) {
        Plan plan = new PlanReader(false).read(planJson, Path.of(".")).withNull(draws, "bootstrap", null, seed);
        NullDrawSettings settings = NullDrawSettings.of(plan);
        assertEquals(expectedUnit, settings.clusterColumn(), "the unit the draws resample by default");
        RunResult run = new MultiverseRunner(1).withVariants(PartsOfTable.source(plan, table,
                PartsOfTable.rowKeys("simulated.parquet", table.rowCount()), 3)).run(plan, table, RunProgress.SILENT,
                new AtomicBoolean());
        // the route under test: variants without rows, draws made by their parts
        assertFalse(run.models().variant(run.models().variantKey(0)).holdsRows());
        assertTrue(run.models().bootstrap(new BootstrapDesign(seed, settings.clusterColumn())) != null);
        NullDrawResult r = NullDraws.run(RunVariants.of(run), settings, 2, RunProgress.SILENT, null);
        double[] p = {r.pMedian(), r.pShareSignificant(), r.pStouffer(), r.minPAdjusted(r.observed().minP())};
        for (int t = 0; t < 4; t++) {
            if (p[t] <= LEVEL) {
                rejected[t]++;
            }
        }
    }

    private static void assertWithinRange(String unit, int[] rejected, int datasets) {
        report(unit, rejected, datasets);
        BinomialDistribution exact = new BinomialDistribution(null, datasets, LEVEL);
        int low = exact.inverseCumulativeProbability(0.0005);
        int high = exact.inverseCumulativeProbability(0.9995);
        for (int t = 0; t < 4; t++) {
            assertTrue(rejected[t] >= low && rejected[t] <= high, TESTS[t] + " rejected " + rejected[t] + " of "
                    + datasets + "; expected " + low + " to " + high + " (all: " + Arrays.toString(rejected) + ")");
        }
    }

    /** The rejections, for the record, in {@code target/calibration-reports/}. */
    private static void report(String unit, int[] rejected, int datasets) {
        try {
            Path dir = Path.of("target/calibration-reports");
            java.nio.file.Files.createDirectories(dir);
            java.nio.file.Files.writeString(dir.resolve("poisson-bootstrap-" + unit + ".txt"), "rejections at 5% of "
                    + datasets + " pure-noise data sets (median, share significant, Stouffer, min-p): "
                    + Arrays.toString(rejected) + System.lineSeparator());
        } catch (java.io.IOException e) {
            throw new java.io.UncheckedIOException(e);
        }
    }
}
