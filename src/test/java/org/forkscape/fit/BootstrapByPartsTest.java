package org.forkscape.fit;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.concurrent.atomic.AtomicBoolean;
import org.forkscape.data.Table;
import org.forkscape.infer.RunVariants;
import org.forkscape.plan.Plan;
import org.forkscape.plan.PlanReader;
import org.forkscape.run.MultiverseRunner;
import org.forkscape.run.RunProgress;
import org.forkscape.run.RunResult;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.ValueSource;

/**
 * Poisson bootstrap draws by parts (what the Spark runner computes on its partitions, here on slices of a table
 * in memory) against one machine given the same counts: every specification of every draw refit by
 * {@link ResampledVariant}, which repeats each row by its count, makes each drawn copy of a resampled school a
 * new cluster (and of its classes), keeps a copy's rows in a district that holds several schools, and sandwiches
 * from the repeated rows. The two sum different things (cell sums of repeated rows
 * in part order, against a pass over the repeated rows), so they agree to rounding: {@value #RELATIVE}
 * relative (common practice for two exact routes in double precision). The counts themselves are identical for
 * 1, 3 and 7 slices, so each draw's rows per specification (n_obs) are equal exactly.
 */
class BootstrapByPartsTest {
    static final double RELATIVE = 1e-10;
    static final int DRAWS = 12;

    static final String PLAN = PartsOfTable.ROWS_PLAN;
    static final String ABSORBING_PLAN = PartsOfTable.SCHOOLS_PLAN;

    @ParameterizedTest(name = "{0} slices")
    @ValueSource(ints = {1, 3, 7})
    void rowDrawsEqualOneMachineWithTheSameCounts(int slices) {
        compare(PLAN, new BootstrapDesign(41, null), slices);
    }

    @ParameterizedTest(name = "{0} slices")
    @ValueSource(ints = {1, 3, 7})
    void schoolDrawsMakeNewClustersAsOneMachineDoes(int slices) {
        compare(ABSORBING_PLAN, new BootstrapDesign(42, "school"), slices);
    }

    @ParameterizedTest(name = "{0} slices")
    @ValueSource(ints = {1, 3, 7})
    void schoolDrawsMakeNewClassesAndKeepDistrictsAsOneMachineDoes(int slices) {
        Table table = PartsOfTable.schools(6, 24, 12, 0.3, 0.1);
        Plan plan = new PlanReader(false).read(PartsOfTable.CLASSES_PLAN, Path.of("."));
        BootstrapDesign design = new BootstrapDesign(44, "school");
        BootstrapByParts draws = PartsOfTable.source(plan, table, PartsOfTable.rowKeys("schools.parquet",
                table.rowCount()), slices).bootstrap(design);
        assertEquals(List.of("class"), draws.keptWhole(), "classes lie within schools, districts do not");
        compare(PartsOfTable.CLASSES_PLAN, table, design, slices);
    }

    @ParameterizedTest(name = "{0} slices")
    @ValueSource(ints = {1, 3, 7})
    void hc2AndHc3DrawsPassOverThatDrawsParts(int slices) {
        Result r = compare(PLAN.replace("[\"classical\", \"HC1\"", "[\"HC2\", \"HC3\""), new BootstrapDesign(45, null),
                slices);
        assertTrue(r.rowPasses > 0, "draw fits from row passes over the draw's parts");
    }

    @ParameterizedTest(name = "{0} slices")
    @ValueSource(ints = {1, 3, 7})
    void absorbedHc1AndHc3DrawsPassOverThatDrawsParts(int slices) {
        Result r = compare(ABSORBING_PLAN.replace("[\"classical\"", "[\"HC1\", \"HC3\""), new BootstrapDesign(46,
                "school"), slices);
        assertTrue(r.rowPasses > 0, "draw fits from row passes over the draw's parts");
    }

    @ParameterizedTest(name = "{0} slices")
    @ValueSource(ints = {1, 3, 7})
    void qrRefitsInADrawReduceThatDrawsParts(int slices) {
        // a control b2 = 2 b + 1, collinear with b and the intercept in every draw: the precision guard
        // declines each fit with both, and the QR refit drops b2, from the triangular factors of the draw's parts
        Table base = PartsOfTable.schools(7, 20, 10, 0.2, 0);
        double[] b = ((org.forkscape.data.NumericColumn) base.column("b")).values();
        double[] copy = new double[b.length];
        for (int i = 0; i < b.length; i++) {
            copy[i] = 2 * b[i] + 1;
        }
        List<org.forkscape.data.Column> cols = new ArrayList<>(base.columns());
        cols.add(new org.forkscape.data.NumericColumn("b2", copy));
        Table table = new Table("schools.csv", cols);
        String plan = PLAN.replace("\"optional\": [\"a\", \"b\"]", "\"optional\": [\"b\", \"b2\"]");
        Result r = compare(plan, table, new BootstrapDesign(43, null), slices);
        assertTrue(r.refits > 0, "some draw fits refit by QR from the draw's parts");
        assertTrue(r.refitPasses > 0 && r.refitPasses < r.refits, r.refits + " refits in " + r.refitPasses
                + " passes over the draws' parts");
    }

