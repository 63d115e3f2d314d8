package org.forkscape.fit;

import org.apache.commons.math3.special.Gamma;

/**
 * The log-likelihoods of a fitted generalized linear model and of its null model (the intercept, or the
 * fixed effects, alone: each level's mean outcome), and the null deviance, from the fit's deviance and
 * sums per level, without a pass of logarithms over the rows for the binary families. For a 0/1 outcome
 * log L = -D / 2; for counts log L = S - D / 2 with the saturated log-likelihood S = sum (y log y - y -
 * log Gamma(y + 1)) (McCullagh &amp; Nelder 1989, section 2.3). With prior weights each row's terms are
 * multiplied by its weight (for counts, R's {@code logLik} of a weighted Poisson {@code glm}; for 0/1
 * outcomes log L = -D / 2 with the weighted deviance, not R's {@code logLik}, which treats binomial prior
 * weights as numbers of trials).
 *
 * @param logLik     log L at the estimate
 * @param nullLogLik log L0 of the null model
 * @param nullDeviance its deviance
 */
record GlmLikelihoods(double logLik, double nullLogLik, double nullDeviance) {

    /**
     * What the likelihoods take from the rows alone, whatever the model's columns: the saturated
     * log-likelihood and the null model's deviance.
     */
    record NullModel(double saturated, double nullDeviance) {
        /** The likelihoods of a fit of residual deviance {@code deviance} on these rows. */
        GlmLikelihoods at(double deviance) {
            return new GlmLikelihoods(saturated - deviance / 2, saturated - nullDeviance / 2, nullDeviance);
        }
    }

    /**
     * The null model of a fit beside two or more absorbed columns, whose fitted means are not the levels' means:
     * its deviance {@code nullDeviance} comes from its own iterations ({@link SeveralEffectsIrls} with no
     * columns), the saturated log-likelihood from the rows.
     */
    static NullModel ofDeviance(GlmRows rows, GlmFamily family, double nullDeviance) {
        double saturated = 0;
        if (family == GlmFamily.POISSON) {
            for (int i = 0; i < rows.n; i++) {
                double w = rows.prior == null ? 1 : rows.prior[i];
                double y = rows.y[i];
                if (y > 0) {
                    saturated += w * (y * Math.log(y) - y - Gamma.logGamma(y + 1));
                }
            }
        }
        return new NullModel(saturated, nullDeviance);
    }

    static NullModel nullModel(GlmRows rows, GlmFamily family) {
        int levels = rows.levels;
        if (rows.heldInParts != null) {
            return nullModel(java.util.Arrays.copyOfRange(rows.startSums(family), 2 * levels, 4 * levels + 2), levels,
                    family);
        }
        return nullModel(nullSums(rows, family, new double[2 * levels + 2]), levels, family);
    }

    /**
     * Into {@code out}, the sums the null model needs, which add over parts of the rows: per level the
     * (weighted) outcome's sum, then per level the weight, then for counts the weighted sums of y log y
     * and of the saturated log-likelihood's terms. Returns out.
     */
    static double[] nullSums(GlmRows rows, GlmFamily family, double[] out) {
        int n = rows.n;
        int levels = rows.levels;
        boolean counts = family == GlmFamily.POISSON;
        double[] prior = rows.prior;
        for (int i = 0; i < n; i++) {
            // with prior weights every sum is weighted (each level's null mean is its weighted mean)
            double w = prior == null ? 1 : prior[i];
            double y = rows.y[i];
            out[rows.level[i]] += w * y;
            out[levels + rows.level[i]] += w;
            if (counts && y > 0) {
                double l = y * Math.log(y);
                out[2 * levels] += w * l;
                out[2 * levels + 1] += w * (l - y - Gamma.logGamma(y + 1));
            }
        }
        return out;
    }

    private static NullModel nullModel(double[] sums, int levels, GlmFamily family) {
        boolean counts = family == GlmFamily.POISSON;
        double nullDeviance = counts ? 2 * sums[2 * levels] : 0;
        for (int l = 0; l < levels; l++) {
            double s = sums[l];
            double count = sums[levels + l];
            double m = s / count;
            if (counts) {
                nullDeviance -= s > 0 ? 2 * s * Math.log(m) : 0;
            } else {
                nullDeviance -= 2 * ((s > 0 ? s * Math.log(m) : 0) + (count - s > 0 ? (count - s) * Math.log1p(-m) : 0));
            }
        }
        return new NullModel(sums[2 * levels + 1], nullDeviance);
    }
}
