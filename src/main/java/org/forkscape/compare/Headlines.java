package org.forkscape.compare;

import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import tools.jackson.databind.JsonNode;

/**
 * The headline numbers of two runs side by side, read from their summary.json: the whole run's, and
 * per comparable group as fitted (summary.json's {@code scales.groups}, with the group's joint tests
 * from {@code by_scale.groups} when the run made null draws), groups matched by outcome, key predictor
 * and model labels, since group numbers shift when alternatives are added.
 */
final class Headlines {
    private static final List<String> WHOLE_RUN = List.of("specifications", "fitted", "median_estimate",
            "median_mixes_units", "share_positive", "share_significant_positive", "share_significant_negative");
    private static final List<String> GROUP = List.of("specifications", "median", "lower_quartile", "upper_quartile",
            "share_positive", "share_significant_positive", "share_significant_negative");

    private Headlines() {
    }

    static Map<String, Object> wholeRun(JsonNode summary) {
        Map<String, Object> m = picked(summary, WHOLE_RUN);
        JsonNode draws = summary.path("null");
        if (draws.isObject()) {
            Map<String, Object> tests = new LinkedHashMap<>();
            tests.put("draws", draws.path("draws"));
            tests.put("p_median", draws.path("p_median"));
            tests.put("p_share_significant", draws.path("p_share_significant"));
            tests.put("p_stouffer", draws.path("p_stouffer"));
            tests.put("p_bounds", bounds(draws.path("tests")));
            m.put("joint_tests", tests);
        } else {
            m.put("joint_tests", null);
        }
        return m;
    }

    /** One entry per comparable group of either run, A's first, with {@code a} or {@code b} null where a run lacks it. */
    static List<Map<String, Object>> groups(JsonNode summaryA, JsonNode summaryB) {
        Map<List<String>, Map<String, Object>> a = groupsOf(summaryA);
        Map<List<String>, Map<String, Object>> b = groupsOf(summaryB);
        List<List<String>> keys = new ArrayList<>(a.keySet());
        b.keySet().stream().filter(k -> !a.containsKey(k)).forEach(keys::add);
        List<Map<String, Object>> groups = new ArrayList<>();
        for (List<String> k : keys) {
            Map<String, Object> g = new LinkedHashMap<>();
            g.put("outcome", k.get(0));
            g.put("predictor", k.get(1));
            g.put("model", k.get(2));
            g.put("a", a.get(k));
            g.put("b", b.get(k));
            groups.add(g);
        }
        return groups;
    }

    private static Map<List<String>, Map<String, Object>> groupsOf(JsonNode summary) {
        Map<List<String>, JsonNode> tests = new LinkedHashMap<>();
        for (JsonNode g : summary.path("by_scale").path("groups")) {
            if (g.path("null").isObject()) {
                tests.put(key(g), g.path("null").path("tests"));
            }
        }
        Map<List<String>, Map<String, Object>> groups = new LinkedHashMap<>();
        for (JsonNode g : summary.path("scales").path("groups")) {
            Map<String, Object> m = picked(g, GROUP);
            JsonNode t = tests.get(key(g));
            if (t == null) {
                m.put("joint_tests", null);
            } else {
                Map<String, Object> p = new LinkedHashMap<>();
                p.put("p_median", t.path("median").path("p"));
                p.put("p_share_significant", t.path("share_significant").path("p"));
                p.put("p_stouffer", t.path("stouffer").path("p"));
                p.put("p_bounds", bounds(t));
                m.put("joint_tests", p);
            }
            groups.put(key(g), m);
        }
        return groups;
    }

    /**
     * Each test's {@code p_bound} (1/(R + 1) when no draw was as extreme, else null): a p of 0 read off R draws
     * says only that p is below it, and a reader of the comparison needs R's bound to say so.
     */
    private static Map<String, Object> bounds(JsonNode tests) {
        Map<String, Object> m = new LinkedHashMap<>();
        for (String test : List.of("median", "share_significant", "stouffer")) {
            m.put(test, tests.path(test).path("p_bound"));
        }
        return m;
    }

    /** Without a model decision a group has no {@code model}; its key then says {@code ols}, as least squares is. */
    private static List<String> key(JsonNode group) {
        return List.of(group.path("outcome").asString(""), group.path("predictor").asString(""),
                group.path("model").asString("ols"));
    }

    private static Map<String, Object> picked(JsonNode node, List<String> keys) {
        Map<String, Object> m = new LinkedHashMap<>();
        keys.forEach(k -> m.put(k, node.has(k) ? node.get(k) : null));
        return m;
    }
}
