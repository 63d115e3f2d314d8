package org.forkscape.reference;

/**
 * How closely Forkscape's fit of one specification must match a reference computed far past convergence,
 * by the model the specification uses. The GLM figures rest on the engine's stopping rule (a relative change
 * in deviance below 1e-10 and a Newton decrement d'I d of the step below 1e-8 for logit and Poisson, 1e-15
 * for probit) and on {@code src/test/resources/reference/glm/stopping-gap.txt}, in which
 * {@code src/test/r/glm-reference.R} measures the largest relative change of each quantity, over every GLM
 * specification of the committed plans, between the reference and glm stopped by that rule (epsilon 1e-10,
 * then scoring steps until the decrement is below the threshold), each evaluated at the coefficients it
 * stopped at.
 */
enum GlmTolerance {
    /**
     * Least squares: 1e-9 relative, as {@link RLmSandwichReferenceTest} (double-precision solves of
     * well-conditioned designs that differ only by rounding).
     */
    OLS(1e-9),
    /**
     * Logit, probit and Poisson: 1e-7 relative. A decrement below 1e-8 bounds the last Newton step (logit and
     * Poisson: canonical links, quadratic convergence) at 1e-4 standard errors, leaving about its square; a
     * decrement below 1e-15 bounds probit's last scoring step (linear convergence) at 3.2e-8 standard errors,
     * leaving no more than that at a rate up to 1/2. With |z| at least 1.1 in every committed plan, an error
     * in standard errors is at most as large relative to the estimate. Measured: at most 1.5e-8 relative in
     * the key estimate, 1.4e-8 in the marginal effect, 2.2e-9 in the classical error (all probit; logit and
     * Poisson below 5e-10).
     */
    GLM(1e-7);

    /**
     * Deviance and McFadden's R-squared (whose log-likelihoods differ from minus half the deviance by a
     * constant of the data): measured deviance gaps are below 2.3e-15; 1e-9 for both allows for the
     * R-squared's division when the fit improves little on its null.
     */
    static final double LIKELIHOOD = 1e-9;
    /**
     * The likelihood-ratio test's p-value: its statistic is a difference of deviances, d ln p / d LR is about
     * -1/2, and the chi-square tail differs between R's pchisq and Commons Math's regularized gamma by
     * rounding. 1e-8 relative.
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
            case "probit":
            case "poisson":
                return GLM;
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
