package org.forkscape.fit;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.Map;
import java.util.concurrent.atomic.AtomicBoolean;
import org.forkscape.data.CategoricalColumn;
import org.forkscape.data.Column;
import org.forkscape.data.CsvTableReader;
import org.forkscape.data.NumericColumn;
import org.forkscape.data.Table;
import org.forkscape.plan.Plan;
import org.forkscape.plan.PlanReader;
import org.forkscape.reference.ReferenceFiles;
import org.forkscape.run.MultiverseRunner;
import org.forkscape.run.ResultTable;
import org.forkscape.run.RunProgress;
import org.forkscape.run.RunResult;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.ValueSource;

/**
 * Two absorbed columns (pupil and term) of variants held in parts, without Spark: the two-way reference plans'
 * variants built by {@link VariantByParts} from 1, 3 and 8 parts, each pupil's rows in one part (pupil code
 * modulo the parts, as the Spark runner's partitioning by the column with more levels puts them), against the
 * engine demeaning the whole table by alternating projections. The whole table's numbers are those
 * {@code reference.RTwoWayEffectsReferenceTest} and {@code reference.RTwoWayWeightsReferenceTest} hold to R's
 * {@code lm()} with factor() dummies and sandwich ({@code src/test/r/two-way-effects-reference.R},
 * {@code two-way-weights-reference.R}). Estimates, standard errors, p-values and R-squared within 1e-10
 * relative (the exact solve against iterations stopped at 1e-14, sums in another order); statuses, rows,
 * coefficients (K = levels of both less the components: the panel has two) and df exact. Asserted: the
 * two-column variants hold no rows and were demeaned by the parts' exact solve, HC0 and HC1 came from the fourth
 * moments and cluster errors from the clusters' cells that the parts summed from their within values (and, with
 * the routes without rows off, from row passes over those values and the clusters' scores summed over them), and
 * the controls the effects explain were dropped by QR refits from the parts' factors.
 */
class TwoWayEffectsByPartsTest {
    static final double RELATIVE = 1e-10;

    @ParameterizedTest(name = "{0} parts")
    @ValueSource(ints = {1, 3, 8})
    void schoolPanelFromPartsAsTheWholeTable(int slices) {
        RunResult parts = compare(plan("school-panel-plan.json"), slices, true);
        TwoWayRoutes.assertWithinPass(parts);
    }

    /**
     * The same with the routes without rows turned off (the runner's comparison switch): every robust error from
     * the row passes over the parts' within values, as where the structures do not pay or could lose digits.
     */
    @ParameterizedTest(name = "{0} parts")
    @ValueSource(ints = {1, 3, 8})
    void schoolPanelFromPartsByRowPasses(int slices) {
        TwoWayRoutes.assertRowPasses(compare(plan("school-panel-plan.json"), slices, false));
    }

    @ParameterizedTest(name = "{0} parts")
    @ValueSource(ints = {1, 3, 8})
    void weightedSchoolPanelFromPartsAsTheWholeTable(int slices) {
        RunResult parts = compare(plan("school-panel-weighted-plan.json"), slices, true);
        TwoWayRoutes.assertWithinPass(parts);
        TwoWayRoutes.assertRowPasses(compare(plan("school-panel-weighted-plan.json"), slices, false));
        long weighted = 0;
        for (int v = 0; v < parts.models().variantCount(); v++) {
            DataVariant variant = parts.models().variant(parts.models().variantKey(v));
            weighted += variant.absorbsSeveral && variant.weighted ? 1 : 0;
        }
        assertEquals(1, weighted, "one weighted variant beside pupil and term");
    }

    /**
     * HC2 and HC3 ({@code school-panel-leverage-plan.json}, whose R values {@code two-way-leverage-reference.R}
     * writes and {@code reference.RTwoWayLeverageReferenceTest} holds the engine to: unweighted, positive design
     * weights and survey weights with zeros and missing cells, singleton pupils whose leverage is 1): the
     * dummies' part of each row's leverage from the driver's inverse of the Schur complement, the rest from the
     * parts' within values, and the same leverage-1 statuses.
     */
    @ParameterizedTest(name = "{0} parts")
    @ValueSource(ints = {1, 3, 8})
    void leveragesFromPartsAsTheWholeTable(int slices) {
        RunResult parts = compare(plan("school-panel-leverage-plan.json"), slices, true);
        long served = 0;
        for (int v = 0; v < parts.models().variantCount(); v++) {
            DataVariant variant = parts.models().variant(parts.models().variantKey(v));
            if (variant.absorbsSeveral) {
                assertTrue(variant.crossedSolves() > 0, "demeaned by the parts' exact solve");
                served += variant.rowPassesServed();
            }
        }
        assertTrue(served > 0, "HC2 and HC3 beside pupil and term from the row passes over the parts");
        long leverageOne = 0;
        for (int slot = 0; slot < parts.results().size(); slot++) {
            leverageOne += parts.results().status(slot).startsWith("undefined: leverage 1") ? 1 : 0;
        }
        assertTrue(leverageOne > 0, "singleton pupils: leverage 1");
    }

