package org.forkscape.check;

import java.io.IOException;
import java.io.UncheckedIOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.LinkedHashSet;
import java.util.List;
import java.util.Set;
import org.forkscape.InputException;
import tools.jackson.core.JacksonException;
import tools.jackson.databind.DeserializationFeature;
import tools.jackson.databind.JsonNode;
import tools.jackson.databind.json.JsonMapper;

/**
 * Reads a release policy: a JSON object whose keys are rules, each an object of its settings, every setting
 * optional with the default README gives. A rule left out is not checked. Every mistake is an
 * {@link InputException} at "POLICY.json, JSON.PATH".
 */
final class PolicyReader {
    static final List<String> RULES = List.of(JointTestsRule.NAME, DominantShareRule.NAME, ReportedPercentileRule.NAME,
            OppositeSignGroupsRule.NAME, RowsPerCoefficientRule.NAME, PlanLockedRule.NAME);
    private static final JsonMapper MAPPER = JsonMapper.builder()
            .enable(DeserializationFeature.FAIL_ON_TRAILING_TOKENS).build();

    private final String file;

    private PolicyReader(String file) {
        this.file = file;
    }

    static List<ReleaseRule> read(Path policy) {
        if (!Files.isRegularFile(policy)) {
            throw new InputException(policy.toString(), "no such policy file");
        }
        try {
            return parse(Files.readString(policy), policy.toString());
        } catch (IOException e) {
            throw new UncheckedIOException("cannot read " + policy + ": " + e.getMessage(), e);
        }
    }

    /** The rules of a policy's text; {@code where} names it in messages (the file, or the browser's field). */
    static List<ReleaseRule> parse(String text, String where) {
        JsonNode root;
        try {
            root = MAPPER.readTree(text);
        } catch (JacksonException e) {
            throw new InputException(where, "is not valid JSON: " + e.getOriginalMessage());
        }
        return new PolicyReader(where).rules(root);
    }

    private List<ReleaseRule> rules(JsonNode root) {
        if (root == null || !root.isObject()) {
            throw new InputException(file, "a policy is a JSON object of rules (" + String.join(", ", RULES) + ")");
        }
        List<ReleaseRule> rules = new ArrayList<>();
        for (String key : root.propertyNames()) {
            JsonNode r = root.get(key);
            if (!RULES.contains(key)) {
                throw error(key, "unknown rule; the rules are " + String.join(", ", RULES));
            }
            if (!r.isObject()) {
                throw error(key, "must be an object of the rule's settings ({} for the defaults)");
            }
            rules.add(switch (key) {
                case JointTestsRule.NAME -> {
                    only(r, key, "below", "tests");
                    yield new JointTestsRule(share(r, key, "below", 0.05), tests(r, key));
                }
                case DominantShareRule.NAME -> {
                    only(r, key, "above");
                    yield new DominantShareRule(share(r, key, "above", 0.5));
                }
                case ReportedPercentileRule.NAME -> reported(r, key);
                case OppositeSignGroupsRule.NAME -> {
                    only(r, key, "at_most");
                    yield new OppositeSignGroupsRule(share(r, key, "at_most", 0.05));
                }
                case RowsPerCoefficientRule.NAME -> {
                    only(r, key, "at_least");
                    yield new RowsPerCoefficientRule(number(r, key, "at_least", 10, 1, Double.MAX_VALUE));
                }
                default -> {
                    only(r, key);
                    yield new PlanLockedRule();
                }
            });
        }
        if (rules.isEmpty()) {
            throw new InputException(file, "the policy names no rule, so it would check nothing; the rules are "
                    + String.join(", ", RULES));
        }
        return rules;
    }

    private ReleaseRule reported(JsonNode r, String key) {
        only(r, key, "scale", "from", "to");
        String scale = ReportedPercentileRule.SCALES.get(0);
        if (r.has("scale")) {
            JsonNode s = r.get("scale");
            if (!s.isString() || !ReportedPercentileRule.SCALES.contains(s.asString())) {
                throw error(key + ".scale", "must be one of " + String.join(", ", ReportedPercentileRule.SCALES));
            }
            scale = s.asString();
        }
        double from = number(r, key, "from", 25, 0, 100);
        double to = number(r, key, "to", 75, 0, 100);
        if (from > to) {
            throw error(key + ".to", "must not be below from (" + Numbers.text(from) + ")");
        }
        return new ReportedPercentileRule(scale, from, to);
    }

    private List<String> tests(JsonNode r, String key) {
        if (!r.has("tests")) {
            return JointTestsRule.TESTS;
        }
        JsonNode t = r.get("tests");
        if (!t.isArray() || t.isEmpty()) {
            throw error(key + ".tests", "must be a non-empty list of " + String.join(", ", JointTestsRule.TESTS));
        }
        Set<String> tests = new LinkedHashSet<>();
        for (int i = 0; i < t.size(); i++) {
            JsonNode name = t.get(i);
            if (!name.isString() || !JointTestsRule.TESTS.contains(name.asString())) {
                throw error(key + ".tests[" + i + "]", "must be one of " + String.join(", ", JointTestsRule.TESTS));
            }
            if (!tests.add(name.asString())) {
                throw error(key + ".tests[" + i + "]", name.asString() + " is listed twice");
            }
        }
        return List.copyOf(tests);
    }

    private double share(JsonNode r, String key, String field, double fallback) {
        return number(r, key, field, fallback, 0, 1);
    }

    private double number(JsonNode r, String key, String field, double fallback, double min, double max) {
        if (!r.has(field)) {
            return fallback;
        }
        JsonNode v = r.get(field);
        if (!v.isNumber() || v.asDouble() < min || v.asDouble() > max) {
            throw error(key + "." + field, "must be a number " + (max == Double.MAX_VALUE ? "of at least "
                    + Numbers.text(min) : "from " + Numbers.text(min) + " to " + Numbers.text(max)) + "; found " + v);
        }
        return v.asDouble();
    }

    private void only(JsonNode r, String key, String... allowed) {
        List<String> known = List.of(allowed);
        for (String field : r.propertyNames()) {
            if (!known.contains(field)) {
                throw error(key + "." + InputException.cut(field), "unknown setting; " + (known.isEmpty()
                        ? "this rule has none" : "the settings are " + String.join(", ", known)));
            }
        }
    }

    private InputException error(String path, String message) {
        return new InputException(file + ", " + path, message);
    }
}
