package org.forkscape.infer;

import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.SplittableRandom;
import org.forkscape.data.CategoricalColumn;
import org.forkscape.data.Column;
import org.forkscape.data.NumericColumn;
import org.forkscape.data.Table;
import org.forkscape.plan.Plan;
import org.forkscape.plan.PlanReader;
import org.forkscape.run.MultiverseRunner;
import org.forkscape.run.RunProgress;
import org.forkscape.run.RunResult;

/**
 * Simulated data sets for the inference tests (generated from a seed, not a demo scenario): an outcome
 * with two codings, a key predictor with two codings, three optional controls, a categorical cluster
 * column, and a planted effect of chosen size; {@link #table} also has a 0/1 outcome, whether y > 0.
 */
final class Scenarios {
    /** Two outcomes x two predictor codings x all subsets of three controls = 32 specifications. */
    static final String PLAN = """
            {"data": "simulated.csv",
             "decisions": [
               {"name": "outcome", "kind": "outcome", "alternatives": [
                  {"label": "score", "column": "y"}, {"label": "score (standardized)", "column": "y2"}]},
               {"name": "key", "kind": "predictor", "alternatives": [
                  {"label": "raw", "column": "x"}, {"label": "standardized", "column": "x", "transform": "standardize"}]},
               {"name": "controls", "kind": "controls", "optional": ["a", "b", "c"]}
             ]}
            """;

    private Scenarios() {
    }

    /**
     * @param n      rows
     * @param effect coefficient of x in y (0 for pure noise)
     * @param seed   generator seed
     * @param groups number of clusters in column "g"
     */
    static Table table(int n, double effect, long seed, int groups) {
        SplittableRandom r = new SplittableRandom(seed);
        double[] x = new double[n];
        double[] y = new double[n];
        double[] y2 = new double[n];
        double[] a = new double[n];
        double[] b = new double[n];
        double[] c = new double[n];
        int[] g = new int[n];
        for (int i = 0; i < n; i++) {
            a[i] = gaussian(r);
            b[i] = gaussian(r);
            c[i] = gaussian(r);
            x[i] = gaussian(r);
            double noise = gaussian(r);
            y[i] = effect * x[i] + 0.5 * a[i] - 0.3 * b[i] + noise;
            y2[i] = y[i] + 0.7 * gaussian(r);
            g[i] = r.nextInt(groups);
        }
        List<String> levels = new ArrayList<>();
        for (int k = 0; k < groups; k++) {
            levels.add(String.format("g%03d", k));
        }
        // a binary outcome for the generalized linear models, from the draws already made
        double[] pass = new double[n];
        for (int i = 0; i < n; i++) {
            pass[i] = y[i] > 0 ? 1 : 0;
        }
        List<Column> cols = List.of(new NumericColumn("y", y), new NumericColumn("y2", y2), new NumericColumn("x", x),
                new NumericColumn("a", a), new NumericColumn("b", b), new NumericColumn("c", c),
                new CategoricalColumn("g", g, levels), new NumericColumn("pass", pass));
        return new Table("simulated.csv", cols);
    }

    /**
     * Pure noise with a clustered design: {@code clusters} groups of {@code size} rows (column "g"), in
     * which the key predictor x and the outcomes y and y2 (a second measure, correlated 0.6 with y) each
     * have the intra-cluster correlation {@code icc}; two controls "a" and "b" vary by row only. Nothing
     * depends on x.
     */
    static Table clusteredTable(int clusters, int size, double icc, long seed) {
        SplittableRandom r = new SplittableRandom(seed);
        int n = clusters * size;
        double[] x = new double[n];
        double[] y = new double[n];
        double[] y2 = new double[n];
        double[] a = new double[n];
        double[] b = new double[n];
        int[] g = new int[n];
        double shared = Math.sqrt(icc);
        double own = Math.sqrt(1 - icc);
        List<String> levels = new ArrayList<>();
        for (int k = 0; k < clusters; k++) {
            levels.add(String.format("g%03d", k));
            double gx = gaussian(r);
            double gy = gaussian(r);
            double gy2 = gaussian(r);
            for (int i = k * size; i < (k + 1) * size; i++) {
                g[i] = k;
                x[i] = shared * gx + own * gaussian(r);
                y[i] = shared * gy + own * gaussian(r);
                y2[i] = 0.6 * y[i] + 0.8 * (shared * gy2 + own * gaussian(r));
                a[i] = gaussian(r);
                b[i] = gaussian(r);
            }
        }
        List<Column> cols = List.of(new NumericColumn("y", y), new NumericColumn("y2", y2), new NumericColumn("x", x),
                new NumericColumn("a", a), new NumericColumn("b", b), new CategoricalColumn("g", g, levels));
        return new Table("simulated.csv", cols);
    }

    static double gaussian(SplittableRandom r) {
        // Box-Muller (Box & Muller 1958, Annals of Mathematical Statistics 29(2))
        double u = 1 - r.nextDouble();
        return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * r.nextDouble());
    }

    static Plan plan(String json) {
        return new PlanReader(false).read(json, Path.of("."));
    }

    static RunResult run(String planJson, Table table) {
        return new MultiverseRunner(1).run(plan(planJson), table, RunProgress.SILENT, null);
    }

    static NullDrawResult nullDraws(RunResult run, int draws, NullMethod method, long seed, String cluster,
            int threads) {
        return NullDraws.run(RunVariants.of(run), new NullDrawSettings(draws, method, seed, cluster, false), threads,
                RunProgress.SILENT, null);
    }
}
