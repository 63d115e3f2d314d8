package org.forkscape.infer;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.ArrayList;
import java.util.List;
import java.util.SplittableRandom;
import java.util.function.Consumer;
import org.forkscape.data.CategoricalColumn;
import org.forkscape.data.Column;
import org.forkscape.data.NumericColumn;
import org.forkscape.data.Table;
import org.forkscape.fit.ResampledVariant;
import org.forkscape.fit.SpecificationModels;
import org.forkscape.plan.Plan;
import org.forkscape.run.RunResult;
import org.junit.jupiter.api.Test;

/**
 * Null draws beside two absorbed columns: a draw's fit of every specification must be the engine's own fit of
 * the resampled data set (each row repeated as often as it was drawn, each drawn copy of a resampled school a
 * new school; or the key predictor permuted), to 1e-9 relative, with its df and its statuses. The panel has
 * pupils in two groups whose terms never meet (two connected components of the pupil-term graph, so K loses
 * two levels, and a draw that leaves a group out loses one), missing cells, analytic weights with zeros and
 * missing values, a control twice another (the QR route), classical, HC0-HC3, one-way and two-way cluster
 * errors, and absorb alternatives of none, one and two columns. The two-absorbed variants must take the route
 * that demeans each draw's rows again; the others must not.
 */
class TwoWayDrawsTest {
    private static final String PLAN = """
            {"data": "panel.csv",
             "decisions": [
               {"name": "outcome", "kind": "outcome", "alternatives": [{"label": "y", "column": "y"}]},
               {"name": "key", "kind": "predictor", "alternatives": [
                  {"label": "x", "column": "x"}, {"label": "x2", "column": "x2"}]},
               {"name": "controls", "kind": "controls", "optional": ["a", "b", "c"]},
               {"name": "errors", "kind": "errors", "alternatives": [%s]},
               {"name": "fe", "kind": "absorb", "alternatives": [{"label": "none", "columns": []},
                  {"label": "pupil", "columns": ["f"]}, {"label": "pupil and term", "columns": ["f", "t"]}]}%s
             ]}
            """;
    private static final String EVERY_ERROR = "\"classical\", \"HC0\", \"HC1\", \"HC2\", \"HC3\", \"cluster:g\", "
            + "\"cluster:g+h\"";
    private static final String WEIGHTS = """
            ,
               {"name": "weights", "kind": "weights", "alternatives": [{"label": "unweighted"},
                  {"label": "w", "column": "w"}]}""";
    private static final String WEIGHTED = PLAN.formatted(EVERY_ERROR, WEIGHTS);
    private static final String UNWEIGHTED = PLAN.formatted(EVERY_ERROR, "");
    /** The absorb alternative with two columns. */
    private static final int TWO_COLUMNS = 2;

