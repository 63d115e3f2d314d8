package org.forkscape.check;

import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import tools.jackson.databind.JsonNode;

/**
 * The joint tests' p-values (summary.json's {@code null.tests}, the share of null draws at least as extreme as
 * the observed curve) each below a level. A p of 0 is read as below its bound 1/(R + 1), so a run with too few
 * draws to go below the level fails. A run without null draws fails: the rule cannot be measured.
 */
record JointTestsRule(double below, List<String> tests) implements ReleaseRule {
    static final String NAME = "joint_tests";
    static final List<String> TESTS = List.of("median", "share_significant", "stouffer");

    @Override
    public String name() {
        return NAME;
    }

    @Override
    public RuleResult evaluate(RunEvidence run) {
        String requirement = "p below " + Numbers.text(below) + " for " + String.join(", ", tests);
        JsonNode recorded = run.summary().path("null").path("tests");
        if (!recorded.isObject()) {
            return RuleResult.of(NAME, false, null, requirement, "the run has no null draws (run with --null-draws R)");
        }
        Map<String, Object> measured = new LinkedHashMap<>();
        List<String> words = new ArrayList<>();
        boolean pass = true;
        for (String test : tests) {
            JsonNode t = recorded.path(test);
            if (!t.path("p").isNumber()) {
                measured.put(test, null);
                words.add(test + " p undefined");
                pass = false;
                continue;
            }
            double p = t.path("p").asDouble();
            // a share of 0 only says p < 1/(R + 1): that bound is what must be below the level
            double upTo = t.path("p_bound").isNumber() ? t.path("p_bound").asDouble() : p;
            measured.put(test, p);
            words.add(test + (t.path("p_bound").isNumber() ? " p < " + Numbers.text(upTo) : " p = " + Numbers.text(p)));
            pass &= upTo < below;
        }
        return RuleResult.of(NAME, pass, measured, requirement, String.join(", ", words));
    }
}
