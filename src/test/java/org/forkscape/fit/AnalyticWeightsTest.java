package org.forkscape.fit;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import java.util.SplittableRandom;
import java.util.concurrent.atomic.AtomicBoolean;
import org.forkscape.data.CategoricalColumn;
import org.forkscape.data.Column;
import org.forkscape.data.NumericColumn;
import org.forkscape.data.Table;
import org.forkscape.plan.Plan;
import org.forkscape.plan.PlanReader;
import org.forkscape.run.MultiverseRunner;
import org.forkscape.run.ResultTable;
import org.forkscape.run.RunProgress;
import org.junit.jupiter.api.Test;

/**
 * Analytic weights inside the engine: which routes a weighted specification takes, the facts of the trade
 * that every weighted fit must keep, and null draws on weighted variants. The numbers themselves are held
 * to R's {@code lm}/{@code glm} with sandwich by {@code reference.RWeightsReferenceTest} and
 * {@code reference.RWeightsGlmReferenceTest}; the data here are generated with a fixed seed.
 */
class AnalyticWeightsTest {
    private static final String[] REGIONS = {"a", "b", "c", "d", "e", "f"};

    /** Rows with a 0/1 group, a region, weights with zeros and missing cells, and the same weights times 3.7. */
    private static Table table(int rows, long seed) {
        SplittableRandom r = new SplittableRandom(seed);
        double[] y = new double[rows];
        double[] x = new double[rows];
        double[] c = new double[rows];
        double[] copy = new double[rows];
        double[] group = new double[rows];
        double[] w = new double[rows];
        double[] scaled = new double[rows];
        int[] region = new int[rows];
        for (int i = 0; i < rows; i++) {
            region[i] = r.nextInt(REGIONS.length);
            group[i] = r.nextInt(2);
            x[i] = r.nextGaussian() + 0.4 * region[i];
            c[i] = r.nextDouble() < 0.05 ? Double.NaN : r.nextGaussian() + 0.3 * x[i];
            copy[i] = 2 * c[i];
            y[i] = 1 + 0.5 * x[i] + 0.8 * group[i] + 0.3 * region[i] + r.nextGaussian() * (1 + Math.abs(x[i]));
            double u = r.nextDouble();
            w[i] = u < 0.05 ? 0 : u < 0.1 ? Double.NaN : 0.2 + 3 * r.nextDouble();
            scaled[i] = 3.7 * w[i];
        }
        List<Column> cols = new ArrayList<>();
        cols.add(new NumericColumn("y", y));
        cols.add(new NumericColumn("x", x));
        cols.add(new NumericColumn("c", c));
        cols.add(new NumericColumn("copy", copy));
        cols.add(new NumericColumn("group", group));
        cols.add(new NumericColumn("w", w));
        cols.add(new NumericColumn("w37", scaled));
        cols.add(new CategoricalColumn("region", region, List.of(REGIONS)));
        return new Table("households", cols);
    }

    private static Plan plan(String predictor, String weights, String errors, String absorb) {
        return new PlanReader(false).read("{\"data\": \"unused.csv\", \"decisions\": ["
                + "{\"name\": \"o\", \"kind\": \"outcome\", \"alternatives\": [{\"label\": \"y\", \"column\": \"y\"}]},"
                + "{\"name\": \"p\", \"kind\": \"predictor\", \"alternatives\": [{\"label\": \"k\", \"column\": \""
                + predictor + "\"}]},"
                + "{\"name\": \"c\", \"kind\": \"controls\", \"optional\": [\"c\"]},"
                + "{\"name\": \"fe\", \"kind\": \"absorb\", \"alternatives\": [{\"label\": \"none\", \"columns\": []}"
                + absorb + "]},"
                + "{\"name\": \"w\", \"kind\": \"weights\", \"alternatives\": [" + weights + "]},"
                + "{\"name\": \"e\", \"kind\": \"errors\", \"alternatives\": [" + errors + "]}]}", Path.of("."));
    }