    /**
     * Poisson bootstrap draws beside pupil and term, single rows, whole pupils and whole schools: each draw's
     * sets of usable rows solved again over the draw's parts (each row repeated by its count, its copies at its
     * levels), against one machine's fit of the same rows repeated by the same counts
     * ({@link PartsOfTable#oneMachine}, which demeans them by alternating projections and takes the row pass),
     * classical, HC0 and HC1 from the fourth moments and pupil clusters from the clusters' cells summed from each draw's
     * within values, each drawn copy of a resampled pupil (whole pupils, or whole schools, in which the pupils
     * are nested) a new cluster; and pupil and term clusters, whose pupil x term intersection (one row per
     * cluster) takes the clusters' cells in row draws, where a drawn row's copies share its cluster, and the
     * fourth moments where each copy is a new cluster; and term and school clusters, whose intersection, without
     * pupil, spans parts and takes the clusters' cells keyed over the whole table.
     */
    @ParameterizedTest(name = "{0} parts")
    @ValueSource(ints = {1, 3, 8})
    void drawsFromPartsAsOneMachineWithTheSameCounts(int slices) throws java.io.IOException {
        String text = java.nio.file.Files.readString(ReferenceFiles.path("school-panel-plan.json")).replace(
                "[\"classical\", \"HC0\", \"HC1\", \"cluster:pupil\", \"cluster:pupil+term\"]",
                "[\"classical\", \"HC0\", \"HC1\", \"cluster:pupil\", \"cluster:pupil+term\", \"cluster:term+school\"]");
        assertTrue(text.contains("\"cluster:pupil+term\", \"cluster:term+school\"]"), "the plan edit took");
        Plan plan = new PlanReader(false).read(text, ReferenceFiles.path("school-panel-plan.json").getParent());
        Table table = new CsvTableReader().read(plan.dataFile());
        long[] keys = PartsOfTable.rowKeys("school-panel.parquet", table.rowCount());
        for (BootstrapDesign design : List.of(new BootstrapDesign(71, null), new BootstrapDesign(72, "pupil"),
                new BootstrapDesign(73, "school"))) {
            VariantSource source = source(plan, table, "pupil", slices, keys);
            RunResult byParts = new MultiverseRunner(1).withVariants(source).run(plan, table, RunProgress.SILENT,
                    new AtomicBoolean());
            RunResult inMemory = new MultiverseRunner(1).run(plan, table, RunProgress.SILENT, new AtomicBoolean());
            org.forkscape.infer.RunVariants indexed = org.forkscape.infer.RunVariants.of(byParts);
            BootstrapByParts draws = byParts.models().bootstrap(design);
            SpecificationFitter fitter = new SpecificationFitter().deferringRowPasses().deferringRefits();
            int compared = 0;
            long solves = 0;
            long cells = 0;
            long fourth = 0;
            for (int v = 0; v < indexed.variantCount(); v++) {
                int[] specs = indexed.specificationsOf(v);
                VariantKey key = byParts.models().variantKey(v);
                if (specs.length == 0 || !indexed.variant(v).absorbsSeveral) {
                    continue;
                }
                List<SpecificationModel> models = new ArrayList<>();
                for (int i : specs) {
                    models.add(indexed.model(i));
                }
                DataVariant[] inDraw = draws.draws(key, indexed.variant(v), 0, 4);
                for (int d = 0; d < inDraw.length; d++) {
                    DrawFit[] expected = PartsOfTable.oneMachine(inMemory.models().variant(key), 1,
                            models, table, keys, design, d);
                    KeyFit[] fits = RowPassesByParts.fitEach(fitter, inDraw[d], models, () -> { });
                    solves += inDraw[d].crossedSolves();
                    cells += inDraw[d].partsClusterCells();
                    fourth += inDraw[d].partsFourthMoments();
                    for (int s = 0; s < specs.length; s++) {
                        String where = design + ", variant " + v + ", draw " + d + ", specification " + s;
                        if (expected[s] == null || !(expected[s].stdError() > 0)) {
                            assertTrue(!fits[s].ok() || !(fits[s].stdError() > 0), where + ": fitted by parts only");
                            continue;
                        }
                        assertTrue(fits[s].ok(), where + ": " + fits[s].status());
                        close(expected[s].estimate(), fits[s].estimate(), where + " estimate");
                        close(expected[s].stdError(), fits[s].stdError(), where + " std_error");
                        assertEquals(expected[s].df(), fits[s].df(), 0.0, where + " df");
                        compared++;
                    }
                }
            }
            assertTrue(solves > 0, "each draw's sets solved again over the draw's parts");
            assertTrue(cells > 0, design + ": the pupils' cells summed from each draw's within values");
            assertTrue(fourth > 0, design + ": the fourth moments summed from each draw's within values");
            assertTrue(compared > 100, compared + " draw fits beside pupil and term compared");
        }
    }

