package org.forkscape.fit;

import org.forkscape.plan.ModelFamily;

/**
 * The key coefficient of one specification and the fit statistics reported beside it. Undefined numbers
 * are NaN; {@code status} is {@link FitStatus#OK} or the reason there is no estimate, completed by
 * {@code detail}; {@code note} says what was adjusted (for example a dropped collinear control) and may be
 * empty.
 *
 * @param estimate      the key coefficient
 * @param stdError      its standard error of the requested type
 * @param df            degrees of freedom of the t reference distribution (N - K, or G - 1 for clusters);
 *                      infinite for the standard normal reference of a generalized linear model
 * @param nObs          rows used
 * @param nParams       coefficients K, absorbed fixed-effect levels and intercept included
 * @param r2            R-squared (about the overall mean, as with explicit dummies); McFadden's pseudo-R-squared
 *                      for a generalized linear model
 * @param rss           residual sum of squares; the residual deviance of a generalized linear model
 * @param modelF        statistic of the overall F test against the intercept-only model, on K - 1 and N - K df
 *                      (least squares only; NaN otherwise)
 * @param refitByQr     true when the precision guard refit this specification from its rows
 * @param route         how the standard error was computed
 * @param sdRatio       sd(key predictor) / sd(outcome) over the rows used, each about its overall mean (with
 *                      absorbed fixed effects too, as R's {@code sd()} on those rows gives them); NaN without
 *                      an estimate
 * @param family        the model fitted
 * @param effect        the average marginal effect of the key predictor on the outcome's scale (the
 *                      coefficient itself for least squares)
 * @param effectStdError its delta-method standard error with the specification's covariance
 * @param likelihoodRatioP p-value of the likelihood-ratio test against the intercept-only (or
 *                      fixed-effects-only) model, for a generalized linear model; NaN for least squares
 */
public record KeyFit(double estimate, double stdError, double df, int nObs, int nParams, double r2, double rss,
        double modelF, FitStatus status, String detail, String note, boolean refitByQr, VarianceRoute route,
        double sdRatio, ModelFamily family, double effect, double effectStdError, double likelihoodRatioP) {

    /** A least-squares fit: its effect is the coefficient, with the coefficient's standard error. */
    public KeyFit(double estimate, double stdError, double df, int nObs, int nParams, double r2, double rss,
            double modelF, FitStatus status, String detail, String note, boolean refitByQr, VarianceRoute route,
            double sdRatio) {
        this(estimate, stdError, df, nObs, nParams, r2, rss, modelF, status, detail, note, refitByQr, route, sdRatio,
                ModelFamily.OLS, estimate, stdError, Double.NaN);
    }

    /** This least-squares fit with the standard error, df, status, detail, note and route given. */
    KeyFit withError(double stdError, double df, FitStatus status, String detail, String note, VarianceRoute route) {
        return new KeyFit(estimate, stdError, df, nObs, nParams, r2, rss, modelF, status, detail, note, refitByQr, route,
                sdRatio);
    }

    public static KeyFit failed(FitStatus status, String detail, int nObs, int nParams) {
        return failed(ModelFamily.OLS, status, detail, nObs, nParams);
    }

    public static KeyFit failed(ModelFamily family, FitStatus status, String detail, int nObs, int nParams) {
        return new KeyFit(Double.NaN, Double.NaN, Double.NaN, nObs, nParams, Double.NaN, Double.NaN, Double.NaN,
                status, detail, "", false, VarianceRoute.NONE, Double.NaN, family, Double.NaN, Double.NaN, Double.NaN);
    }

    /**
     * The standardized coefficient, b sd(x) / sd(y) over the specification's own rows: the coefficient of
     * the same regression with the outcome and the key predictor in standard deviations (Cohen, Cohen,
     * West &amp; Aiken 2003, Applied Multiple Regression/Correlation Analysis for the Behavioral Sciences,
     * 3rd ed., Lawrence Erlbaum, chapter 3). NaN without an estimate.
     */
    public double standardizedEstimate() {
        return estimate * sdRatio;
    }

    /** The status as written: its sentence, and "; " and the note when there is one. */
    public String statusText() {
        String sentence = status.describe(detail);
        return note.isEmpty() ? sentence : sentence + "; " + note;
    }

    /**
     * p-value of the overall F test (computed on demand: the incomplete beta is not free), or of the
     * likelihood-ratio test for a generalized linear model.
     */
    public double modelPValue() {
        return family.leastSquares() ? Distributions.fUpperP(modelF, nParams - 1, nObs - nParams) : likelihoodRatioP;
    }

    public boolean ok() {
        return status == FitStatus.OK;
    }
}
