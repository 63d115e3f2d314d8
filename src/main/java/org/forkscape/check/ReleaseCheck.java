package org.forkscape.check;

import java.nio.file.Path;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import org.forkscape.run.Json;

/**
 * The release check: every rule of a policy on one run folder, written to {@code RUN_DIR/check.json}.
 *
 * @param results one per rule, in the policy's order
 */
public record ReleaseCheck(List<RuleResult> results) {
    public static final String FILE = "check.json";

    /** Reads the policy and the run folder (every problem an {@code InputException}) and checks each rule. */
    public static ReleaseCheck of(Path runFolder, Path policy) {
        List<ReleaseRule> rules = PolicyReader.read(policy);
        RunEvidence run = RunEvidence.read(runFolder);
        return new ReleaseCheck(rules.stream().map(r -> r.evaluate(run)).toList());
    }

    /** No rule failed; a rule that does not apply does not fail. */
    public boolean passed() {
        return results.stream().noneMatch(r -> r.verdict() == Verdict.FAIL);
    }

    public long failures() {
        return results.stream().filter(r -> r.verdict() == Verdict.FAIL).count();
    }

    /** Writes check.json into the run folder; the policy is named as given. */
    public void write(Path runFolder, Path policy) {
        Map<String, Object> content = new LinkedHashMap<>();
        content.put("passed", passed());
        content.put("failed", failures());
        content.put("policy", policy.toString());
        content.put("rules", results.stream().map(RuleResult::asJson).toList());
        content.put("note", "The rules and their defaults are a review group's judgement, not a standard; passing "
                + "them does not show that the effect is causal.");
        Json.write(runFolder.resolve(FILE), content);
    }
}
