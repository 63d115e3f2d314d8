package org.forkscape.infer;

import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import org.forkscape.run.Scale;
import org.forkscape.run.UnitGroups;

/**
 * The curves on which the null draws are judged without mixing units: one per comparable group as fitted
 * ({@link UnitGroups}: one outcome alternative, one key-predictor alternative and, with a model decision,
 * one model), then the t statistic and the partial correlation, which are unit-free and so common to every
 * specification with a value on them. The standardized coefficient and the average marginal effect are not
 * among them: a draw re-estimates the coefficient and its standard error only, not the standard deviations
 * on the resampled rows nor the marginal effect.
 *
 * <p>Each curve fixes, from the observed curve of {@code n} specifications, up to {@link #MAX_RANKS} rank
 * positions spread evenly from the lowest to the highest ({@code round(k (n - 1) / (K - 1))}), at which
 * every draw's sorted values are kept, so that the null band can follow the curve rank by rank while the
 * storage stays bounded for any number of specifications. A draw in which some specifications of a curve
 * could not be fitted has fewer values; its value at rank r of n is then its type-7 quantile at r / (n - 1)
 * (Hyndman &amp; Fan 1996, "Sample quantiles in statistical packages", The American Statistician 50(4)),
 * which is exactly its r-th sorted value when it has all n. The band of the null curves, rank by rank, is the
 * way the observed curve is read against its null draws in Simonsohn, Simmons &amp; Nelson (2020,
 * "Specification curve analysis", Nature Human Behaviour 4, 1208-1214).
 */
final class ScaleCurves {
    /** Rank positions kept per curve and draw at most. */
    static final int MAX_RANKS = 200;

    /**
     * One curve: a comparable group as fitted ({@code scale} {@link Scale#AS_FITTED}, {@code group} set), or the
     * t statistic or partial correlation over every specification with a value ({@code group} null).
     *
     * @param observed the observed curve's specifications on it
     * @param ranks    the rank positions kept, 0-based, ascending
     */
    record Curve(Scale scale, UnitGroups.Group group, int observed, int[] ranks) {
    }

    private final List<Curve> curves;
    private final int[] groupCurveOf;
    private final int[] curveOfGroupSpec;
    private final int groupCurves;

    private ScaleCurves(List<Curve> curves, int[] groupCurveOf, int[] curveOfGroupSpec) {
        this.curves = curves;
        this.groupCurves = (int) curves.stream().filter(c -> c.group() != null).count();
        this.groupCurveOf = groupCurveOf;
        this.curveOfGroupSpec = curveOfGroupSpec;
    }

    /** The curves of the fitted specifications of {@code variants}. */
    static ScaleCurves of(RunVariants variants) {
        UnitGroups units = UnitGroups.of(variants.run());
        int size = variants.size();
        int[] perGroup = new int[units.groups().size()];
        int[] groupOfSpec = new int[size];
        int partial = 0;
        for (int i = 0; i < size; i++) {
            int slot = variants.slot(i);
            groupOfSpec[i] = units.groupOf(slot);
            perGroup[groupOfSpec[i]]++;
            if (Double.isFinite(variants.run().results().df(slot))) {
                partial++;
            }
        }
        List<Curve> curves = new ArrayList<>();
        int[] groupCurveOf = new int[perGroup.length];
        for (UnitGroups.Group g : units.groups()) {
            groupCurveOf[g.id()] = -1;
            if (perGroup[g.id()] > 0) {
                groupCurveOf[g.id()] = curves.size();
                curves.add(new Curve(Scale.AS_FITTED, g, perGroup[g.id()], ranks(perGroup[g.id()])));
            }
        }
        curves.add(new Curve(Scale.T_STATISTIC, null, size, ranks(size)));
        if (partial > 0) {
            curves.add(new Curve(Scale.PARTIAL_CORRELATION, null, partial, ranks(partial)));
        }
        int[] curveOfSpec = new int[size];
        for (int i = 0; i < size; i++) {
            curveOfSpec[i] = groupCurveOf[groupOfSpec[i]];
        }
        return new ScaleCurves(List.copyOf(curves), groupCurveOf, curveOfSpec);
    }

    /** Up to {@link #MAX_RANKS} positions from 0 to n - 1, evenly spread, both ends included. */
    static int[] ranks(int n) {
        int k = Math.min(MAX_RANKS, n);
        int[] r = new int[k];
        for (int j = 1; j < k; j++) {
            // round(j (n - 1) / (k - 1)) in integers: no rounding differs between machines
            r[j] = (int) ((2L * j * (n - 1) + (k - 1)) / (2L * (k - 1)));
        }
        return r;
    }