    /**
     * Whole schools drawn from a weighted table (invented survey weights with zeros and missing cells): a
     * copy of a row keeps its analytic weight, so the draw's weights are the counts times the analytic weights,
     * which {@link ResampledVariant} multiplies on one machine (HC1 from the weighted fourth moments and
     * school clusters from the weighted cells, HC3 and absorbed HC1 from weighted row passes over the draw's
     * parts).
     */
    @ParameterizedTest(name = "{0} slices")
    @ValueSource(ints = {1, 3, 7})
    void weightedDrawsMultiplyTheAnalyticWeightsByTheCounts(int slices) {
        Table base = PartsOfTable.schools(8, 24, 12, 0.3, 0.1);
        java.util.SplittableRandom random = new java.util.SplittableRandom(9);
        double[] w = new double[base.rowCount()];
        for (int i = 0; i < w.length; i++) {
            double u = random.nextDouble();
            w[i] = u < 0.05 ? Double.NaN : u < 0.1 ? 0 : 0.5 + 2 * random.nextDouble();
        }
        List<org.forkscape.data.Column> cols = new ArrayList<>(base.columns());
        cols.add(new org.forkscape.data.NumericColumn("w", w));
        Table table = new Table("schools.csv", cols);
        String plan = ABSORBING_PLAN.replace("{\"name\": \"errors\", \"kind\": \"errors\", \"alternatives\": "
                + "[\"classical\", \"cluster:school\"]}", "{\"name\": \"weights\", \"kind\": \"weights\", "
                + "\"alternatives\": [{\"label\": \"survey\", \"column\": \"w\"}]}, {\"name\": \"errors\", "
                + "\"kind\": \"errors\", \"alternatives\": [\"HC1\", \"HC3\", \"cluster:school\"]}");
        assertTrue(plan.contains("\"weights\""), "the plan edit took");
        Result r = compare(plan, table, new BootstrapDesign(47, "school"), slices);
        assertTrue(r.rowPasses > 0, "weighted draw fits from row passes over the draw's parts");
    }

    /**
     * Whole schools drawn beside two-way clusters: the intersections of a nested column (the school, and the
     * classes within it) with the district, which is not nested, are nested too, so each drawn copy makes new
     * clusters of them, while the district's stay as they are; one machine's rule ({@link ResampledVariant}).
     */
    @ParameterizedTest(name = "{0} slices")
    @ValueSource(ints = {1, 3, 7})
    void multiwayDrawsMakeNewClustersOfTheNestedIntersections(int slices) {
        Table table = PartsOfTable.schools(6, 24, 12, 0.3, 0.1);
        String planJson = PartsOfTable.CLASSES_PLAN.replace("[\"cluster:class\", \"cluster:district\"]",
                "[\"cluster:school+district\", \"cluster:class+district\"]");
        Plan plan = new PlanReader(false).read(planJson, Path.of("."));
        BootstrapDesign design = new BootstrapDesign(48, "school");
        BootstrapByParts draws = PartsOfTable.source(plan, table, PartsOfTable.rowKeys("schools.parquet",
                table.rowCount()), slices).bootstrap(design);
        String join = ClusterComponents.JOIN;
        assertEquals(List.of("school", "class", "school" + join + "district", "class" + join + "district"),
                draws.keptWhole(), "the school, its classes and their intersections with the district are nested");
        compare(planJson, table, design, slices);
    }

    /**
     * Whole classes drawn beside clusters of school x third of the pupils, which are the classes: the
     * intersection is nested in the resampled classes though neither of its columns is, which only the
     * combinations of values tell.
     */
    @ParameterizedTest(name = "{0} slices")
    @ValueSource(ints = {1, 3, 7})
    void anIntersectionIsNestedByItsCombinationsOfValues(int slices) {
        Table base = PartsOfTable.schools(6, 24, 12, 0.3, 0.1);
        double[] third = new double[base.rowCount()];
        for (int i = 0; i < third.length; i++) {
            third[i] = i % 3;
        }
        List<org.forkscape.data.Column> cols = new ArrayList<>(base.columns());
        cols.add(new org.forkscape.data.NumericColumn("third", third));
        Table table = new Table("schools.csv", cols);
        String planJson = PartsOfTable.CLASSES_PLAN.replace("[\"cluster:class\", \"cluster:district\"]",
                "[\"cluster:school+third\"]");
        Plan plan = new PlanReader(false).read(planJson, Path.of("."));
        BootstrapDesign design = new BootstrapDesign(49, "class");
        BootstrapByParts draws = PartsOfTable.source(plan, table, PartsOfTable.rowKeys("schools.parquet",
                table.rowCount()), slices).bootstrap(design);
        assertEquals(List.of("school" + ClusterComponents.JOIN + "third"), draws.keptWhole(),
                "school x third is nested in the classes, neither school nor third is");
        compare(planJson, table, design, slices);
    }

