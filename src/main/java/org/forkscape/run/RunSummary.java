package org.forkscape.run;

import java.util.Arrays;
import java.util.LinkedHashMap;
import java.util.Map;

/**
 * The headline numbers of a run: how many specifications, how many fitted, the median estimate and the
 * shares positive and significant in each sign at the plan's level (1 - confidence).
 */
public record RunSummary(int specifications, int fitted, int failed, double medianEstimate, double sharePositive,
        double shareSignificantPositive, double shareSignificantNegative) {

    public static RunSummary of(ResultTable r, double alpha) {
        double[] estimates = new double[r.size()];
        int fitted = 0;
        int positive = 0;
        int sigPositive = 0;
        int sigNegative = 0;
        for (int slot = 0; slot < r.size(); slot++) {
            if (!r.fitted(slot)) {
                continue;
            }
            double b = r.estimate(slot);
            estimates[fitted++] = b;
            boolean significant = r.pValue(slot) < alpha;
            if (b > 0) {
                positive++;
                if (significant) {
                    sigPositive++;
                }
            } else if (b < 0 && significant) {
                sigNegative++;
            }
        }
        double median = Double.NaN;
        if (fitted > 0) {
            double[] e = Arrays.copyOf(estimates, fitted);
            Arrays.sort(e);
            median = fitted % 2 == 1 ? e[fitted / 2] : (e[fitted / 2 - 1] + e[fitted / 2]) / 2;
        }
        double f = fitted;
        return new RunSummary(r.size(), fitted, r.size() - fitted, median, fitted == 0 ? Double.NaN : positive / f,
                fitted == 0 ? Double.NaN : sigPositive / f, fitted == 0 ? Double.NaN : sigNegative / f);
    }

    /** The summary.json keys of this part, in their documented order. */
    public Map<String, Object> toJson() {
        Map<String, Object> m = new LinkedHashMap<>();
        m.put("specifications", specifications);
        m.put("fitted", fitted);
        m.put("failed", failed);
        m.put("median_estimate", Json.number(medianEstimate));
        m.put("share_positive", Json.number(sharePositive));
        m.put("share_significant_positive", Json.number(shareSignificantPositive));
        m.put("share_significant_negative", Json.number(shareSignificantNegative));
        return m;
    }
}
