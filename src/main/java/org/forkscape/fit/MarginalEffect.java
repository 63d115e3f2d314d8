package org.forkscape.fit;

/**
 * The average marginal effect of the key predictor of a fitted generalized linear model and its gradient in the
 * coefficients, for the delta method (Bartus 2005, "Estimation of marginal effects using margeff", Stata Journal
 * 5(3); Cameron &amp; Trivedi 2005, Microeconometrics, Cambridge University Press, section 14.3): for a key
 * predictor recorded as 0 and 1 alone, the mean over the rows of mu(eta_i at 1) - mu(eta_i at 0); otherwise the
 * mean of d mu / d x = mu'(eta_i) b. With prior weights the mean is the weighted mean, sum w_i (...) / sum w_i
 * (the effect averaged over the population the weights stand for). The gradient in the fixed effects is given
 * per row (each row's share of the gradient in its levels' coefficients, before division by the weight total),
 * so that one absorbed column sums it per level and several columns read it as a combination of the rows.
 */
final class MarginalEffect {
    private MarginalEffect() {
    }

    /**
     * @param eta            the fit's linear predictors, per row
     * @param mu             its means, per row
     * @param kept           per column, whether the fit kept it
     * @param recorded       the key predictor as recorded, by variant row
     * @param twoValued      whether the key predictor is recorded as 0 and 1 alone in these rows
     * @param b              the key coefficient
     * @param rowGradient    out: per row, its share of the gradient in its fixed effects (not divided by the
     *                       weight total)
     * @param columnGradient out: the gradient in the columns (divided by the weight total; 0 where dropped); must
     *                       hold zeros on entry
     * @return the average marginal effect
     */
    static double of(GlmFamily f, GlmRows rows, double[] eta, double[] mu, boolean[] kept, double[] recorded,
            boolean twoValued, double b, double[] rowGradient, double[] columnGradient) {
        double[] s = sums(f, rows, eta, mu, recorded, twoValued, b, rowGradient, columnGradient);
        double total = s[1];
        for (int j = 0; j < rows.p; j++) {
            columnGradient[j] = kept[j] ? columnGradient[j] / total : 0;
        }
        return twoValued ? s[0] / total : b * s[0] / total;
    }

    /**
     * The effect's sums over {@code rows}, which add over parts of the rows: returns {the effect's sum, the rows'
     * weight total}, sets each row's {@code rowGradient} and adds the rows' terms into {@code columnGradient}
     * (neither divided by the total; see {@link #of} for the parameters).
     */
    static double[] sums(GlmFamily f, GlmRows rows, double[] eta, double[] mu, double[] recorded, boolean twoValued,
            double b, double[] rowGradient, double[] columnGradient) {
        int n = rows.n;
        int p = rows.p;
        int key = p - 1;
        double sum = 0;
        double[] x = rows.x;
        double[] prior = rows.prior;
        double total = 0;
        for (int i = 0, at = 0; i < n; i++, at += p) {
            double e = eta[i];
            double w = prior == null ? 1 : prior[i];
            total += w;
            if (twoValued) {
                double raw = recorded[rows.source[i]];
                double eta1 = e + b * (1 - raw);
                double eta0 = e - b * raw;
                // the row's own value gives back its fitted mean (eta + b 0 is eta): one mean computed, not two
                double m1 = raw == 1 ? mu[i] : f.mean(eta1);
                double m0 = raw == 0 ? mu[i] : f.mean(eta0);
                double s1 = w * f.meanSlope(eta1, m1);
                double s0 = w * f.meanSlope(eta0, m0);
                sum += w * (m1 - m0);
                rowGradient[i] = s1 - s0;
                for (int j = 0; j < key; j++) {
                    columnGradient[j] += (s1 - s0) * x[at + j];
                }
                columnGradient[key] += s1 * (x[at + key] + 1 - raw) - s0 * (x[at + key] - raw);
            } else {
                double mean = mu[i];
                double unitSlope = f.meanSlope(e, mean);
                double slope = w * unitSlope;
                double curvature = w * f.meanCurvature(e, mean, unitSlope) * b;
                sum += slope;
                rowGradient[i] = curvature;
                for (int j = 0; j < p; j++) {
                    columnGradient[j] += curvature * x[at + j];
                }
                columnGradient[key] += slope;
            }
        }
        return new double[] {sum, total};
    }

    /** The rows' prior weight total (their count when unweighted), summed in row order. */
    static double total(GlmRows rows) {
        if (rows.prior == null) {
            return rows.n;
        }
        double total = 0;
        for (int i = 0; i < rows.n; i++) {
            total += rows.prior[i];
        }
        return total;
    }

    /** The rows whose key value ({@code recorded} by {@link GlmRows#source} row) is neither 0 nor 1; adds over parts. */
    static int otherThanZeroOrOne(GlmRows rows, double[] recorded) {
        int count = 0;
        for (int i = 0; i < rows.n; i++) {
            double x = recorded[rows.source[i]];
            if (!(x == 0 || x == 1)) {
                count++;
            }
        }
        return count;
    }
}
