package org.forkscape.reference;

/**
 * How closely Forkscape's fit of one specification must match a reference computed far past convergence,
 * by the model the specification uses. Each figure rests on {@code src/test/resources/reference/glm/stopping-gap.txt},
 * which {@code src/test/r/glm-reference.R} measures: the largest relative change of each quantity, over every
 * GLM specification of the committed plans, between R's glm stopped at the engine's rule (relative deviance
 * change below 1e-10) and at 1e-14, each evaluated at the coefficients it stopped at.
 */
enum GlmTolerance {
    /**
     * Least squares: 1e-9 relative, as {@link RLmSandwichReferenceTest} (double-precision solves of
     * well-conditioned designs that differ only by rounding).
     */
    OLS(1e-9),
    /**
     * Logit and Poisson with the log link are canonical: scoring is Newton's method and converges
     * quadratically, so the step after a 1e-10 change in deviance is already below rounding in most fits;
     * measured: at most 5.0e-10 relative in the key estimate, 1.6e-10 in its classical error, 3.5e-10 in
     * the marginal effect. 1e-7 leaves a margin of 200.
     */
    CANONICAL(1e-7),
    /**
     * Probit is not canonical: scoring with the expected information converges linearly, and a 1e-10 change
     * in deviance still leaves a coefficient some 6e-6 of its standard error from the maximum; measured: at
     * most 2.7e-6 relative in the key estimate, 2.5e-6 in the marginal effect, 4.9e-7 in the classical
     * error. 1e-5 leaves a margin of about 4 and is what the stopping rule allows; an engine that iterated
     * further would meet {@link #CANONICAL}'s 1e-7 here too.
     */
    PROBIT(1e-5);

    /**
     * Deviance and McFadden's R-squared: the stopping rule bounds the deviance's own relative change at 1e-10,
     * and the measured gaps are below 6.1e-13 and 9.0e-12; 1e-9 for both.
     */
    static final double LIKELIHOOD = 1e-9;
    /**
     * The likelihood-ratio test's p-value: the statistic is a difference of log-likelihoods known to about
     * 1.4e-10 (deviance 230 times 6.1e-13), and d ln p / d LR is about -1/2; the chi-square tail itself
     * differs between R's pchisq and Commons Math's regularized gamma by rounding. 1e-8 relative.
     */
    static final double MODEL_P = 1e-8;

    final double relative;

    GlmTolerance(double relative) {
        this.relative = relative;
    }

    static GlmTolerance of(String model) {
        switch (model) {
            case "ols":
                return OLS;
            case "logit":
            case "poisson":
                return CANONICAL;
            case "probit":
                return PROBIT;
            default:
                throw new IllegalArgumentException("no tolerance for model " + model);
        }
    }

    /**
     * A two-sided normal or t p-value magnifies the relative error of its statistic: d ln p / d ln |z| is
     * -|z| phi(z) / Phi(-|z|), at most 1 + z^2 in size, and the statistic's relative error is at most that of
     * the estimate plus that of the standard error.
     */
    double pValue(double statistic) {
        return 2 * relative * (1 + statistic * statistic);
    }
}