    /**
     * A weighted variant takes the fourth-moment and per-cluster routes where the unweighted one takes them
     * (weighted by w^2 and by w); the values agree with the row pass.
     */
    @Test
    void weightedVariantsTakeTheWeightedRoutesWithoutRows() {
        Table t = table(3000, 21);
        Plan p = plan("x", "{\"label\": \"none\"}, {\"label\": \"w\", \"column\": \"w\"}", "\"HC1\", \"cluster:region\"", "");
        SpecificationModels models = new SpecificationModels(p, t);
        DataVariant unweighted = models.variant(new VariantKey(new int[0], 0, 0));
        DataVariant weighted = models.variant(new VariantKey(new int[0], 0, 1));
        for (DataVariant v : List.of(unweighted, weighted)) {
            v.expect(10_000_000L, Map.of("region", 10_000_000L), 2.0, null);
        }
        assertTrue(unweighted.useFourthMoments && unweighted.usesClusterMoments("region"),
                "the unweighted variant should take both moment routes at these counts");
        assertTrue(weighted.useFourthMoments && weighted.usesClusterMoments("region"),
                "a weighted variant takes the weighted fourth moments and cells");
        long[] choices = {0, 0, 1, 0, 1, 0};
        ObservedRows rows = new ObservedRows().of(weighted);
        KeyFit hc1 = new LeastSquares(true).fit(models.model(choices), rows);
        choices[5] = 1;
        KeyFit cluster = new LeastSquares(true).fit(models.model(choices), rows);
        assertEquals(VarianceRoute.FOURTH_MOMENTS, hc1.route());
        assertEquals(VarianceRoute.CLUSTER_CELLS, cluster.route());
        KeyFit rowPass = new LeastSquares(false).fit(models.model(choices), rows);
        assertEquals(VarianceRoute.ROW_PASS, rowPass.route());
        // the two routes sum the same products in different orders (common practice: a few ulps of the meat)
        assertEquals(rowPass.stdError(), cluster.stdError(), 1e-11 * rowPass.stdError());
        choices[5] = 0;
        KeyFit hc1RowPass = new LeastSquares(false).fit(models.model(choices), rows);
        assertEquals(hc1RowPass.stdError(), hc1.stdError(), 1e-11 * hc1RowPass.stdError());
    }

    /** A weighted specification with a collinear control takes the QR refit and gives the fit without it. */
    @Test
    void collinearControlTakesTheWeightedQrRefit() {
        Table t = table(2000, 22);
        String planText = "{\"data\": \"unused.csv\", \"decisions\": ["
                + "{\"name\": \"o\", \"kind\": \"outcome\", \"alternatives\": [{\"label\": \"y\", \"column\": \"y\"}]},"
                + "{\"name\": \"p\", \"kind\": \"predictor\", \"alternatives\": [{\"label\": \"x\", \"column\": \"x\"}]},"
                + "{\"name\": \"c\", \"kind\": \"controls\", \"required\": [\"c\"], \"optional\": [\"copy\"]},"
                + "{\"name\": \"w\", \"kind\": \"weights\", \"alternatives\": [{\"label\": \"w\", \"column\": \"w\"}]},"
                + "{\"name\": \"e\", \"kind\": \"errors\", \"alternatives\": [\"classical\", \"HC3\", \"cluster:region\"]}]}";
        Plan p = new PlanReader(false).read(planText, Path.of("."));
        SpecificationModels models = new SpecificationModels(p, t);
        ObservedRows rows = new ObservedRows().of(models.variant(new VariantKey(new int[0], -1, 0)));
        for (int e = 0; e < 3; e++) {
            KeyFit plain = new LeastSquares(true).fit(models.model(new long[] {0, 0, 0, 0, e}), rows);
            KeyFit refit = new LeastSquares(true).fit(models.model(new long[] {0, 0, 1, 0, e}), rows);
            assertFalse(plain.refitByQr());
            assertTrue(refit.refitByQr(), "the copy control should send the specification to the QR refit");
            assertEquals(plain.estimate(), refit.estimate(), 1e-12 * Math.abs(plain.estimate()));
            assertEquals(plain.stdError(), refit.stdError(), 1e-10 * plain.stdError());
            assertEquals(plain.nParams(), refit.nParams());
        }
    }

