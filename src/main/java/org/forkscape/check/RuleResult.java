package org.forkscape.check;

import java.util.LinkedHashMap;
import java.util.Map;

/**
 * One rule checked on one run.
 *
 * @param rule        the policy key of the rule
 * @param verdict     pass, fail or not applicable
 * @param measured    the measured value (a number, or per test a number, as check.json writes it); {@code null}
 *                    when the run does not hold it
 * @param requirement what the policy asks, in words
 * @param detail      the measured value in words
 */
public record RuleResult(String rule, Verdict verdict, Object measured, String requirement, String detail) {

    static RuleResult of(String rule, boolean pass, Object measured, String requirement, String detail) {
        return new RuleResult(rule, pass ? Verdict.PASS : Verdict.FAIL, measured, requirement, detail);
    }

    /** The entry of check.json's {@code rules}. */
    Map<String, Object> asJson() {
        Map<String, Object> m = new LinkedHashMap<>();
        m.put("rule", rule);
        m.put("result", verdict.word());
        m.put("measured", measured);
        m.put("requirement", requirement);
        m.put("detail", detail);
        return m;
    }

    /** The terminal line: verdict, rule, what was measured and what was required. */
    public String line() {
        return String.format("%-14s %s: %s (required: %s)", verdict.word(), rule, detail, requirement);
    }
}
