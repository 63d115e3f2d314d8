package org.forkscape.run;

import java.util.Arrays;
import java.util.LinkedHashMap;
import java.util.Map;

/**
 * Headline numbers of a set of fitted specifications on one scale: how many have a value on it, how many
 * are left out because the scale is not defined for their model ({@link Scale#defined}), the median with
 * its quartiles (type 7 of Hyndman &amp; Fan 1996, "Sample quantiles in statistical packages", The American
 * Statistician 50(4), R's default), and the shares positive and significant in each sign at level alpha,
 * all over those with a value. Undefined numbers are NaN.
 */
public record ScaleSummary(int count, int leftOut, double median, double lowerQuartile, double upperQuartile,
        double sharePositive, double shareSignificantPositive, double shareSignificantNegative) {

    /** @param slots fitted slots of {@code r} */
    public static ScaleSummary of(ResultTable r, int[] slots, Scale scale, double alpha) {
        double[] v = new double[slots.length];
        int n = 0;
        int positive = 0;
        int sigPositive = 0;
        int sigNegative = 0;
        for (int s : slots) {
            double value = scale.value(r, s);
            if (Double.isNaN(value)) {
                continue;
            }
            v[n++] = value;
            boolean significant = r.pValue(s) < alpha;
            if (value > 0) {
                positive++;
                if (significant) {
                    sigPositive++;
                }
            } else if (value < 0 && significant) {
                sigNegative++;
            }
        }
        v = Arrays.copyOf(v, n);
        Arrays.sort(v);
        double f = n;
        return new ScaleSummary(n, slots.length - n, quantile(v, 0.5), quantile(v, 0.25), quantile(v, 0.75),
                n == 0 ? Double.NaN : positive / f, n == 0 ? Double.NaN : sigPositive / f,
                n == 0 ? Double.NaN : sigNegative / f);
    }

    static double quantile(double[] sorted, double p) {
        if (sorted.length == 0) {
            return Double.NaN;
        }
        double h = (sorted.length - 1) * p;
        int lo = (int) Math.floor(h);
        int hi = Math.min(lo + 1, sorted.length - 1);
        return sorted[lo] + (h - lo) * (sorted[hi] - sorted[lo]);
    }

    public Map<String, Object> toJson() {
        Map<String, Object> m = new LinkedHashMap<>();
        m.put("specifications", count);
        m.put("left_out", leftOut);
        m.put("median", Json.number(median));
        m.put("lower_quartile", Json.number(lowerQuartile));
        m.put("upper_quartile", Json.number(upperQuartile));
        m.put("share_positive", Json.number(sharePositive));
        m.put("share_significant_positive", Json.number(shareSignificantPositive));
        m.put("share_significant_negative", Json.number(shareSignificantNegative));
        return m;
    }
}