    /**
     * Weights proportional to a constant leave every estimate, standard error, df and R-squared unchanged
     * (common practice, no source): with and without absorbed effects, for every error type.
     */
    @Test
    void proportionalWeightsLeaveEveryEstimateUnchanged() {
        Table t = table(2500, 23);
        Plan p = plan("x", "{\"label\": \"w\", \"column\": \"w\"}, {\"label\": \"w37\", \"column\": \"w37\"}",
                "\"classical\", \"HC0\", \"HC1\", \"HC2\", \"HC3\", \"cluster:region\"",
                ", {\"label\": \"region\", \"columns\": [\"region\"]}");
        ResultTable r = new MultiverseRunner(1).run(p, t, RunProgress.SILENT, new AtomicBoolean()).results();
        int compared = 0;
        for (int slot = 0; slot < r.size(); slot++) {
            long spec = r.specIndex(slot);
            // the weights decision is second to last (6 error types): w37 is 6 specifications further on
            if (spec / 6 % 2 != 0) {
                continue;
            }
            int other = slotOf(r, spec + 6);
            assertEquals(r.status(slot), r.status(other));
            assertEquals(r.nObs(slot), r.nObs(other));
            assertEquals(r.df(slot), r.df(other));
            assertEquals(r.estimate(slot), r.estimate(other), 1e-12 * Math.abs(r.estimate(slot)), "spec " + spec);
            assertEquals(r.stdError(slot), r.stdError(other), 1e-11 * r.stdError(slot), "spec " + spec);
            assertEquals(r.r2(slot), r.r2(other), 1e-12, "spec " + spec);
            compared++;
        }
        assertEquals(24, compared);
    }

    /**
     * A survey-weighted mean is a weighted regression on an intercept: with a 0/1 key predictor the
     * intercept is the weighted mean sum w y / sum w of the group at 0 and the key the difference of the two
     * groups' weighted means (the weighted mean formula, computed here directly from the table).
     */
    @Test
    void surveyWeightedMeansAreTheInterceptAndTheDifference() {
        Table t = table(1500, 24);
        Plan p = plan("group", "{\"label\": \"w\", \"column\": \"w\"}", "\"classical\"", "");
        double[] y = ((NumericColumn) t.column("y")).values();
        double[] g = ((NumericColumn) t.column("group")).values();
        double[] w = ((NumericColumn) t.column("w")).values();
        double[] sum = new double[2];
        double[] total = new double[2];
        for (int i = 0; i < y.length; i++) {
            if (!Double.isNaN(w[i])) {
                sum[(int) g[i]] += w[i] * y[i];
                total[(int) g[i]] += w[i];
            }
        }
        double mean0 = sum[0] / total[0];
        double mean1 = sum[1] / total[1];
        FullFit fit = new FullFitter().fit(p, new SpecificationModels(p, t), 0);
        assertTrue(fit.ok(), fit.status());
        assertEquals(mean0, fit.coefficients().get(0).estimate(), 1e-12 * Math.abs(mean0), "intercept");
        assertEquals(mean1 - mean0, fit.key().estimate(), 1e-12 * Math.abs(mean1 - mean0), "key");
    }