    /**
     * Term and school clusters: their intersection, without pupil (the column the parts are cut by), has clusters
     * in several parts, counted from the parts' keys of them, and its cells summed by the parts, keyed over the
     * whole table, as the one-way clusters' are: no pass of its own.
     */
    @ParameterizedTest(name = "{0} parts")
    @ValueSource(ints = {1, 3, 8})
    void anIntersectionWithoutThePartitioningColumnFromTheCells(int slices) throws java.io.IOException {
        String text = java.nio.file.Files.readString(ReferenceFiles.path("school-panel-plan.json")).replace(
                "\"cluster:pupil+term\"]", "\"cluster:pupil+term\", \"cluster:term+school\"]");
        assertTrue(text.contains("\"cluster:term+school\"]"), "the plan edit took");
        RunResult parts = compare(new PlanReader(false).read(text, ReferenceFiles.path("school-panel-plan.json")
                .getParent()), slices, true);
        TwoWayRoutes.assertWithinPass(parts);
        String key = intersectionKey("term", "school");
        for (int v = 0; v < parts.models().variantCount(); v++) {
            DataVariant variant = parts.models().variant(parts.models().variantKey(v));
            if (variant.absorbsSeveral) {
                assertTrue(variant.wholeIntersectionClusters.get(key) > 1, "term x school counted by the parts");
                assertTrue(variant.usesClusterMoments(key), "term x school from the clusters' cells");
            }
        }
    }

    /**
     * A draw's intersection, or cluster column, whose cells would pass the engine's memory bound for them is
     * refused with both counts; an intersection with one row per cluster that the draws renew takes the fourth
     * moments instead, whatever its count.
     */
    @Test
    void drawsOfAnIntersectionAboveTheCellsBoundAreExplained() {
        RunResult parts = compare(plan("school-panel-plan.json"), 3, true);
        DataVariant variant = null;
        for (int v = 0; v < parts.models().variantCount(); v++) {
            DataVariant d = parts.models().variant(parts.models().variantKey(v));
            variant = d.absorbsSeveral ? d : variant;
        }
        String key = intersectionKey("pupil", "term");
        List<String> columns = List.of("pupil", "term");
        assertEquals(null, variant.drawClustersProblem(key, columns, "pupil"), "one row per cluster, renewed");
        int most = VariantByParts.countedKeysAtMost(variant.columns);
        assertEquals(null, variant.drawClustersProblem(key, columns, null), "198 clusters' cells");
        variant.wholeIntersectionClusters.put(key, most + 1);
        assertEquals(String.format(java.util.Locale.ROOT, "the intersection of pupil and term has %,d clusters, "
                + "whose cells in a draw would be above the engine's memory bound for them (33,554,432 doubles: at "
                + "most %,d clusters of %d model columns)", most + 1, most, variant.columns),
                variant.drawClustersProblem(key, columns, null));
        variant.wholeIntersectionClusters.remove(key);
        assertTrue(variant.drawClustersProblem(key, columns, null).contains("has more than "),
                variant.drawClustersProblem(key, columns, null));
        assertEquals(null, variant.drawClustersProblem(key, columns, "term"), "one row per cluster, renewed");
        // a cluster column is bounded alike, its clusters counted over the whole table
        assertEquals(null, variant.drawClustersProblem("pupil", List.of("pupil"), null), "the pupils' cells");
        variant.wholeClusterCounts = Map.of("pupil", most + 1, "term", 12);
        assertEquals(String.format(java.util.Locale.ROOT, "\"pupil\" has %,d clusters, whose cells in a draw would "
                + "be above the engine's memory bound for them (33,554,432 doubles: at most %,d clusters of %d model "
                + "columns)", most + 1, most, variant.columns), variant.drawClustersProblem("pupil", List.of("pupil"),
                "pupil"));
    }

    /** The key of the intersection of two cluster columns, the third component of their two-way error type. */
    private static String intersectionKey(String first, String second) {
        return ClusterComponents.of(new org.forkscape.plan.ErrorType(org.forkscape.plan.ErrorType.Kind.CLUSTER,
                List.of(first, second))).get(2).key();
    }

