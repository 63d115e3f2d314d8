package org.forkscape.infer;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotNull;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.SplittableRandom;
import org.forkscape.data.CategoricalColumn;
import org.forkscape.data.Column;
import org.forkscape.data.NumericColumn;
import org.forkscape.data.Table;
import org.forkscape.fit.DataVariant;
import org.forkscape.fit.DrawFit;
import org.forkscape.fit.ResampledVariant;
import org.forkscape.fit.SpecificationModels;
import org.forkscape.plan.Plan;
import org.forkscape.run.ResultTable;
import org.forkscape.run.RunResult;
import org.junit.jupiter.api.Test;

/**
 * A null draw's refit from reweighted cross-products must be exactly the engine's fit of the resampled
 * data set itself: the table with each row repeated as often as it was drawn (whole clusters repeated as
 * new clusters), or with the key predictor permuted. The engine is checked against R and NIST
 * elsewhere; here every specification of a plan with missing values, a sample rule, categorical
 * controls, a collinear control (the QR route), fixed effects and every error type must agree to 1e-9 relative.
 */
class ResampledVariantTest {
    private static final String PLAN = """
            {"data": "resample.csv",
             "decisions": [
               {"name": "outcome", "kind": "outcome", "alternatives": [{"label": "y", "column": "y"}]},
               {"name": "key", "kind": "predictor", "alternatives": [
                  {"label": "x", "column": "x"}, {"label": "x2", "column": "x2"}]},
               {"name": "controls", "kind": "controls", "optional": ["a", "b", "c"]},
               {"name": "rows", "kind": "sample", "alternatives": [{"label": "all"}, {"label": "s", "keep": "s > -1"}]},
               {"name": "errors", "kind": "errors", "alternatives": ["classical", "HC0", "HC1", "HC2", "HC3", "cluster:g"]},
               {"name": "fe", "kind": "absorb", "alternatives": [{"label": "none", "columns": []}, {"label": "f", "columns": ["f"]}]}
             ]}
            """;
    /** The same plan with multi-way cluster errors, two-way and three-way (h a grouping that cuts across g). */
    private static final String MULTIWAY_PLAN = PLAN.replace(
            "[\"classical\", \"HC0\", \"HC1\", \"HC2\", \"HC3\", \"cluster:g\"]",
            "[\"cluster:g+h\", \"cluster:g+h+b\"]");
    private static final double TOLERANCE = 1e-9;

    private static Table data(boolean missingKey) {
        int n = 150;
        SplittableRandom r = new SplittableRandom(11);
        double[] y = new double[n];
        double[] x = new double[n];
        double[] x2 = new double[n];
        double[] a = new double[n];
        double[] s = new double[n];
        int[] b = new int[n];
        int[] g = new int[n];
        int[] f = new int[n];
        double[] c = new double[n];
        for (int i = 0; i < n; i++) {
            b[i] = r.nextInt(3);
            g[i] = r.nextInt(15);
            f[i] = r.nextInt(4);
            a[i] = i % 17 == 3 ? Double.NaN : Scenarios.gaussian(r);
            x[i] = missingKey && i % 13 == 5 ? Double.NaN : Scenarios.gaussian(r) + 0.3 * b[i];
            x2[i] = x[i] + Scenarios.gaussian(r);
            // c = 2a exactly: specifications with both send the precision guard to its QR refit
            c[i] = 2 * a[i];
            s[i] = Scenarios.gaussian(r);
            double ai = Double.isNaN(a[i]) ? 0 : a[i];
            double xi = Double.isNaN(x[i]) ? 0 : x[i];
            y[i] = i % 19 == 7 ? Double.NaN : 0.3 * xi + ai - 0.5 * b[i] + 0.2 * f[i] + (1 + Math.abs(xi)) * Scenarios.gaussian(r);
        }
        return new Table("resample.csv", List.of(new NumericColumn("y", y), new NumericColumn("x", x),
                new NumericColumn("x2", x2), new NumericColumn("a", a), new CategoricalColumn("b", b, List.of("p", "q", "r")),
                new NumericColumn("s", s), new CategoricalColumn("g", g, levels("g", 15)),
                new CategoricalColumn("f", f, levels("f", 4)), new NumericColumn("c", c)));
    }

