package org.forkscape.fit;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.List;
import java.util.Map;
import java.util.concurrent.atomic.AtomicBoolean;
import org.forkscape.data.CsvTableReader;
import org.forkscape.data.Table;
import org.forkscape.plan.Plan;
import org.forkscape.plan.PlanReader;
import org.forkscape.reference.ReferenceFiles;
import org.forkscape.run.MultiverseRunner;
import org.forkscape.run.ResultTable;
import org.forkscape.run.RunProgress;
import org.forkscape.run.RunResult;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.ValueSource;

/**
 * Analytic weights and multi-way clustering of variants held in parts, without Spark, each reference plan with
 * its variants built by {@link VariantByParts} from 1, 3 and 8 slices of the table, against the engine
 * building them from the whole table: within 1e-10 relative (the parts' sums are grouped differently; the
 * tolerance of the other tests by parts), statuses, rows, coefficients and df exact, and the routes that make
 * the numbers by parts asserted taken. The weights reference plan ({@code water-survey-plan.json}, whose R
 * values {@code src/test/r/weights-reference.R} writes and {@code reference.RWeightsReferenceTest} holds the
 * engine to: zero weights, a district whose weights are all zero, missing weights, a control constant within
 * districts so QR refits beside the absorbed district, classical, HC0 to HC3, district and district x wave
 * clusters): weighted cells, weighted fourth moments, weighted per-cluster cells of the columns and their
 * intersection, weighted row passes, weighted QR refits. The multi-way reference plan
 * ({@code plot-panel-plan.json}, R values from {@code src/test/r/multiway-cluster-reference.R},
 * {@code reference.RMultiwayClusterReferenceTest}: two- and three-way clusters over plots, seasons and
 * observers, plot effects absorbed or not, variances that are not positive): every component's cells,
 * intersections among them, summed by parts with the same clusters whatever part a combination's rows are in.
 */
class WeightsAndClustersByPartsTest {
    static final double RELATIVE = 1e-10;

    @ParameterizedTest(name = "{0} parts")
    @ValueSource(ints = {1, 3, 8})
    void weightedVariantsFromPartsFitAsTheWholeTable(int slices) {
        Plan plan = new PlanReader(false).read(ReferenceFiles.path("water-survey-plan.json"));
        RunResult parts = compare(plan, slices);
        long weighted = 0;
        long served = 0;
        for (int v = 0; v < parts.models().variantCount(); v++) {
            DataVariant variant = parts.models().variant(parts.models().variantKey(v));
            if (variant.weighted) {
                weighted++;
                assertTrue(variant.cellWeight != null, "a weighted variant by parts keeps its cells' weight totals");
                served += variant.rowPassesServed();
                if (!variant.absorbs) {
                    assertTrue(variant.useFourthMoments && variant.groupTensors()[0].length == 5,
                            "weighted fourth moments (w^2 at every order) from the parts");
                }
                for (String key : List.of("district", "district" + ClusterComponents.JOIN + "wave")) {
                    assertTrue(variant.usesClusterMoments(key)
                            && variant.clusterMoments(key).cells().stream().allMatch(c -> c.weight > 0),
                            "weighted per-cluster cells of " + key + " from the parts");
                }
            }
        }
        assertEquals(parts.models().variantCount() / 2, weighted, "half the variants are weighted");
        assertTrue(served > 0, "weighted HC2 and HC3 from the row passes over the parts");
        assertTrue(parts.refitByQr() > 0, "the urban control beside district effects sends some to the QR refit");
    }

    @ParameterizedTest(name = "{0} parts")
    @ValueSource(ints = {1, 3, 8})
    void multiwayClustersFromPartsAsTheWholeTable(int slices) {
        Plan plan = new PlanReader(false).read(ReferenceFiles.path("plot-panel-plan.json"));
        RunResult parts = compare(plan, slices);
        String threeWay = String.join(ClusterComponents.JOIN, "plot", "season", "observer");
        long scorePasses = 0;
        for (int v = 0; v < parts.models().variantCount(); v++) {
            DataVariant variant = parts.models().variant(parts.models().variantKey(v));
            if (variant.rowCount() > 0) {
                assertTrue(variant.usesClusterMoments(threeWay), "the three-way intersection's cells from the parts");
            }
            scorePasses += variant.clusterScorePasses();
        }
        // most from the cells; where a component's cells could lose digits (the sample of four rows), the
        // clusters' scores summed over the parts' rows
        long cells = parts.routes().getOrDefault(VarianceRoute.CLUSTER_CELLS, 0L);
        long rowPasses = parts.routes().getOrDefault(VarianceRoute.ROW_PASS, 0L);
        assertTrue(cells > 10 * rowPasses && rowPasses > 0 && scorePasses >= rowPasses, cells + " from the cells, "
                + rowPasses + " with " + scorePasses + " passes for cluster scores over the parts");
        long notPositive = 0;
        for (int slot = 0; slot < parts.results().size(); slot++) {
            if (parts.results().status(slot).startsWith("undefined: the multi-way cluster variance")) {
                notPositive++;
            }
        }
        // the 10 of plot-panel-expected.csv, where R's multi-way variance is not positive
        assertEquals(10, notPositive, "specifications whose multi-way variance is not positive");
    }