    /** Parts that split a pupil's rows cannot give its level's means: refused, never a wrong number. */
    @Test
    void partsThatSplitALevelAreRefused() {
        Plan plan = plan("school-panel-plan.json");
        Table table = new CsvTableReader().read(plan.dataFile());
        int n = table.rowCount();
        List<VariantByParts> parts = List.of(new VariantByParts(plan, VariantByPartsTest.slice(table, 0, n / 2 + 1)),
                new VariantByParts(plan, VariantByPartsTest.slice(table, n / 2 + 1, n)));
        VariantParts inMemory = VariantByPartsTest.inMemory(parts);
        WholeRows grouping = WholeRows.NONE.withGroupingValues(VariantByPartsTest.numericGroupingValues(table));
        VariantSource source = (key, pool) -> new VariantByParts(plan, table).build(key, grouping, inMemory);
        IllegalStateException e = assertThrows(IllegalStateException.class, () -> new MultiverseRunner(1)
                .withVariants(source).run(plan, table, RunProgress.SILENT, new AtomicBoolean()));
        assertTrue(e.getMessage().contains("two parts"), e.getMessage());
    }

    private static Plan plan(String name) {
        return new PlanReader(false).read(ReferenceFiles.path(name));
    }

    /**
     * Every specification on parts against the whole table; returns the run on parts.
     *
     * @param rowFree whether the run on parts may take the routes without rows (the whole table's always may)
     */
    static RunResult compare(Plan plan, int slices, boolean rowFree) {
        Table table = new CsvTableReader().read(plan.dataFile());
        RunResult whole = new MultiverseRunner(2).run(plan, table, RunProgress.SILENT, new AtomicBoolean());
        VariantSource built = source(plan, table, "pupil", slices);
        Map<VariantKey, DataVariant> kept = new java.util.concurrent.ConcurrentHashMap<>();
        VariantSource source = (key, pool) -> kept.computeIfAbsent(key, k -> built.variant(k, pool));
        RunResult parts = new MultiverseRunner(2, rowFree).withVariants(source).run(plan, table, RunProgress.SILENT,
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
        assertTrue(fitted >= a.size() / 2, fitted + " fitted");
        return parts;
    }

    /** Variants from {@code slices} parts, each row in part (code of {@code column}) modulo {@code slices}. */
    static VariantSource source(Plan plan, Table table, String column, int slices) {
        return source(plan, table, column, slices, null);
    }

    /** The same, with each row's identity for bootstrap draws ({@code rowKeys}, or null for none). */
    static VariantSource source(Plan plan, Table table, String column, int slices, long[] rowKeys) {
        int[] codes = ((CategoricalColumn) table.column(column)).codes();
        List<VariantByParts> parts = new ArrayList<>();
        for (int s = 0; s < slices; s++) {
            int part = s;
            int[] rows = java.util.stream.IntStream.range(0, table.rowCount())
                    .filter(r -> Math.floorMod(codes[r], slices) == part).toArray();
            parts.add(new VariantByParts(plan, rowsOf(table, rows), rowKeys == null ? null
                    : Arrays.stream(rows).mapToLong(r -> rowKeys[r]).toArray()));
        }
        VariantByParts decider = new VariantByParts(plan, table);
        WholeRows grouping = WholeRows.NONE.withGroupingValues(VariantByPartsTest.numericGroupingValues(table));
        VariantParts inMemory = VariantByPartsTest.inMemory(parts);
        Map<VariantKey, DataVariant> built = new java.util.concurrent.ConcurrentHashMap<>();
        return new VariantSource() {
            @Override
            public DataVariant variant(VariantKey key, java.util.concurrent.ExecutorService pool) {
                return built.computeIfAbsent(key, k -> decider.build(k, grouping, inMemory));
            }

            @Override
            public BootstrapByParts bootstrap(BootstrapDesign design) {
                return new BootstrapByParts(decider, inMemory, design);
            }
        };
    }

    private static Table rowsOf(Table table, int[] rows) {
        List<Column> columns = new ArrayList<>();
        for (Column c : table.columns()) {
            if (c instanceof CategoricalColumn cat) {
                columns.add(new CategoricalColumn(c.name(), Arrays.stream(rows).map(r -> cat.codes()[r]).toArray(),
                        cat.levels()));
            } else {
                double[] v = ((NumericColumn) c).values();
                columns.add(new NumericColumn(c.name(), Arrays.stream(rows).mapToDouble(r -> v[r]).toArray()));
            }
        }
        return new Table(table.source(), columns);
    }

    private static void close(double expected, double actual, String what) {
        if (expected == actual || Double.isNaN(expected) && Double.isNaN(actual)) {
            return;
        }
        double relative = Math.abs(actual - expected) / Math.abs(expected);
        assertTrue(relative <= RELATIVE, what + ": " + actual + " against " + expected + ", relative " + relative);
    }
}
