package org.forkscape.check;

import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Optional;
import org.forkscape.InputException;
import org.forkscape.run.Json;
import tools.jackson.core.JacksonException;
import tools.jackson.databind.JsonNode;
import tools.jackson.databind.json.JsonMapper;

/**
 * The release check: every rule of a policy on one run folder, written to {@code RUN_DIR/check.json}.
 *
 * @param results one per rule, in the policy's order
 */
public record ReleaseCheck(List<RuleResult> results) {
    public static final String FILE = "check.json";
    /** Every rule with its defaults, as README shows it: where a policy starts. */
    public static final String EXAMPLE_POLICY = String.join("\n",
            "{\"joint_tests\": {\"below\": 0.05, \"tests\": [\"median\", \"share_significant\", \"stouffer\"]},",
            " \"share_significant\": {\"above\": 0.5},",
            " \"reported_percentile\": {\"scale\": \"as_fitted\", \"from\": 25, \"to\": 75},",
            " \"opposite_sign_groups\": {\"at_most\": 0.05},",
            " \"rows_per_coefficient\": {\"at_least\": 10},",
            " \"plan_locked\": {}}");
    private static final JsonMapper MAPPER = JsonMapper.builder().build();

    /** Reads the policy file and the run folder (every problem an {@code InputException}) and checks each rule. */
    public static ReleaseCheck of(Path runFolder, Path policy) {
        return of(runFolder, PolicyReader.read(policy));
    }

    /** The same for a policy's text, named {@code where} in messages (the browser's field). */
    public static ReleaseCheck of(Path runFolder, String policyText, String where) {
        return of(runFolder, PolicyReader.parse(policyText, where));
    }

    private static ReleaseCheck of(Path runFolder, List<ReleaseRule> rules) {
        RunEvidence run = RunEvidence.read(runFolder);
        return new ReleaseCheck(rules.stream().map(r -> r.evaluate(run)).toList());
    }

    /**
     * The check last written into a run folder, read back from its check.json; empty when there is none. A
     * check.json that is not one the check wrote is an {@code InputException} naming it.
     */
    public static Optional<ReleaseCheck> recorded(Path runFolder) {
        Path file = runFolder.resolve(FILE);
        if (!Files.isRegularFile(file)) {
            return Optional.empty();
        }
        try {
            List<RuleResult> results = new ArrayList<>();
            for (JsonNode r : MAPPER.readTree(file.toFile()).path("rules")) {
                results.add(new RuleResult(r.path("rule").asString(), Verdict.named(r.path("result").asString()),
                        r.get("measured"), r.path("requirement").asString(), r.path("detail").asString()));
            }
            return Optional.of(new ReleaseCheck(List.copyOf(results)));
        } catch (JacksonException | IllegalArgumentException e) {
            throw new InputException(file.toString(), "is not a check.json the release check wrote: " + e.getMessage());
        }
    }

    /** No rule failed; a rule that does not apply does not fail. */
    public boolean passed() {
        return results.stream().noneMatch(r -> r.verdict() == Verdict.FAIL);
    }

    public long failures() {
        return results.stream().filter(r -> r.verdict() == Verdict.FAIL).count();
    }

    /** Writes check.json into the run folder; the policy is named as given (a path, or where the browser took it). */
    public void write(Path runFolder, String policy) {
        Map<String, Object> content = new LinkedHashMap<>();
        content.put("passed", passed());
        content.put("failed", failures());
        content.put("policy", policy);
        content.put("rules", results.stream().map(RuleResult::asJson).toList());
        content.put("note", "The rules and their defaults are a review group's judgement, not a standard; passing "
                + "them does not show that the effect is causal.");
        Json.write(runFolder.resolve(FILE), content);
    }
}