    /** Level names prefix00, prefix01, ... */
    static List<String> levels(String prefix, int count) {
        List<String> out = new ArrayList<>();
        for (int k = 0; k < count; k++) {
            out.add(String.format("%s%02d", prefix, k));
        }
        return out;
    }

    @Test
    void rowBootstrapEqualsTheEngineOnTheRepeatedRows() {
        Table table = data(false);
        int[] weights = rowDrawCounts(table.rowCount(), 3);
        Table repeated = repeat(table, weights, null);
        int compared = compare(table, repeated, rv -> rv.bootstrap(weights, null));
        assertTrue(compared > 300, "most of the 384 specifications fit in the resample; compared " + compared);
    }

    @Test
    void clusterBootstrapEqualsTheEngineWithEachCopyAsANewCluster() {
        Table table = data(false);
        int[] cluster = ((CategoricalColumn) table.column("g")).codes();
        int[] weights = clusterDrawCounts(cluster, 8);
        Table repeated = repeat(table, weights, "g");
        int compared = compare(table, repeated, rv -> rv.bootstrap(weights, cluster));
        assertTrue(compared > 300, "compared " + compared);
    }

    @Test
    void clustersThatSpanTheResampledUnitsKeepTheirCopiesTogether() {
        // whole levels of f are drawn; the error clusters g cut across them, so a repeated row stays in
        // its g cluster, exactly as in the resampled table
        Table table = data(false);
        int[] unit = ((CategoricalColumn) table.column("f")).codes();
        int[] unitDraws = {2, 0, 1, 1};
        int[] weights = new int[table.rowCount()];
        for (int i = 0; i < weights.length; i++) {
            weights[i] = unitDraws[unit[i]];
        }
        Table repeated = repeat(table, weights, null);
        int compared = compare(table, repeated, rv -> rv.bootstrap(weights, unit));
        assertTrue(compared > 100, "compared " + compared);
    }

    /**
     * Multi-way clustering (Cameron, Gelbach &amp; Miller 2011): each component of the signed sum (every column
     * and every intersection of them) is one clustering, and a drawn copy starts new clusters in exactly the
     * components whose clusters lie within one resampled unit, as the repeated table, whose resampled column
     * is renamed per copy, has them: here g and the intersections with g, not h, b or h and b.
     */
    @Test
    void multiwayClusterBootstrapRenewsTheComponentsNestedInTheResampledUnits() {
        Table table = withCrossingGroups(data(false));
        int[] cluster = ((CategoricalColumn) table.column("g")).codes();
        int[] weights = clusterDrawCounts(cluster, 8);
        Table repeated = repeat(table, weights, "g");
        int compared = compare(MULTIWAY_PLAN, table, repeated, rv -> rv.bootstrap(weights, cluster));
        assertTrue(compared > 80, "compared " + compared);
    }

    @Test
    void multiwayRowBootstrapEqualsTheEngineOnTheRepeatedRows() {
        Table table = withCrossingGroups(data(false));
        int[] weights = rowDrawCounts(table.rowCount(), 3);
        int compared = compare(MULTIWAY_PLAN, table, repeat(table, weights, null), rv -> rv.bootstrap(weights, null));
        assertTrue(compared > 80, "compared " + compared);
    }

    /**
     * The same for a logit with two-way and three-way clustered errors (R's {@code vcovCL} sum for a glm):
     * the draw's refit, started from the observed fit, against the engine's fit of the repeated table from
     * its own starts, within the iterations' stopping tolerance.
     */
    @Test
    void multiwayClusteredLogitDrawsRenewTheComponentsNestedInTheResampledUnits() {
        Table table = withCrossingGroups(data(false));
        int[] cluster = ((CategoricalColumn) table.column("g")).codes();
        int[] weights = clusterDrawCounts(cluster, 21);
        String logit = MULTIWAY_PLAN.replace("\"column\": \"y\"}]}", "\"column\": \"passed\"}]},\n"
                + "{\"name\": \"model\", \"kind\": \"model\", \"alternatives\": [\"logit\"]}");
        int compared = compare(logit, table, repeat(table, weights, "g"), rv -> rv.bootstrap(weights, cluster), 1e-7,
                false);
        assertTrue(compared > 60, "compared " + compared);
    }

    /** Each of {@code rows} rows' count in a draw of as many rows with replacement (a seeded multinomial draw). */
    static int[] rowDrawCounts(int rows, long seed) {
        int[] weights = new int[rows];
        SplittableRandom r = new SplittableRandom(seed);
        for (int k = 0; k < rows; k++) {
            weights[r.nextInt(rows)]++;
        }
        return weights;
    }

