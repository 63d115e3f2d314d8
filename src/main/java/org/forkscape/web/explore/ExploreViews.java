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
     * @param summary   the run's summary.json as written (headline numbers and any further sections)
     */
    public record Layout(String analysis, String run, String title, double confidence, String outcome,
            String keyPredictor, int fitted, int unfitted, long inPlan, boolean sampled, List<FactorView> factors,
            List<RankedRun.GridRow> gridRows, Map<String, List<String>> required, List<ReasonCount> unfittedReasons,
            Map<String, Object> summary) {
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
     * @param groups the curve's groups when grouped by a factor
     */
    public record CurveView(int total, String drop, String sort, CurveSummary summary, Influence influence,
            List<DisplayOrder.Group> groups, Curve curve) {
    }

    /** One alternative of one decision as a specification uses it. */
    public record Choice(String decision, String kind, String label) {
    }

    /** The specification at a position of the curve, with the numbers of specifications.csv. */
    public record SpecificationView(int position, long spec, List<Choice> choices, double estimate, double stdError,
            double statistic, double df, double pValue, double ciLow, double ciHigh, int nObs, int nParams, double r2,
            double adjustedR2, double modelPValue, String status) {
    }

    /** A specification's full fit. */
    public record FullFitView(long spec, double confidence, List<Choice> choices, FullFit fit) {
    }
}
