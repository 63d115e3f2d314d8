package org.forkscape.infer;

import java.util.Arrays;
import org.forkscape.fit.Distributions;

/**
 * The three whole-curve statistics of Simonsohn, Simmons &amp; Nelson (2020, "Specification curve
 * analysis", Nature Human Behaviour 4, 1208-1214), computed the same way on the observed curve and on
 * every null draw: the median estimate, the share of specifications significant in the curve's dominant
 * sign, and the mean normal score (Stouffer), plus the smallest p-value for the min-p adjustment
 * (Westfall &amp; Young 1993, Resampling-Based Multiple Testing).
 *
 * @param fitted             specifications with an estimate in this curve
 * @param median             median estimate (NaN when none)
 * @param dominantSign       +1 when the median is zero or positive, -1 otherwise
 * @param significant        specifications with p &lt; alpha whose estimate has the dominant sign
 * @param shareSignificant   {@code significant / fitted}
 * @param meanZ              mean of the signed normal scores ({@link NormalScores#ofT})
 * @param minP               smallest two-sided p-value
 */
public record CurveStatistics(int fitted, double median, int dominantSign, int significant, double shareSignificant,
        double meanZ, double minP) {

    /**
     * @param estimate the first {@code n} entries are read
     * @param stdError likewise
     * @param df       likewise
     * @param scratch  at least {@code n} long; overwritten
     */
    public static CurveStatistics of(double[] estimate, double[] stdError, double[] df, int n, double alpha,
            double[] scratch) {
        double[] p = new double[n];
        double[] z = new double[n];
        score(estimate, stdError, df, n, p, z);
        return ofScored(estimate, estimate, p, z, n, alpha, scratch);
    }

    /**
     * Each specification's two-sided p-value and signed normal score ({@link NormalScores#ofTwoSidedP}), computed
     * once per draw for every curve that holds it.
     *
     * @param p written: the first {@code n} entries
     * @param z written: the first {@code n} entries
     */
    static void score(double[] estimate, double[] stdError, double[] df, int n, double[] p, double[] z) {
        for (int i = 0; i < n; i++) {
            double t = estimate[i] / stdError[i];
            p[i] = Distributions.twoSidedP(t, df[i]);
            z[i] = NormalScores.ofTwoSidedP(p[i], t);
        }
    }

    /**
     * The statistics from each specification's p-value and normal score ({@link #score}), with the median and
     * the dominant sign read off {@code value}: the estimates as fitted, or their values on another scale (the t
     * statistic, the partial correlation), which have the sign of the estimate, so that significance in the
     * dominant sign and the normal scores are the same on every scale.
     *
     * @param value    the first {@code n} entries are read
     * @param estimate likewise (its sign decides significance in the dominant sign)
     * @param scratch  at least {@code n} long; holds the first {@code n} values sorted on return
     */
    static CurveStatistics ofScored(double[] value, double[] estimate, double[] p, double[] z, int n, double alpha,
            double[] scratch) {
        if (n == 0) {
            return new CurveStatistics(0, Double.NaN, 1, 0, Double.NaN, Double.NaN, Double.NaN);
        }
        System.arraycopy(value, 0, scratch, 0, n);
        Arrays.sort(scratch, 0, n);
        double median = median(scratch, n);
        int sign = median >= 0 ? 1 : -1;
        int significant = 0;
        double zSum = 0;
        double minP = 1;
        for (int i = 0; i < n; i++) {
            if (p[i] < alpha && (sign > 0 ? estimate[i] > 0 : estimate[i] < 0)) {
                significant++;
            }
            minP = Math.min(minP, p[i]);
            zSum += z[i];
        }
        return new CurveStatistics(n, median, sign, significant, (double) significant / n, zSum / n, minP);
    }

    /** The median of the first n entries of a sorted array. */
    static double median(double[] sorted, int n) {
        return n % 2 == 1 ? sorted[n / 2] : (sorted[n / 2 - 1] + sorted[n / 2]) / 2;
    }

    public String dominantSignName() {
        return dominantSign > 0 ? "positive" : "negative";
    }
}
