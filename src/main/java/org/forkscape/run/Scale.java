package org.forkscape.run;

import java.util.Locale;
import org.forkscape.fit.Distributions;

/**
 * The scales on which key estimates can be shown and summarised. Estimates are comparable as fitted only
 * within one {@link UnitGroups comparable group} (one outcome alternative, one key-predictor coding and,
 * when the plan has a model decision, one model); average marginal effects within one outcome alternative
 * and key-predictor coding, whatever the model; the other three scales are unit-free and common to every
 * specification on which they are defined.
 *
 * <ul>
 * <li>{@link #AS_FITTED}: the coefficient in the units of its outcome per unit of its key predictor, on the
 * model's link scale (log-odds for a logit, the normal quantile for a probit, the log of the mean for a
 * Poisson model).</li>
 * <li>{@link #AVERAGE_MARGINAL_EFFECT}: the mean over the specification's rows of dE[y]/dx (or, for a 0/1 key
 * predictor, the mean change in E[y] from 0 to 1; Cameron &amp; Trivedi 2005, Microeconometrics, Cambridge
 * University Press, section 14.3), in units of the outcome itself per unit of the key predictor, so that a
 * logit, a probit and a least-squares fit of one 0/1 outcome share it. For least squares it is the
 * coefficient. Its interval is effect &plusmn; critical(df) &times; its delta-method standard error, on the
 * specification's own reference distribution (t with df, or the standard normal).</li>
 * <li>{@link #STANDARDIZED}: b sd(x) / sd(y) over the specification's own rows (Cohen, Cohen, West &amp;
 * Aiken 2003, Applied Multiple Regression/Correlation Analysis for the Behavioral Sciences, 3rd ed.,
 * chapter 3): the coefficient with outcome and key predictor in standard deviations. Its interval is the
 * interval of b times the same ratio, which is what the regression on the standardized columns gives.</li>
 * <li>{@link #PARTIAL_CORRELATION}: t / sqrt(t^2 + df), which for classical errors is exactly the
 * correlation of outcome and key predictor after both are residualised on the controls and fixed effects
 * (Greene 2012, Econometric Analysis, 7th ed., chapter 3), and the usual partial-correlation effect size of
 * meta-analyses of regressions (Stanley &amp; Doucouliagos 2012, Meta-Regression Analysis in Economics and
 * Business, Routledge); with robust errors it is the partial correlation their t statistic implies. Its
 * interval is the interval of b mapped through the same function, (bound / se) / sqrt((bound / se)^2 + df):
 * monotone, so it excludes zero exactly when the interval of b does. Not defined (NaN) on the standard
 * normal reference of a generalized linear model: it has no residual degrees of freedom, and with df
 * infinite the formula would read every estimate as 0.</li>
 * <li>{@link #T_STATISTIC}: estimate / standard error (a z statistic for a generalized linear model). No interval: the statistic is itself the test, and
 * a specification is significant where |t| exceeds its own critical value.</li>
 * </ul>
 */
public enum Scale {
    AS_FITTED("fitted", "as fitted"),
    AVERAGE_MARGINAL_EFFECT("effect", "average marginal effect"),
    STANDARDIZED("standardized", "standardized coefficient"),
    PARTIAL_CORRELATION("partial", "partial correlation"),
    T_STATISTIC("t", "t statistic");

    private final String word;
    private final String title;

    Scale(String word, String title) {
        this.word = word;
        this.title = title;
    }

    /**
     * The spelling in requests and JSON: {@code fitted}, {@code effect}, {@code standardized}, {@code partial},
     * {@code t}.
     */
    public String word() {
        return word;
    }

    /** The scale in words, for titles. */
    public String title() {
        return title;
    }

    /** The scale a word names, or {@code null} when it names none. */
    public static Scale named(String word) {
        String w = word.strip().toLowerCase(Locale.ROOT);
        for (Scale s : values()) {
            if (s.word.equals(w)) {
                return s;
            }
        }
        return null;
    }

    /**
     * Whether values of different comparable groups can share one axis and one statistic; the others are
     * shown and summarised one group of {@link UnitGroups#of(RunResult, Scale)} at a time.
     */
    public boolean unitFree() {
        return this != AS_FITTED && this != AVERAGE_MARGINAL_EFFECT;
    }

    /** Whether the scale has an interval to draw. */
    public boolean hasInterval() {
        return this != T_STATISTIC;
    }

    /** The key estimate of a fitted slot on this scale; NaN where the scale is not defined for its model. */
    public double value(ResultTable r, int slot) {
        return switch (this) {
            case AS_FITTED -> r.estimate(slot);
            case AVERAGE_MARGINAL_EFFECT -> r.effect(slot);
            case STANDARDIZED -> r.family(slot).leastSquares() ? r.standardizedEstimate(slot) : Double.NaN;
            case PARTIAL_CORRELATION -> partialCorrelation(r.statistic(slot), r.df(slot));
            case T_STATISTIC -> r.statistic(slot);
        };
    }

    /** Whether a fitted slot has a value on this scale (the unit-free ones other than t: least squares only). */
    public boolean defined(ResultTable r, int slot) {
        return !Double.isNaN(value(r, slot));
    }

    /** The lower end of the slot's interval on this scale; NaN for the t statistic. */
    public double low(ResultTable r, int slot, double confidence) {
        if (this == AVERAGE_MARGINAL_EFFECT) {
            return r.effect(slot) - effectHalfWidth(r, slot, confidence);
        }
        return bound(r, slot, r.ciLow(slot, confidence));
    }

    /** The upper end of the slot's interval on this scale; NaN for the t statistic. */
    public double high(ResultTable r, int slot, double confidence) {
        if (this == AVERAGE_MARGINAL_EFFECT) {
            return r.effect(slot) + effectHalfWidth(r, slot, confidence);
        }
        return bound(r, slot, r.ciHigh(slot, confidence));
    }

    /** critical(df) x the effect's standard error, on the reference distribution of the slot's coefficient. */
    private static double effectHalfWidth(ResultTable r, int slot, double confidence) {
        return Distributions.critical(r.df(slot), 1 - confidence) * r.effectStdError(slot);
    }

    private double bound(ResultTable r, int slot, double bound) {
        return switch (this) {
            case AS_FITTED, AVERAGE_MARGINAL_EFFECT -> bound;
            // sd(x) / sd(y) > 0, so the ends keep their order
            case STANDARDIZED -> bound * (value(r, slot) / r.estimate(slot));
            case PARTIAL_CORRELATION -> partialCorrelation(bound / r.stdError(slot), r.df(slot));
            case T_STATISTIC -> Double.NaN;
        };
    }

    /** t / sqrt(t^2 + df); NaN when df is infinite (the standard normal reference), where it is not defined. */
    public static double partialCorrelation(double t, double df) {
        if (Double.isInfinite(df)) {
            return Double.NaN;
        }
        return t / Math.sqrt(t * t + df);
    }
}