    /**
     * 240 rows of 40 pupils (f) in 10 schools (g, four pupils each); pupils 0-19 are seen in terms 0-3 and pupils
     * 20-39 in terms 4-7, so the pupil-term graph has two connected components; h cuts across the schools.
     */
    static Table panel(boolean missingKey) {
        int n = 240;
        SplittableRandom r = new SplittableRandom(17);
        double[] y = new double[n];
        double[] x = new double[n];
        double[] x2 = new double[n];
        double[] a = new double[n];
        double[] c = new double[n];
        double[] w = new double[n];
        int[] b = new int[n];
        int[] f = new int[n];
        int[] t = new int[n];
        int[] g = new int[n];
        int[] h = new int[n];
        double[] pupilEffect = new double[40];
        for (int k = 0; k < 40; k++) {
            pupilEffect[k] = Scenarios.gaussian(r);
        }
        for (int i = 0; i < n; i++) {
            f[i] = i % 40;
            t[i] = (f[i] < 20 ? 0 : 4) + r.nextInt(4);
            g[i] = f[i] / 4;
            h[i] = r.nextInt(5);
            b[i] = r.nextInt(3);
            a[i] = i % 17 == 3 ? Double.NaN : Scenarios.gaussian(r);
            c[i] = 2 * a[i];
            x[i] = missingKey && i % 13 == 5 ? Double.NaN : 0.5 * pupilEffect[f[i]] + Scenarios.gaussian(r);
            x2[i] = x[i] + Scenarios.gaussian(r);
            w[i] = i % 23 == 4 ? 0 : i % 29 == 6 ? Double.NaN : 0.5 + 2 * r.nextDouble();
            double ai = Double.isNaN(a[i]) ? 0 : a[i];
            double xi = Double.isNaN(x[i]) ? 0 : x[i];
            y[i] = i % 19 == 7 ? Double.NaN : 0.3 * xi + ai - 0.4 * b[i] + pupilEffect[f[i]] + 0.2 * t[i]
                    + (1 + Math.abs(xi)) * Scenarios.gaussian(r);
        }
        return new Table("panel.csv", List.of(new NumericColumn("y", y), new NumericColumn("x", x),
                new NumericColumn("x2", x2), new NumericColumn("a", a), new CategoricalColumn("b", b, ResampledVariantTest.levels("b", 3)),
                new NumericColumn("c", c), new NumericColumn("w", w), new CategoricalColumn("f", f, ResampledVariantTest.levels("f", 40)),
                new CategoricalColumn("t", t, ResampledVariantTest.levels("t", 8)), new CategoricalColumn("g", g, ResampledVariantTest.levels("g", 10)),
                new CategoricalColumn("h", h, ResampledVariantTest.levels("h", 5))));
    }

    @Test
    void rowBootstrapEqualsTheEngineOnTheRepeatedRows() {
        Table table = panel(false);
        int[] weights = ResampledVariantTest.rowDrawCounts(table.rowCount(), 5);
        int[] compared = compare(WEIGHTED, table, ResampledVariantTest.repeat(table, weights, null),
                rv -> rv.bootstrap(weights, null));
        // of the 224 two-way specifications, those with HC2 or HC3 errors and a pupil drawn once have leverage 1
        assertTrue(compared[1] > 160, "two-way specifications compared: " + compared[1] + " of " + compared[0]);
        assertTrue(compared[0] > 550, "specifications compared: " + compared[0]);
    }

    /** Whole schools drawn, each copy a new school; a draw that leaves out every school of one group. */
    @Test
    void clusterBootstrapEqualsTheEngineWithEachCopyOfASchoolANewSchool() {
        Table table = panel(false);
        int[] school = ((CategoricalColumn) table.column("g")).codes();
        for (int[] schoolDraws : new int[][] {{2, 0, 1, 1, 0, 1, 3, 0, 1, 1}, {0, 0, 0, 0, 0, 3, 2, 1, 2, 2}}) {
            int[] weights = new int[table.rowCount()];
            for (int i = 0; i < weights.length; i++) {
                weights[i] = schoolDraws[school[i]];
            }
            int[] compared = compare(WEIGHTED, table, ResampledVariantTest.repeat(table, weights, "g"),
                    rv -> rv.bootstrap(weights, school));
            assertTrue(compared[1] > 200, "two-way specifications compared: " + compared[1] + " of " + compared[0]);
        }
    }

    /** A draw in which no row of a variant was drawn fits nothing there, without failing. */
    @Test
    void aDrawWithoutRowsFitsNothing() {
        Table table = panel(false);
        SpecificationModels models = new SpecificationModels(Scenarios.plan(WEIGHTED), table);
        int[] none = new int[table.rowCount()];
        long[] choices = new long[models.space().decisionCount()];
        int tried = 0;
        for (int v = 0; v < models.variantCount(); v++) {
            if (models.variantKey(v).absorbChoice() != TWO_COLUMNS) {
                continue;
            }
            ResampledVariant rv = new ResampledVariant(models.variant(models.variantKey(v)), 2);
            rv.bootstrap(none, null);
            assertTrue(rv.demeansEachDraw());
            for (long index = 0; index < models.space().count().longValueExact(); index++) {
                models.space().decode(index, choices);
                if (models.variantOrdinal(choices) == v) {
                    assertNull(rv.fit(models.model(choices)));
                    tried++;
                }
            }
        }
        assertEquals(2 * 112, tried, "two weights alternatives x 112 specifications absorbing two columns");
    }

