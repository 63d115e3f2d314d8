package org.forkscape.report;

import java.util.ArrayList;
import java.util.List;
import org.forkscape.run.Scale;
import org.forkscape.web.explore.CurveSummary;
import org.forkscape.web.explore.RankedRun;
import org.forkscape.web.explore.ShownSet;
import tools.jackson.databind.JsonNode;

/**
 * The headline numbers for print, on one scale: per comparable group (one row on a unit-free scale) the
 * numbers summary.json's {@code scales} section recorded (specifications, median, quartiles, shares
 * positive and significant by sign), the group's extreme bounds (Leamer 1983, the lowest lower and the
 * highest upper interval bound) from the explorer's {@link CurveSummary} of the group's set, and, when the
 * run has null draws, the three joint tests with their draws from summary.json's {@code null} section.
 *
 * @param pooledJointTests whether the joint tests pool estimates in different units (summary.json's
 *                         {@code pooled_as_fitted} names {@code null}): their table says so
 */
public record HeadlineTable(Scale scale, double confidence, List<Row> rows, List<JointTest> jointTests,
        boolean pooledJointTests) {

    /** One comparable group, or the whole set on a unit-free scale ({@code group} -1). */
    public record Row(int group, String title, String unit, long specifications, double median, double lowerQuartile,
            double upperQuartile, double sharePositive, double shareSignificantPositive,
            double shareSignificantNegative, double lowestBound, double highestBound) {
    }

    /**
     * One joint test of the null draws: the observed statistic, the draws at least as extreme and the draws
     * compared; p is their share.
     */
    public record JointTest(String name, String key, double observed, int exceedances, int draws, double p) {
    }

    /** From the run's summary.json and its ranking on {@code ranked.scale()}. */
    public static HeadlineTable of(JsonNode summary, RankedRun ranked) {
        Scale scale = ranked.scale();
        JsonNode scales = summary.path("scales");
        List<Row> rows = new ArrayList<>();
        if (scale.unitFree()) {
            CurveSummary bounds = CurveSummary.of(ranked, ShownSet.of(ranked, "", "estimate", "").kept());
            rows.add(row(scales.path(key(scale)), -1, "every specification", bounds));
        } else {
            for (JsonNode g : scales.path(key(scale))) {
                int group = g.path("group").asInt();
                String title = g.path("outcome").asString() + " on " + g.path("predictor").asString()
                        + (g.path("model").isString() ? ", " + g.path("model").asString() : "");
                CurveSummary bounds = CurveSummary.of(ranked,
                        ShownSet.of(ranked, "", "estimate", String.valueOf(group)).kept());
                rows.add(row(g, group, title, bounds));
            }
        }
        List<JointTest> tests = new ArrayList<>();
        JsonNode draws = summary.path("null");
        if (draws.isObject()) {
            JsonNode observed = draws.path("observed");
            tests.add(test(draws, "median estimate", "median", observed.path("median_estimate").asDouble()));
            tests.add(test(draws, "share significant in the dominant sign", "share_significant",
                    observed.path("share_significant").asDouble()));
            tests.add(test(draws, "mean normal score (Stouffer)", "stouffer", observed.path("mean_z").asDouble()));
        }
        boolean pooled = false;
        for (JsonNode k : scales.path("pooled_as_fitted")) {
            pooled |= k.asString().equals("null");
        }
        return new HeadlineTable(scale, summary.path("confidence").asDouble(), List.copyOf(rows), List.copyOf(tests),
                pooled);
    }

    /** The key of a scale's numbers under summary.json's {@code scales}. */
    static String key(Scale scale) {
        return switch (scale) {
            case AS_FITTED -> "groups";
            case AVERAGE_MARGINAL_EFFECT -> "average_marginal_effect";
            case STANDARDIZED -> "standardized";
            case PARTIAL_CORRELATION -> "partial_correlation";
            case T_STATISTIC -> "t_statistic";
        };
    }

    private static Row row(JsonNode g, int group, String title, CurveSummary bounds) {
        return new Row(group, title, g.path("unit").asString(), g.path("specifications").asLong(), number(g, "median"),
                number(g, "lower_quartile"), number(g, "upper_quartile"), number(g, "share_positive"),
                number(g, "share_significant_positive"), number(g, "share_significant_negative"),
                bounds.lowestBound(), bounds.highestBound());
    }

    private static JointTest test(JsonNode draws, String name, String key, double observed) {
        JsonNode t = draws.path("tests").path(key);
        return new JointTest(name, key, observed, t.path("exceedances").asInt(), t.path("draws").asInt(),
                number(t, "p"));
    }

    /** A number of summary.json, NaN where it is null (undefined). */
    private static double number(JsonNode node, String key) {
        JsonNode v = node.path(key);
        return v.isNumber() ? v.asDouble() : Double.NaN;
    }
}
