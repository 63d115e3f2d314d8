package org.forkscape.compare;

import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import org.forkscape.InputException;
import tools.jackson.databind.JsonNode;

/**
 * One decision of a run's plan.json as a comparison sees it: its name and kind, what a specification
 * chooses among ({@code noun}: alternatives, the optional controls of an all-subsets decision, or the
 * named sets), each choice's definition (to see a label whose meaning changed) and the required controls,
 * which every specification of the decision uses without naming them in its label.
 */
record PlanDecision(String name, String kind, String noun, List<String> choices, Map<String, JsonNode> definitions,
        List<String> required) {

    static List<PlanDecision> listOf(JsonNode plan, String file) {
        JsonNode decisions = plan.path("decisions");
        if (!decisions.isArray()) {
            throw new InputException(file + ", decisions", "is missing or not a list; give the plan.json of a run");
        }
        List<PlanDecision> list = new ArrayList<>();
        for (int i = 0; i < decisions.size(); i++) {
            list.add(of(decisions.get(i), file + ", decisions[" + i + "]"));
        }
        return list;
    }

    private static PlanDecision of(JsonNode d, String where) {
        String name = d.path("name").asString("");
        String kind = d.path("kind").asString("");
        if (name.isEmpty() || kind.isEmpty()) {
            throw new InputException(where, "a decision needs a name and a kind");
        }
        Map<String, JsonNode> definitions = new LinkedHashMap<>();
        List<String> required = texts(d.path("required"));
        if (!kind.equals("controls")) {
            for (JsonNode alternative : d.path("alternatives")) {
                definitions.put(alternative.isString() ? alternative.asString() : alternative.path("label").asString(""),
                        alternative);
            }
            return new PlanDecision(name, kind, "alternative", List.copyOf(definitions.keySet()), definitions, required);
        }
        if (d.path("combine").asString("all-subsets").equals("sets")) {
            for (var set : d.path("sets").properties()) {
                definitions.put(set.getKey(), set.getValue());
            }
            return new PlanDecision(name, kind, "set", List.copyOf(definitions.keySet()), definitions, required);
        }
        for (JsonNode control : d.path("optional")) {
            definitions.put(control.asString(""), control);
        }
        return new PlanDecision(name, kind, "control", List.copyOf(definitions.keySet()), definitions, required);
    }

    private static List<String> texts(JsonNode list) {
        List<String> texts = new ArrayList<>();
        for (JsonNode item : list) {
            texts.add(item.asString(""));
        }
        return texts;
    }
}