    /**
     * One-way cluster errors whose cells could lose digits (in the sample of four rows) take the clusters'
     * scores summed over the parts' rows, as one machine takes its row pass.
     */
    @ParameterizedTest(name = "{0} parts")
    @ValueSource(ints = {1, 3, 8})
    void oneWayClustersWhoseCellsDeclineFromTheScoresOfTheParts(int slices) throws Exception {
        String text = java.nio.file.Files.readString(ReferenceFiles.path("plot-panel-plan.json")).replace(
                "[\"classical\", \"cluster:plot+season\", \"cluster:season+observer\", \"cluster:plot+season+observer\"]",
                "[\"cluster:plot\", \"cluster:season\", \"cluster:observer\"]");
        assertTrue(text.contains("\"cluster:observer\"]"), "the plan edit took");
        Plan plan = new PlanReader(false).read(text, ReferenceFiles.path("plot-panel-plan.json").getParent());
        RunResult parts = compare(plan, slices);
        long scorePasses = 0;
        for (int v = 0; v < parts.models().variantCount(); v++) {
            scorePasses += parts.models().variant(parts.models().variantKey(v)).clusterScorePasses();
        }
        assertTrue(scorePasses > 0 && parts.routes().getOrDefault(VarianceRoute.ROW_PASS, 0L) == scorePasses,
                scorePasses + " passes for cluster scores, routes " + parts.routes());
    }

    /** Every specification on parts against the whole table; returns the run on parts. */
    static RunResult compare(Plan plan, int slices) {
        Table table = new CsvTableReader().read(plan.dataFile());
        RunResult whole = new MultiverseRunner(2).run(plan, table, RunProgress.SILENT, new AtomicBoolean());
        VariantSource built = VariantByPartsTest.source(plan, table, slices);
        Map<VariantKey, DataVariant> kept = new java.util.concurrent.ConcurrentHashMap<>();
        VariantSource source = (key, pool) -> kept.computeIfAbsent(key, k -> built.variant(k, pool));
        RunResult parts = new MultiverseRunner(2).withVariants(source).run(plan, table, RunProgress.SILENT,
                new AtomicBoolean());
        ResultTable a = whole.results();
        ResultTable b = parts.results();
        assertEquals(a.size(), b.size());
        int fitted = 0;
        for (int slot = 0; slot < a.size(); slot++) {
            String where = plan.dataFile().getFileName() + ", specification " + a.specNumber(slot);
            assertEquals(a.status(slot), b.status(slot), where);
            assertEquals(a.nObs(slot), b.nObs(slot), where);
            assertEquals(a.nParams(slot), b.nParams(slot), where);
            assertEquals(a.df(slot), b.df(slot), 0.0, where);
            if (a.fitted(slot)) {
                fitted++;
                close(a.estimate(slot), b.estimate(slot), where + " estimate");
                close(a.stdError(slot), b.stdError(slot), where + " std_error");
                close(a.pValue(slot), b.pValue(slot), where + " p_value");
                close(a.r2(slot), b.r2(slot), where + " r2");
            }
        }
        assertTrue(fitted > a.size() / 2, fitted + " fitted");
        for (int v = 0; v < parts.models().variantCount(); v++) {
            assertFalse(parts.models().variant(parts.models().variantKey(v)).holdsRows());
        }
        return parts;
    }

    private static void close(double expected, double actual, String what) {
        if (expected == actual || Double.isNaN(expected) && Double.isNaN(actual)) {
            return;
        }
        double relative = Math.abs(actual - expected) / Math.abs(expected);
        assertTrue(relative <= RELATIVE, what + ": " + actual + " against " + expected + ", relative " + relative);
    }
}