    /** Each row's count in a draw of the 15 clusters of g with replacement (a seeded multinomial draw). */
    private static int[] clusterDrawCounts(int[] cluster, long seed) {
        int[] clusterDraws = new int[15];
        SplittableRandom r = new SplittableRandom(seed);
        for (int k = 0; k < 15; k++) {
            clusterDraws[r.nextInt(15)]++;
        }
        int[] weights = new int[cluster.length];
        for (int i = 0; i < weights.length; i++) {
            weights[i] = clusterDraws[cluster[i]];
        }
        return weights;
    }

    /**
     * The table with a grouping h of six levels drawn independently of g (so that it cuts across it), and
     * {@code passed}, whether y is above 0.
     */
    private static Table withCrossingGroups(Table table) {
        SplittableRandom r = new SplittableRandom(99);
        int[] h = new int[table.rowCount()];
        double[] y = ((NumericColumn) table.column("y")).values();
        double[] passed = new double[y.length];
        for (int i = 0; i < h.length; i++) {
            h[i] = r.nextInt(6);
            passed[i] = Double.isNaN(y[i]) ? Double.NaN : y[i] > 0 ? 1 : 0;
        }
        List<Column> cols = new ArrayList<>(table.columns());
        cols.add(new CategoricalColumn("h", h, levels("h", 6)));
        cols.add(new NumericColumn("passed", passed));
        return new Table(table.source(), cols);
    }

    @Test
    void permutationEqualsTheEngineOnThePermutedPredictor() {
        Table table = data(true);
        int n = table.rowCount();
        int[] order = new int[n];
        ResampleDesign.of(table, null).order(new SplittableRandom(21), order);
        // the expected shuffle, variant by variant: within the variant's rows that have the key
        // predictors, the k-th of them in the random order gets the values of the k-th in row order
        Plan plan = Scenarios.plan(PLAN);
        SpecificationModels models = new SpecificationModels(plan, table);
        for (int v = 0; v < models.variantCount(); v++) {
            DataVariant base = models.variant(models.variantKey(v));
            boolean[] inVariant = rowsOf(plan, table, models, v);
            Table permuted = permuteKey(table, order, inVariant);
            ResampledVariant rv = new ResampledVariant(base, 2);
            rv.permute(order);
            RunResult expected = Scenarios.run(PLAN, permuted);
            int compared = compareVariant(models, expected.results(), rv, v);
            assertTrue(compared > 60, "variant " + v + ": compared " + compared);
        }
    }

    /** Rows the variant's sample rule keeps and the absorbed column does not miss (here: none missing). */
    private static boolean[] rowsOf(Plan plan, Table table, SpecificationModels models, int variant) {
        boolean keepRule = models.variantKey(variant).sampleChoices()[0] == 1;
        double[] s = ((NumericColumn) table.column("s")).values();
        boolean[] in = new boolean[table.rowCount()];
        for (int i = 0; i < in.length; i++) {
            in[i] = !keepRule || s[i] > -1;
        }
        return in;
    }

    private static Table permuteKey(Table table, int[] order, boolean[] inVariant) {
        double[] x = ((NumericColumn) table.column("x")).values();
        double[] x2 = ((NumericColumn) table.column("x2")).values();
        List<Integer> byRow = new ArrayList<>();
        for (int i = 0; i < x.length; i++) {
            if (inVariant[i] && !Double.isNaN(x[i])) {
                byRow.add(i);
            }
        }
        List<Integer> byOrder = new ArrayList<>();
        for (int i : order) {
            if (inVariant[i] && !Double.isNaN(x[i])) {
                byOrder.add(i);
            }
        }
        double[] px = x.clone();
        double[] px2 = x2.clone();
        for (int k = 0; k < byRow.size(); k++) {
            px[byOrder.get(k)] = x[byRow.get(k)];
            px2[byOrder.get(k)] = x2[byRow.get(k)];
        }
        List<Column> cols = new ArrayList<>();
        for (Column c : table.columns()) {
            cols.add(c.name().equals("x") ? new NumericColumn("x", px) : c.name().equals("x2")
                    ? new NumericColumn("x2", px2) : c);
        }
        return new Table(table.source(), cols);
    }