    /** The permuted key predictor is demeaned again with the other columns, over each specification's rows. */
    @Test
    void permutationEqualsTheEngineOnThePermutedPredictor() {
        Table table = panel(true);
        int n = table.rowCount();
        int[] order = new int[n];
        ResampleDesign.of(table, null).order(new SplittableRandom(23), order);
        Table permuted = permuteKey(table, order);
        int[] compared = compare(UNWEIGHTED, table, permuted, rv -> rv.permute(order));
        assertTrue(compared[1] > 100, "two-way specifications compared: " + compared[1] + " of " + compared[0]);
    }

    /** Bit-identical draws on one and three threads, by the bootstrap of rows and of schools and by permutation. */
    @Test
    void twoWayDrawsDoNotDependOnTheThreadCount() {
        String plan = PLAN.formatted("\"HC1\", \"HC3\", \"cluster:g+h\"", WEIGHTS);
        RunResult run = Scenarios.run(plan, panel(false));
        assertEquals(2 * 8 * 3 * 3 * 2, run.results().size());
        for (String cluster : new String[] {null, "g"}) {
            NullDrawResult one = Scenarios.nullDraws(run, 12, NullMethod.BOOTSTRAP, 7, cluster, 1);
            NullDrawResult three = Scenarios.nullDraws(run, 12, NullMethod.BOOTSTRAP, 7, cluster, 3);
            NullDrawsDeterminismTest.assertSameDraws(one, three);
        }
        NullDrawResult one = Scenarios.nullDraws(run, 12, NullMethod.PERMUTE, 7, null, 1);
        NullDrawResult three = Scenarios.nullDraws(run, 12, NullMethod.PERMUTE, 7, null, 3);
        NullDrawsDeterminismTest.assertSameDraws(one, three);
    }

    /** The table with x and x2 moved together (for the permutation draws of other tests too): the k-th row with x in the order gets the k-th row's in row order. */
    static Table permuteKey(Table table, int[] order) {
        double[] x = ((NumericColumn) table.column("x")).values();
        double[] x2 = ((NumericColumn) table.column("x2")).values();
        List<Integer> byRow = new ArrayList<>();
        for (int i = 0; i < x.length; i++) {
            if (!Double.isNaN(x[i])) {
                byRow.add(i);
            }
        }
        List<Integer> byOrder = new ArrayList<>();
        for (int i : order) {
            if (!Double.isNaN(x[i])) {
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

    /**
     * Every specification of every variant against the engine on {@code resampled}; returns the specifications
     * compared, in all and in the two-absorbed variants, after asserting each variant's route.
     */
    private static int[] compare(String json, Table table, Table resampled, Consumer<ResampledVariant> draw) {
        return compare(json, table, resampled, draw, choice -> choice == TWO_COLUMNS);
    }

    /**
     * As {@link #compare(String, Table, Table, Consumer)}, with the absorb alternatives of several columns named
     * by {@code several} (their variants must demean each draw's rows again).
     */
    static int[] compare(String json, Table table, Table resampled, Consumer<ResampledVariant> draw,
            java.util.function.IntPredicate several) {
        Plan plan = Scenarios.plan(json);
        SpecificationModels models = new SpecificationModels(plan, table);
        RunResult expected = Scenarios.run(json, resampled);
        assertTrue(expected.refitByQr() > 0, "the QR route is exercised");
        int all = 0;
        int twoWay = 0;
        for (int v = 0; v < models.variantCount(); v++) {
            ResampledVariant rv = new ResampledVariant(models.variant(models.variantKey(v)), 2);
            draw.accept(rv);
            boolean two = several.test(models.variantKey(v).absorbChoice());
            assertEquals(two, rv.demeansEachDraw(), "variant " + v + " " + models.variantKey(v));
            int compared = ResampledVariantTest.compareVariant(models, expected.results(), rv, v, 1e-9);
            all += compared;
            twoWay += two ? compared : 0;
            rv.finishDraw();
            assertTrue(!rv.demeansEachDraw());
        }
        return new int[] {all, twoWay};
    }
}
