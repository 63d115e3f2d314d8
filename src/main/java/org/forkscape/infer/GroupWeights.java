package org.forkscape.infer;

import org.apache.commons.math3.distribution.NormalDistribution;

/**
 * Weights over a group of comparable specifications (the same outcome on the same rows) and what they
 * summarise.
 *
 * <p>Log-likelihood of a least-squares fit with normal errors at the maximum: l = -n/2 (log(2 pi RSS /
 * n) + 1). Sala-i-Martin (1997, "I just ran two million regressions", American Economic Review 87(2))
 * weights each model by its likelihood, w_j = L_j / sum L, and reports CDF(0) of the key coefficient in
 * two ways: normal, Phi(0; sum w_j b_j, sum w_j s_j^2), and non-normal, sum w_j Phi(0; b_j, s_j^2); the
 * unweighted versions use w_j = 1/m. BIC weights (Raftery 1995, "Bayesian model selection in social
 * research", Sociological Methodology 25): BIC_j = -2 l_j + K_j log n, w_j proportional to exp(-BIC_j /
 * 2); the model-averaged estimate is sum w_j b_j, its standard error sqrt(sum w_j (s_j^2 + b_j^2) -
 * (sum w_j b_j)^2), and a control's posterior inclusion probability is the total weight of the models
 * that include it.
 *
 * @param likelihoodWeights Sala-i-Martin's weights, summing to 1
 * @param bicWeights        BIC weights, summing to 1
 * @param cdfNormal         weighted normal CDF(0)
 * @param cdfNonNormal      weighted non-normal CDF(0)
 * @param cdfNormalUnweighted    the normal version with equal weights
 * @param cdfNonNormalUnweighted the non-normal version with equal weights
 * @param bicEstimate       BIC-weighted estimate
 * @param bicStdError       its model-averaged standard error
 */
public record GroupWeights(double[] likelihoodWeights, double[] bicWeights, double cdfNormal, double cdfNonNormal,
        double cdfNormalUnweighted, double cdfNonNormalUnweighted, double bicEstimate, double bicStdError) {
    private static final NormalDistribution STANDARD = new NormalDistribution(null, 0, 1);

    /** Maximised normal log-likelihood of a least-squares fit with residual sum of squares rss on n rows. */
    public static double logLikelihood(double rss, int n) {
        return -n / 2.0 * (Math.log(2 * Math.PI * rss / n) + 1);
    }

    /** Schwarz's criterion: -2 l + K log n. */
    public static double bic(double rss, int n, int k) {
        return -2 * logLikelihood(rss, n) + k * Math.log(n);
    }

    /**
     * @param estimate key estimates b_j of the m specifications
     * @param stdError their standard errors s_j
     * @param rss      residual sums of squares
     * @param n        rows (the same in a comparable group)
     * @param k        coefficients K_j
     */
    public static GroupWeights of(double[] estimate, double[] stdError, double[] rss, int[] n, int[] k) {
        double[] logL = new double[estimate.length];
        for (int j = 0; j < logL.length; j++) {
            logL[j] = logLikelihood(rss[j], n[j]);
        }
        return ofLikelihoods(estimate, stdError, logL, n, k);
    }

    /**
     * The same from the members' maximised log-likelihoods (for a generalized linear model -deviance / 2,
     * which differs from the log-likelihood by a constant of the outcome and rows alone, the same for every
     * member of a group, so the weights are those of the log-likelihoods).
     */
    public static GroupWeights ofLikelihoods(double[] estimate, double[] stdError, double[] logL, int[] n, int[] k) {
        int m = estimate.length;
        double[] minusHalfBic = new double[m];
        for (int j = 0; j < m; j++) {
            minusHalfBic[j] = logL[j] - k[j] * Math.log(n[j]) / 2;
        }
        double[] lw = normalizedExp(logL);
        double[] bw = normalizedExp(minusHalfBic);
        double[] equal = new double[m];
        java.util.Arrays.fill(equal, 1.0 / m);
        double bicMean = 0;
        double bicSecond = 0;
        for (int j = 0; j < m; j++) {
            bicMean += bw[j] * estimate[j];
            bicSecond += bw[j] * (stdError[j] * stdError[j] + estimate[j] * estimate[j]);
        }
        return new GroupWeights(lw, bw, normalCdf(lw, estimate, stdError), mixtureCdf(lw, estimate, stdError),
                normalCdf(equal, estimate, stdError), mixtureCdf(equal, estimate, stdError), bicMean,
                Math.sqrt(Math.max(0, bicSecond - bicMean * bicMean)));
    }

    /** exp(a_j - max a) / sum, which avoids overflow and underflow of the raw exponentials. */
    static double[] normalizedExp(double[] a) {
        double max = Double.NEGATIVE_INFINITY;
        for (double v : a) {
            max = Math.max(max, v);
        }
        double[] w = new double[a.length];
        double sum = 0;
        for (int j = 0; j < a.length; j++) {
            w[j] = Math.exp(a[j] - max);
            sum += w[j];
        }
        for (int j = 0; j < a.length; j++) {
            w[j] /= sum;
        }
        return w;
    }

    private static double normalCdf(double[] w, double[] b, double[] s) {
        double mean = 0;
        double variance = 0;
        for (int j = 0; j < w.length; j++) {
            mean += w[j] * b[j];
            variance += w[j] * s[j] * s[j];
        }
        return STANDARD.cumulativeProbability(-mean / Math.sqrt(variance));
    }

    private static double mixtureCdf(double[] w, double[] b, double[] s) {
        double cdf = 0;
        for (int j = 0; j < w.length; j++) {
            cdf += w[j] * STANDARD.cumulativeProbability(-b[j] / s[j]);
        }
        return cdf;
    }
}