    /**
     * A bootstrap draw of a weighted variant is the weighted fit of the resampled data: each row's weight
     * times its count. Checked against the observed fit of a table with every row repeated as drawn.
     */
    @Test
    void aBootstrapDrawMultipliesTheWeightsByTheDrawsCounts() {
        Table t = table(800, 25);
        Plan p = plan("x", "{\"label\": \"w\", \"column\": \"w\"}", "\"classical\", \"HC2\", \"cluster:region\"",
                ", {\"label\": \"region\", \"columns\": [\"region\"]}");
        SplittableRandom r = new SplittableRandom(26);
        int[] counts = new int[t.rowCount()];
        for (int i = 0; i < counts.length; i++) {
            counts[r.nextInt(counts.length)]++;
        }
        Table repeated = repeat(t, counts);
        SpecificationModels models = new SpecificationModels(p, t);
        SpecificationModels repeatedModels = new SpecificationModels(p, repeated);
        for (int absorb = 0; absorb < 2; absorb++) {
            VariantKey key = new VariantKey(new int[0], absorb, 0);
            ResampledVariant draw = new ResampledVariant(models.variant(key), 1);
            draw.bootstrap(counts, null);
            ObservedRows observed = new ObservedRows().of(repeatedModels.variant(key));
            for (int control = 0; control < 2; control++) {
                for (int e = 0; e < 3; e++) {
                    long[] choices = {0, 0, control, absorb, 0, e};
                    DrawFit d = draw.fit(models.model(choices));
                    KeyFit o = new LeastSquares(false).fit(repeatedModels.model(choices), observed);
                    String where = "absorb " + absorb + ", control " + control + ", errors " + e;
                    assertEquals(o.estimate(), d.estimate(), 1e-11 * Math.abs(o.estimate()), where);
                    assertEquals(o.stdError(), d.stdError(), 1e-10 * o.stdError(), where);
                    assertEquals(o.df(), d.df(), where);
                }
            }
        }
    }

    /** Rows whose weights are all zero leave a weighted specification without rows, and its status says why. */
    @Test
    void zeroWeightsAloneLeaveNoRowsAndTheStatusSaysSo() {
        Table t = table(300, 27);
        double[] zero = new double[t.rowCount()];
        List<Column> cols = new ArrayList<>(t.columns());
        cols.add(new NumericColumn("nobody", zero));
        Table withZero = new Table("households", cols);
        Plan p = plan("x", "{\"label\": \"none\"}, {\"label\": \"nobody\", \"column\": \"nobody\"}", "\"classical\"", "");
        ResultTable r = new MultiverseRunner(1).run(p, withZero, RunProgress.SILENT, new AtomicBoolean()).results();
        for (int slot = 0; slot < r.size(); slot++) {
            boolean weighted = r.specIndex(slot) % 2 == 1;
            assertEquals(weighted ? "too few rows: 0 rows complete on this specification's variables with positive weight"
                    : "ok", r.status(slot));
        }
    }

    private static Table repeat(Table t, int[] counts) {
        int n = 0;
        for (int c : counts) {
            n += c;
        }
        List<Column> cols = new ArrayList<>();
        for (Column c : t.columns()) {
            if (c instanceof NumericColumn num) {
                double[] v = new double[n];
                for (int i = 0, k = 0; i < counts.length; i++) {
                    for (int j = 0; j < counts[i]; j++) {
                        v[k++] = num.values()[i];
                    }
                }
                cols.add(new NumericColumn(c.name(), v));
            } else {
                CategoricalColumn cat = (CategoricalColumn) c;
                int[] v = new int[n];
                for (int i = 0, k = 0; i < counts.length; i++) {
                    for (int j = 0; j < counts[i]; j++) {
                        v[k++] = cat.codes()[i];
                    }
                }
                cols.add(new CategoricalColumn(c.name(), v, cat.levels()));
            }
        }
        return new Table("repeated", cols);
    }

    private static int slotOf(ResultTable r, long spec) {
        for (int slot = 0; slot < r.size(); slot++) {
            if (r.specIndex(slot) == spec) {
                return slot;
            }
        }
        throw new AssertionError("no slot for spec " + spec);
    }
}
