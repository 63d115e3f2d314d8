package org.forkscape.fit;

import java.util.List;

/**
 * Every coefficient of one specification, with the fit statistics: what a reader sees when they open a
 * single specification. Undefined numbers are NaN.
 *
 * @param coefficients the intercept (absent when fixed effects are absorbed), the controls and the key
 *                     predictor, in that order; a control dropped as collinear is absent and named in
 *                     {@code note}
 * @param errors       the standard error type, as spelled in plans
 * @param df           degrees of freedom of the t reference distribution (N - K, or G - 1 with clusters)
 * @param nObs         rows used
 * @param nParams      coefficients K, absorbed fixed-effect levels and intercept included
 * @param absorbed     the absorbed fixed-effect column (several joined by ", "), or {@code ""}
 * @param absorbedLevels what the absorbed effects count in K: with one column its levels present in the rows,
 *                     with two the rank of their dummies (0 without absorption)
 * @param absorbedDimensions how many columns are absorbed (0 without absorption)
 * @param clusters     clusters in the rows for cluster-robust errors (0 otherwise)
 * @param r2           R-squared
 * @param adjustedR2   1 - (1 - R2)(N - 1)/(N - K)
 * @param modelF       F statistic of the model against the intercept-only model (classical, as is usual)
 * @param modelPValue  its p-value
 * @param status       {@code ok}, or why there is no fit
 * @param note         what was adjusted (dropped collinear controls), or {@code ""}
 */
public record FullFit(List<Coefficient> coefficients, String errors, double df, int nObs, int nParams, String absorbed,
        int absorbedLevels, int absorbedDimensions, int clusters, double r2, double adjustedR2, double modelF, double modelPValue,
        String status, String note) {

    public FullFit {
        coefficients = List.copyOf(coefficients);
    }

    public boolean ok() {
        return "ok".equals(status);
    }

    /** The key predictor's coefficient, or {@code null} when there is no fit. */
    public Coefficient key() {
        return coefficients.stream().filter(Coefficient::key).findFirst().orElse(null);
    }

    /**
     * One coefficient.
     *
     * @param term      what it multiplies: {@code (intercept)}, a control column (a dummy as
     *                  {@code column=level}), or the key predictor's column
     * @param role      {@code intercept}, {@code control} or {@code key}
     * @param ciLow     lower bound of the interval at the plan's confidence
     * @param ciHigh    upper bound
     */
    public record Coefficient(String term, String role, double estimate, double stdError, double statistic,
            double pValue, double ciLow, double ciHigh) {
        public boolean key() {
            return "key".equals(role);
        }
    }
}
