package org.forkscape.plan;

import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.LinkedHashSet;
import java.util.List;
import java.util.Map;
import java.util.Set;
import org.forkscape.InputException;
import tools.jackson.databind.JsonNode;

/**
 * The specification the authors report, as the plan's {@code reported} object names it: one label per
 * decision, as specifications.csv writes it (for an all-subsets controls decision the optional controls
 * joined by {@code " + "}, in any order, or {@code none}).
 *
 * @param choices one alternative per decision, in plan order
 */
public record ReportedSpecification(List<Long> choices) {
    public ReportedSpecification {
        choices = List.copyOf(choices);
    }

    /** The choices as the specification space takes them. */
    public long[] toArray() {
        return choices.stream().mapToLong(Long::longValue).toArray();
    }

    /** Each decision's name with the reported label, in plan order. */
    public Map<String, String> labels(List<Decision> decisions) {
        Map<String, String> m = new LinkedHashMap<>();
        for (int d = 0; d < decisions.size(); d++) {
            m.put(decisions.get(d).name(), decisions.get(d).label(choices.get(d)));
        }
        return m;
    }

    /**
     * Reads {@code reported} against the plan's decisions; every problem goes to {@code problems} at
     * {@code reported} (not an object, a decision left out) or {@code reported.NAME} (an unknown decision or
     * label), and the result is {@code null} when there was one or the key is absent.
     */
    static ReportedSpecification read(JsonNode node, List<Decision> decisions, PlanProblems problems) {
        if (node == null || node.isNull()) {
            return null;
        }
        if (!node.isObject()) {
            problems.attempt(() -> {
                throw new PlanException("reported", "must be an object {\"DECISION NAME\": \"LABEL\", ...} naming "
                        + "one alternative of every decision; found " + PlanReader.typeOf(node));
            });
            return null;
        }
        int before = problems.count();
        List<String> names = decisions.stream().map(Decision::name).toList();
        for (String key : node.propertyNames()) {
            if (!names.contains(key)) {
                problems.attempt(() -> {
                    throw new PlanException("reported." + InputException.cut(key), "names no decision of the plan"
                            + PlanReader.suggest(key, names) + " (its decisions are " + String.join(", ", names) + ")");
                });
            }
        }
        List<Long> choices = new ArrayList<>();
        List<String> missing = new ArrayList<>();
        for (Decision d : decisions) {
            JsonNode label = node.get(d.name());
            if (label == null || label.isNull()) {
                missing.add(d.name());
                continue;
            }
            String path = "reported." + InputException.cut(d.name());
            problems.attempt(() -> {
                if (!label.isString()) {
                    throw new PlanException(path, "must be the label of one of its alternatives, in double quotes; "
                            + "found " + PlanReader.typeOf(label));
                }
                choices.add(choice(d, label.stringValue(), path));
            });
        }
        if (!missing.isEmpty()) {
            problems.attempt(() -> {
                throw new PlanException("reported", "names no label for the decision" + (missing.size() > 1 ? "s " : " ")
                        + String.join(", ", missing) + "; the reported specification needs one alternative of every "
                        + "decision");
            });
        }
        return problems.count() > before ? null : new ReportedSpecification(choices);
    }

    private static long choice(Decision d, String label, String path) {
        if (d instanceof Decision.Controls c && c.allSubsets()) {
            return subset(c, label, path);
        }
        List<String> labels = new ArrayList<>();
        for (long j = 0; j < d.alternativeCount(); j++) {
            if (d.label(j).equals(label)) {
                return j;
            }
            labels.add(d.label(j));
        }
        throw new PlanException(path, InputException.quoted(label) + " is not an alternative of this decision"
                + PlanReader.suggest(label, labels) + " (its labels are " + String.join(", ", labels) + ")");
    }

    /** The bit mask of an all-subsets label: optional controls joined by " + ", or "none". */
    private static long subset(Decision.Controls c, String label, String path) {
        if (label.strip().equals("none")) {
            return 0;
        }
        Set<String> seen = new LinkedHashSet<>();
        long mask = 0;
        for (String part : label.split("\\+", -1)) {
            String control = part.strip();
            int j = c.optional().indexOf(control);
            if (j < 0) {
                throw new PlanException(path, InputException.quoted(control) + " is not an optional control of this "
                        + "decision" + PlanReader.suggest(control, c.optional()) + "; name its optional controls joined "
                        + "by \" + \" (" + String.join(", ", c.optional()) + "), or \"none\"");
            }
            if (!seen.add(control)) {
                throw new PlanException(path, InputException.quoted(control) + " is named twice");
            }
            mask |= 1L << j;
        }
        return mask;
    }
}
