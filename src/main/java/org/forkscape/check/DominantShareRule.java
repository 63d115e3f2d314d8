package org.forkscape.check;

import tools.jackson.databind.JsonNode;

/**
 * The share of fitted specifications significant (p &lt; 1 - confidence) in the curve's dominant sign above a
 * level: summary.json's {@code share_significant_positive} or {@code share_significant_negative}.
 */
record DominantShareRule(double above) implements ReleaseRule {
    static final String NAME = "share_significant";

    @Override
    public String name() {
        return NAME;
    }

    @Override
    public RuleResult evaluate(RunEvidence run) {
        String sign = run.dominantSign();
        String requirement = "above " + Numbers.text(above) + " significant in the dominant sign";
        JsonNode share = run.summary().path("share_significant_" + sign);
        if (!share.isNumber()) {
            return RuleResult.of(NAME, false, null, requirement, "no specification was fitted");
        }
        double s = share.asDouble();
        return RuleResult.of(NAME, s > above, s, requirement, Numbers.text(s) + " significant and " + sign);
    }
}