    record Result(int compared, int refits, long rowPasses, long refitPasses) {
    }

    private static Result compare(String planJson, BootstrapDesign design, int slices) {
        return compare(planJson, PartsOfTable.schools(5, 24, 12, 0.3, 0.1), design, slices);
    }

    private static Result compare(String planJson, Table table, BootstrapDesign design, int slices) {
        Plan plan = new PlanReader(false).read(planJson, Path.of("."));
        long[] keys = PartsOfTable.rowKeys("schools.parquet", table.rowCount());
        VariantSource source = PartsOfTable.source(plan, table, keys, slices);
        RunResult byParts = new MultiverseRunner(1).withVariants(source).run(plan, table, RunProgress.SILENT,
                new AtomicBoolean());
        RunResult inMemory = new MultiverseRunner(1).run(plan, table, RunProgress.SILENT, new AtomicBoolean());
        RunVariants indexed = RunVariants.of(byParts);
        BootstrapByParts draws = byParts.models().bootstrap(design);
        assertNotNull(draws, "a source by parts makes its draws by parts");
        int predictors = plan.predictor().alternatives().size();
        // as the null draws fit them (infer.DrawsByParts): row passes and QR refits reduced in batches
        SpecificationFitter fitter = new SpecificationFitter().deferringRowPasses().deferringRefits();
        int compared = 0;
        int refits = 0;
        long rowPasses = 0;
        long refitPasses = 0;
        for (int v = 0; v < indexed.variantCount(); v++) {
            int[] specs = indexed.specificationsOf(v);
            if (specs.length == 0) {
                continue;
            }
            VariantKey key = byParts.models().variantKey(v);
            DataVariant observed = indexed.variant(v);
            List<SpecificationModel> models = new ArrayList<>();
            for (int i : specs) {
                models.add(indexed.model(i));
            }
            DataVariant[] inDraw = draws.draws(key, observed, 0, DRAWS);
            for (int d = 0; d < DRAWS; d++) {
                DrawFit[] expected = PartsOfTable.oneMachine(inMemory.models().variant(key), predictors, models, table,
                        keys, design, d);
                // as the null draws fit them: HC2, HC3 (and HC0, HC1 beside an absorbed column) by row passes over
                // the draw's parts
                long served = inDraw[d].rowPassesServed();
                KeyFit[] fits = RowPassesByParts.fitEach(fitter, inDraw[d], models, () -> { });
                rowPasses += inDraw[d].rowPassesServed() - served;
                refitPasses += inDraw[d].refitBatches.get();
                for (int s = 0; s < specs.length; s++) {
                    KeyFit fit = fits[s];
                    String where = "variant " + v + ", draw " + d + ", specification "
                            + byParts.results().specNumber(indexed.slot(specs[s]));
                    assertNotNull(fit, where + ": a row pass refused by parts");
                    if (expected[s] == null || !(expected[s].stdError() > 0)) {
                        assertTrue(!fit.ok() || !(fit.stdError() > 0), where + ": fitted by parts, not on one machine");
                        continue;
                    }
                    assertTrue(fit.ok(), where + ": not fitted by parts: " + fit.status());
                    close(expected[s].estimate(), fit.estimate(), where + " estimate");
                    close(expected[s].stdError(), fit.stdError(), where + " std_error");
                    assertEquals(expected[s].df(), fit.df(), 0.0, where + " df");
                    compared++;
                    if (fit.refitByQr()) {
                        refits++;
                    }
                }
            }
        }
        assertTrue(compared > DRAWS * indexed.size() / 2, compared + " fits compared");
        return new Result(compared, refits, rowPasses, refitPasses);
    }

    private static void close(double expected, double actual, String what) {
        double relative = Math.abs(actual - expected) / Math.abs(expected);
        assertTrue(expected == actual || relative <= RELATIVE, what + ": " + actual + " by parts against " + expected
                + " on one machine, relative " + relative);
    }
}
