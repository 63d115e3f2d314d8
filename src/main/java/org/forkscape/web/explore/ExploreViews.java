package org.forkscape.web.explore;

import java.util.List;
import java.util.Map;
import org.forkscape.fit.FullFit;

/** The JSON shapes of the explorer's API (documented in README, "JSON API"). */
public final class ExploreViews {
    private ExploreViews() {
    }

    /**
     * Everything about a run that does not change with the filter.
     *
     * @param factors   the filterable factors; their ids are the F of {@code drop=F.L}
     * @param gridRows  the choice grid's rows, top to bottom
     * @param required  per controls decision, the controls in every specification
     * @param scales    the scales the curve can be drawn on
     * @param groups    the comparable groups of units, the {@code group} of a curve as fitted (also in
     *                  {@code scales})
     * @param unitsDiffer whether fitted specifications come from more than one group as fitted
     * @param defaultScale the scale the curve is drawn on when not told
     * @param defaultGroup the group it shows as fitted when not told: the first with a fitted specification
     * @param outcomeFactor   the factor whose level a group fixes to its outcome alternative
     * @param predictorFactor the factor whose level a group fixes to its key-predictor alternative
     * @param modelFactor     the factor whose level a group as fitted fixes to its model, -1 without a model
     *                        decision
     * @param summary   the run's summary.json as written (headline numbers and any further sections)
     */
    public record Layout(String analysis, String run, String title, double confidence, String outcome,
            String keyPredictor, int fitted, int unfitted, long inPlan, boolean sampled, List<FactorView> factors,
            List<RankedRun.GridRow> gridRows, Map<String, List<String>> required, List<ReasonCount> unfittedReasons,
            List<ScaleView> scales, List<GroupView> groups, boolean unitsDiffer, String defaultScale, int defaultGroup,
            int outcomeFactor, int predictorFactor, int modelFactor, Map<String, Object> summary) {
    }

    /**
     * A scale: its request word, its title, whether it is common to every group, whether it has intervals,
     * (for the common ones) its unit in words, (for the others) its groups, whether they are more than one
     * with fitted specifications and the one shown by default, and how many fitted specifications have no
     * value on it.
     */
    public record ScaleView(String id, String title, boolean unitFree, boolean interval, String unit,
            List<GroupView> groups, boolean unitsDiffer, int defaultGroup, int leftOut) {
    }

    /**
     * A comparable group: one outcome alternative with one key-predictor alternative (and, as fitted with a
     * model decision, one model), in words, and its unit in words.
     */
    public record GroupView(int id, String outcome, String predictor, String model, String title, int fitted,
            String unit) {
    }

    /** A factor and, per level, how many fitted specifications use it. */
    public record FactorView(int id, String name, String decision, boolean control, List<String> levels,
            List<Integer> counts) {
    }

    public record ReasonCount(String reason, int count) {
    }

    /**
     * The set after a filter, drawn in the chosen order.
     *
     * @param total  fitted specifications in the run
     * @param scale  the scale of every estimate, interval and statistic in the view
     * @param group  the comparable group shown (as fitted or of the effects), -1 on a unit-free scale
     * @param unit   one unit of the scale, in words (the y axis)
     * @param leftOut fitted specifications the filter keeps that have no value on the scale, left out of the set
     * @param groups the curve's groups when grouped by a factor
     * @param counts per factor id and level, how many specifications of the set use that alternative
     */
    public record CurveView(int total, String drop, String sort, String scale, int group, String unit, int leftOut,
            CurveSummary summary, Influence influence, List<DisplayOrder.Group> groups, Curve curve, int[][] counts) {
    }

    /**
     * @param spec     the specification (1-based, as in specifications.csv)
     * @param position its position in the curve as shown, -1 when the shown set does not hold it
     */
    public record PositionView(long spec, int position) {
    }

    /** One alternative of one decision as a specification uses it. */
    public record Choice(String decision, String kind, String label) {
    }

    /**
     * The specification at a position of the curve, with the numbers of specifications.csv and its values
     * and intervals on the average-marginal-effect, standardized and partial-correlation scales (NaN where
     * not defined for its model).
     *
     * @param model the model's plan spelling ({@code ols}, {@code logit}, {@code probit}, {@code poisson})
     * @param df    {@code null} (infinite) for the standard normal reference of a generalized linear model
     */
    public record SpecificationView(int position, long spec, List<Choice> choices, String model, double estimate,
            double stdError, double statistic, double df, double pValue, double ciLow, double ciHigh, double effect,
            double effectStdError, double effectLow, double effectHigh, double standardized, double standardizedLow,
            double standardizedHigh, double partialCorrelation, double partialLow, double partialHigh, int nObs,
            int nParams, double r2, double adjustedR2, double modelPValue, double deviance, String status) {
    }

    /**
     * A specification's full fit, with what the run recorded for it beside the coefficients: its model, the
     * average marginal effect of the key predictor with its standard error and interval, and the deviance.
     *
     * @param model      the model's plan spelling
     * @param modelTitle the model in words ("logistic regression")
     */
    public record FullFitView(long spec, double confidence, List<Choice> choices, String model, String modelTitle,
            double effect, double effectStdError, double effectLow, double effectHigh, double deviance, FullFit fit) {
    }
}
