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
        return of(estimate, estimate, stdError, df, n, alpha, scratch);
    }

    /**
     * As {@link #of(double[], double[], double[], double[], int, double, double[])}, with the median and the
     * dominant sign read off {@code value}: each specification's estimate on another scale (its t statistic,
     * its partial correlation), which has the sign of its estimate, so that significance in the dominant sign
     * and the normal scores are the same as on the scale as fitted.
     *
     * @param value   the first {@code n} entries are read
     * @param scratch at least {@code n} long; holds the first {@code n} values sorted on return
     */
    public static CurveStatistics of(double[] value, double[] estimate, double[] stdError, double[] df, int n,
            double alpha, double[] scratch) {
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
            double t = estimate[i] / stdError[i];
            double p = Distributions.twoSidedP(t, df[i]);
            if (p < alpha && (sign > 0 ? estimate[i] > 0 : estimate[i] < 0)) {
                significant++;
            }
            minP = Math.min(minP, p);
            zSum += NormalScores.ofTwoSidedP(p, t);
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
