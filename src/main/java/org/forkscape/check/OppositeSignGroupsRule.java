package org.forkscape.check;

import java.util.ArrayList;
import java.util.List;
import tools.jackson.databind.JsonNode;

/**
 * No comparable group (summary.json's {@code scales.groups}: one outcome alternative, key-predictor coding and
 * model) with more than a share of its specifications significant in the sign opposite to the whole curve's
 * dominant sign. Measured: the largest such share over the groups.
 */
record OppositeSignGroupsRule(double atMost) implements ReleaseRule {
    static final String NAME = "opposite_sign_groups";

    @Override
    public String name() {
        return NAME;
    }

    @Override
    public RuleResult evaluate(RunEvidence run) {
        String opposite = run.dominantSign().equals("positive") ? "negative" : "positive";
        String requirement = "at most " + Numbers.text(atMost) + " significant " + opposite + " in every comparable group";
        double largest = Double.NEGATIVE_INFINITY;
        String where = "";
        List<String> over = new ArrayList<>();
        for (JsonNode g : run.summary().path("scales").path("groups")) {
            JsonNode share = g.path("share_significant_" + opposite);
            if (!share.isNumber()) {
                continue;
            }
            double s = share.asDouble();
            String name = "group " + g.path("group").asInt() + " (" + g.path("outcome").asString() + ", "
                    + g.path("predictor").asString() + (g.has("model") ? ", " + g.path("model").asString() : "") + ")";
            if (s > atMost) {
                over.add(name);
            }
            if (s > largest) {
                largest = s;
                where = name;
            }
        }
        if (largest == Double.NEGATIVE_INFINITY) {
            return RuleResult.of(NAME, false, null, requirement, "no comparable group has a fitted specification");
        }
        String detail = "largest " + Numbers.text(largest) + " in " + where
                + (over.isEmpty() ? "" : "; above it: " + String.join(", ", over));
        return RuleResult.of(NAME, over.isEmpty(), largest, requirement, detail);
    }
}
