package org.forkscape.check;

import java.util.List;
import tools.jackson.databind.JsonNode;

/**
 * The reported specification's percentile rank (summary.json's {@code reported.scales.SCALE.percentile}, ties
 * counted half) inside a range, so that the estimate the paper shows is not one of the curve's extremes. Not
 * applicable when the plan names no reported specification; fails when the run did not fit it.
 */
record ReportedPercentileRule(String scale, double from, double to) implements ReleaseRule {
    static final String NAME = "reported_percentile";
    static final List<String> SCALES = List.of("as_fitted", "average_marginal_effect", "standardized",
            "partial_correlation", "t_statistic");

    @Override
    public String name() {
        return NAME;
    }

    @Override
    public RuleResult evaluate(RunEvidence run) {
        String requirement = "percentile from " + Numbers.text(from) + " to " + Numbers.text(to) + " on " + scale;
        JsonNode reported = run.summary().path("reported");
        if (!reported.isObject()) {
            return new RuleResult(NAME, Verdict.NOT_APPLICABLE, null, requirement,
                    "the plan names no reported specification");
        }
        JsonNode percentile = reported.path("scales").path(scale).path("percentile");
        if (!percentile.isNumber()) {
            String why = !reported.path("in_run").asBoolean(true) ? "the run's sample does not hold it"
                    : "it has no value on this scale (status " + reported.path("status").asString("?") + ")";
            return RuleResult.of(NAME, false, null, requirement, "the reported specification is not placed: " + why);
        }
        double p = percentile.asDouble();
        return RuleResult.of(NAME, p >= from && p <= to, p, requirement, "specification "
                + reported.path("spec").asString() + " at percentile " + Numbers.text(p));
    }
}
