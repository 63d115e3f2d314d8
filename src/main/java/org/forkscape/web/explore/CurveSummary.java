package org.forkscape.web.explore;

/**
 * The headline numbers of a set of specifications on its ranking's scale: how many, the median estimate
 * with its interquartile range, the extreme bounds (Leamer 1983, "Let's take the con out of econometrics",
 * American Economic Review 73(1): the lowest lower and highest upper interval bound; NaN on the t scale,
 * which has no interval), and the shares with a positive estimate and significant in each sign at the
 * plan's level.
 * Quartiles interpolate between order statistics (Hyndman &amp; Fan 1996, "Sample quantiles in
 * statistical packages", The American Statistician 50(4), definition 7). Undefined numbers are NaN.
 */
public record CurveSummary(int count, double median, double lowerQuartile, double upperQuartile, double min,
        double max, double lowestBound, double highestBound, double sharePositive, double shareSignificantPositive,
        double shareSignificantNegative) {

    /** From kept ranks in ascending order, whose estimates are therefore sorted: no sort needed. */
    public static CurveSummary of(RankedRun run, int[] kept) {
        int n = kept.length;
        if (n == 0) {
            return new CurveSummary(0, Double.NaN, Double.NaN, Double.NaN, Double.NaN, Double.NaN, Double.NaN,
                    Double.NaN, Double.NaN, Double.NaN, Double.NaN);
        }
        double[] e = run.estimates();
        byte[] sig = run.significances();
        int positive = 0;
        int sigPositive = 0;
        int sigNegative = 0;
        double lowest = Double.POSITIVE_INFINITY;
        double highest = Double.NEGATIVE_INFINITY;
        for (int k : kept) {
            lowest = Math.min(lowest, run.low(k));
            highest = Math.max(highest, run.high(k));
            if (e[k] > 0) {
                positive++;
            }
            if (sig[k] > 0) {
                sigPositive++;
            } else if (sig[k] < 0) {
                sigNegative++;
            }
        }
        double f = n;
        return new CurveSummary(n, quantile(e, kept, 0.5), quantile(e, kept, 0.25), quantile(e, kept, 0.75),
                e[kept[0]], e[kept[n - 1]], lowest, highest, positive / f, sigPositive / f, sigNegative / f);
    }

    /** Type-7 quantile of {@code values} at the sorted positions {@code sortedRanks}. */
    static double quantile(double[] values, int[] sortedRanks, double p) {
        double h = (sortedRanks.length - 1) * p;
        int lo = (int) Math.floor(h);
        int hi = Math.min(lo + 1, sortedRanks.length - 1);
        double a = values[sortedRanks[lo]];
        return a + (h - lo) * (values[sortedRanks[hi]] - a);
    }
}