    List<Curve> curves() {
        return curves;
    }

    /** The curve of a comparable group as fitted ({@link UnitGroups.Group#id()}), -1 when none of it is fitted. */
    int curveOfGroup(int group) {
        return group < groupCurveOf.length ? groupCurveOf[group] : -1;
    }

    /** One worker's arrays, reused for every draw. */
    static final class Workspace {
        private final double[] value;
        private final double[] estimate;
        private final double[] p;
        private final double[] z;
        private final double[] sorted;
        private final int[] order;
        private final int[] start;

        Workspace(ScaleCurves curves, int size) {
            value = new double[size];
            estimate = new double[size];
            p = new double[size];
            z = new double[size];
            sorted = new double[size];
            order = new int[size];
            start = new int[curves.groupCurves + 1];
        }
    }

    /**
     * Every curve's statistics and its values at the kept ranks, for one draw or the observed curve.
     *
     * @param estimate the first {@code m} entries are read: the fitted specifications' estimates (for a
     *                 bootstrap draw, centred on the observed ones), in the fixed order of the specifications
     * @param error    their standard errors
     * @param df       their degrees of freedom (infinite on a standard normal reference)
     * @param p        their two-sided p-values ({@link CurveStatistics#score})
     * @param z        their signed normal scores (likewise)
     * @param spec     their indices in the {@link RunVariants}
     * @param w        overwritten
     */
    DrawCurve[] evaluate(double[] estimate, double[] error, double[] df, double[] p, double[] z, int[] spec, int m,
            double alpha, Workspace w) {
        DrawCurve[] out = new DrawCurve[curves.size()];
        // the group curves: a stable counting sort of the entries by curve, then each curve's run in turn
        Arrays.fill(w.start, 0);
        for (int j = 0; j < m; j++) {
            w.start[curveOfGroupSpec[spec[j]] + 1]++;
        }
        for (int c = 0; c < groupCurves; c++) {
            w.start[c + 1] += w.start[c];
        }
        int[] next = w.start.clone();
        for (int j = 0; j < m; j++) {
            w.order[next[curveOfGroupSpec[spec[j]]]++] = j;
        }
        for (int c = 0; c < groupCurves; c++) {
            int n = 0;
            for (int k = w.start[c]; k < w.start[c + 1]; k++) {
                int j = w.order[k];
                w.estimate[n] = estimate[j];
                w.p[n] = p[j];
                w.z[n] = z[j];
                n++;
            }
            out[c] = curve(c, w.estimate, w.estimate, n, alpha, w);
        }
        for (int c = groupCurves; c < curves.size(); c++) {
            boolean partial = curves.get(c).scale() == Scale.PARTIAL_CORRELATION;
            int n = 0;
            for (int j = 0; j < m; j++) {
                if (partial && !Double.isFinite(df[j])) {
                    continue;
                }
                double t = estimate[j] / error[j];
                w.value[n] = partial ? Scale.partialCorrelation(t, df[j]) : t;
                w.estimate[n] = estimate[j];
                w.p[n] = p[j];
                w.z[n] = z[j];
                n++;
            }
            out[c] = curve(c, w.value, w.estimate, n, alpha, w);
        }
        return out;
    }

    private DrawCurve curve(int c, double[] value, double[] estimate, int n, double alpha, Workspace w) {
        CurveStatistics stats = CurveStatistics.ofScored(value, estimate, w.p, w.z, n, alpha, w.sorted);
        Curve curve = curves.get(c);
        int[] ranks = curve.ranks();
        double[] at = new double[ranks.length];
        for (int k = 0; k < ranks.length; k++) {
            at[k] = n == 0 ? Double.NaN : valueAtRank(w.sorted, n, ranks[k], curve.observed());
        }
        return new DrawCurve(stats, at);
    }

    /** The value at rank {@code rank} of {@code observed}, read off {@code n} sorted values (type 7). */
    static double valueAtRank(double[] sorted, int n, int rank, int observed) {
        if (n == observed || observed == 1) {
            return sorted[Math.min(rank, n - 1)];
        }
        double h = (double) rank * (n - 1) / (observed - 1);
        int lo = (int) Math.floor(h);
        int hi = Math.min(lo + 1, n - 1);
        return sorted[lo] + (h - lo) * (sorted[hi] - sorted[lo]);
    }

    /**
     * One curve of one draw (or of the observed run).
     *
     * @param statistics its median (on its scale), share significant, mean normal score and smallest p
     * @param atRanks    its sorted values at the curve's kept ranks; NaN when nothing of it was fitted
     */
    record DrawCurve(CurveStatistics statistics, double[] atRanks) {
    }
}
