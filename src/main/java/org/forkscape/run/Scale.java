package org.forkscape.run;

import java.util.Locale;

/**
 * The scales on which key estimates can be shown and summarised. Estimates are comparable as fitted only
 * within one {@link UnitGroups comparable group} (one outcome alternative and one key-predictor coding);
 * the other three scales are unit-free and common to every specification.
 *
 * <ul>
 * <li>{@link #AS_FITTED}: the coefficient in the units of its outcome per unit of its key predictor.</li>
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
 * monotone, so it excludes zero exactly when the interval of b does.</li>
 * <li>{@link #T_STATISTIC}: estimate / standard error. No interval: the statistic is itself the test, and
 * a specification is significant where |t| exceeds its own critical value.</li>
 * </ul>
 */
public enum Scale {
    AS_FITTED("fitted", "as fitted"),
    STANDARDIZED("standardized", "standardized coefficient"),
    PARTIAL_CORRELATION("partial", "partial correlation"),
    T_STATISTIC("t", "t statistic");

    private final String word;
    private final String title;

    Scale(String word, String title) {
        this.word = word;
        this.title = title;
    }

    /** The spelling in requests and JSON: {@code fitted}, {@code standardized}, {@code partial}, {@code t}. */
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

    /** Whether values of different comparable groups can share one axis and one statistic. */
    public boolean unitFree() {
        return this != AS_FITTED;
    }

    /** Whether the scale has an interval to draw. */
    public boolean hasInterval() {
        return this != T_STATISTIC;
    }

    /** The key estimate of a fitted slot on this scale. */
    public double value(ResultTable r, int slot) {
        return switch (this) {
            case AS_FITTED -> r.estimate(slot);
            case STANDARDIZED -> r.standardizedEstimate(slot);
            case PARTIAL_CORRELATION -> partialCorrelation(r.statistic(slot), r.df(slot));
            case T_STATISTIC -> r.statistic(slot);
        };
    }

    /** The lower end of the slot's interval on this scale; NaN for the t statistic. */
    public double low(ResultTable r, int slot, double confidence) {
        return bound(r, slot, r.ciLow(slot, confidence));
    }

    /** The upper end of the slot's interval on this scale; NaN for the t statistic. */
    public double high(ResultTable r, int slot, double confidence) {
        return bound(r, slot, r.ciHigh(slot, confidence));
    }

    private double bound(ResultTable r, int slot, double bound) {
        return switch (this) {
            case AS_FITTED -> bound;
            // sd(x) / sd(y) > 0, so the ends keep their order
            case STANDARDIZED -> bound * (r.standardizedEstimate(slot) / r.estimate(slot));
            case PARTIAL_CORRELATION -> partialCorrelation(bound / r.stdError(slot), r.df(slot));
            case T_STATISTIC -> Double.NaN;
        };
    }

    /** t / sqrt(t^2 + df). */
    public static double partialCorrelation(double t, double df) {
        return t / Math.sqrt(t * t + df);
    }
}