    private int compare(Table table, Table resampled, java.util.function.Consumer<ResampledVariant> draw) {
        return compare(PLAN, table, resampled, draw);
    }

    private int compare(String json, Table table, Table resampled, java.util.function.Consumer<ResampledVariant> draw) {
        return compare(json, table, resampled, draw, TOLERANCE, true);
    }

    private int compare(String json, Table table, Table resampled, java.util.function.Consumer<ResampledVariant> draw,
            double tolerance, boolean leastSquares) {
        Plan plan = Scenarios.plan(json);
        SpecificationModels models = new SpecificationModels(plan, table);
        RunResult expected = Scenarios.run(json, resampled);
        if (leastSquares) {
            assertTrue(expected.refitByQr() > 0, "the QR route is exercised");
        }
        int compared = 0;
        for (int v = 0; v < models.variantCount(); v++) {
            ResampledVariant rv = new ResampledVariant(
                    models.variant(models.variantKey(v)), 2);
            draw.accept(rv);
            compared += compareVariant(models, expected.results(), rv, v, tolerance);
        }
        return compared;
    }

    private static int compareVariant(SpecificationModels models, ResultTable expected, ResampledVariant rv, int v) {
        return compareVariant(models, expected, rv, v, TOLERANCE);
    }

    static int compareVariant(SpecificationModels models, ResultTable expected, ResampledVariant rv, int v,
            double tolerance) {
        long[] choices = new long[models.space().decisionCount()];
        int compared = 0;
        for (int slot = 0; slot < expected.size(); slot++) {
            models.space().decode(expected.specIndex(slot), choices);
            if (models.variantOrdinal(choices) != v) {
                continue;
            }
            DrawFit fit = rv.fit(models.model(choices));
            String what = "specification " + (slot + 1) + " " + Arrays.toString(choices);
            if (!expected.fitted(slot)) {
                assertNull(fit, what + ": " + expected.status(slot));
                continue;
            }
            assertNotNull(fit, what);
            assertEquals(expected.estimate(slot), fit.estimate(), tolerance * Math.abs(expected.estimate(slot)), what);
            assertEquals(expected.stdError(slot), fit.stdError(), tolerance * expected.stdError(slot), what);
            assertEquals(expected.df(slot), fit.df(), 0, what);
            compared++;
        }
        return compared;
    }

    /**
     * The table with row i repeated weights[i] times; with {@code newClusters}, the k-th copy of a row
     * gets that column's value suffixed with k, so each drawn copy of a cluster is a cluster of its own.
     */
    static Table repeat(Table table, int[] weights, String newClusters) {
        int total = Arrays.stream(weights).sum();
        int[] from = new int[total];
        int[] copy = new int[total];
        int k = 0;
        for (int i = 0; i < weights.length; i++) {
            for (int c = 0; c < weights[i]; c++) {
                from[k] = i;
                copy[k++] = c;
            }
        }
        List<Column> cols = new ArrayList<>();
        for (Column c : table.columns()) {
            if (c instanceof NumericColumn num) {
                double[] out = new double[total];
                for (int j = 0; j < total; j++) {
                    out[j] = num.values()[from[j]];
                }
                cols.add(new NumericColumn(c.name(), out));
            } else {
                CategoricalColumn cat = (CategoricalColumn) c;
                if (c.name().equals(newClusters)) {
                    List<String> labels = new ArrayList<>();
                    int[] codes = new int[total];
                    java.util.Map<String, Integer> index = new java.util.TreeMap<>();
                    for (int j = 0; j < total; j++) {
                        index.put(cat.levels().get(cat.codes()[from[j]]) + "#" + copy[j], 0);
                    }
                    int next = 0;
                    for (var e : index.entrySet()) {
                        e.setValue(next++);
                        labels.add(e.getKey());
                    }
                    for (int j = 0; j < total; j++) {
                        codes[j] = index.get(cat.levels().get(cat.codes()[from[j]]) + "#" + copy[j]);
                    }
                    cols.add(new CategoricalColumn(c.name(), codes, labels));
                } else {
                    int[] codes = new int[total];
                    for (int j = 0; j < total; j++) {
                        codes[j] = cat.codes()[from[j]];
                    }
                    cols.add(new CategoricalColumn(c.name(), codes, cat.levels()));
                }
            }
        }
        return new Table(table.source(), cols);
    }
}
