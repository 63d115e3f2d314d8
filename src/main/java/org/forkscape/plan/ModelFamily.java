package org.forkscape.plan;

import java.util.List;

/**
 * The model a specification fits: least squares, or a generalized linear model fitted by maximum
 * likelihood (Nelder &amp; Wedderburn 1972, "Generalized linear models", Journal of the Royal Statistical
 * Society A 135(3)) with a binomial outcome under the logit or probit link, or a count under the Poisson
 * log link. The alternatives of a {@code model} decision; {@link #OLS} when a plan has none.
 */
public enum ModelFamily {
    OLS("ols", "least squares"),
    LOGIT("logit", "logistic regression"),
    PROBIT("probit", "probit regression"),
    POISSON("poisson", "Poisson regression");

    /**
     * Absorbed fixed-effect levels above which a plan with a generalized linear model is refused: each level
     * is a coefficient of its own (eliminated exactly in every step, so the cost is small, but every level
     * keeps a row of weighted column means per worker).
     */
    public static final int MAX_ABSORBED_LEVELS = 10_000;

    private final String spelling;
    private final String words;

    ModelFamily(String spelling, String words) {
        this.spelling = spelling;
        this.words = words;
    }

    /** The plan spelling, also written in specifications.csv. */
    public String spelling() {
        return spelling;
    }

    /** The model in words, for messages and the explorer. */
    public String words() {
        return words;
    }

    /** Whether the outcome must be coded 0/1. */
    public boolean binary() {
        return this == LOGIT || this == PROBIT;
    }

    public boolean leastSquares() {
        return this == OLS;
    }

    public static List<String> spellings() {
        return java.util.Arrays.stream(values()).map(ModelFamily::spelling).toList();
    }
}
