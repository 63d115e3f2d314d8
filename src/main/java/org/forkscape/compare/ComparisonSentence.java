package org.forkscape.compare;

import java.util.List;
import org.forkscape.text.HumanNumbers;
import tools.jackson.databind.JsonNode;

/**
 * What run B's changes do, in one sentence: the plan's changes, whether the shared specifications are
 * identical, and how the whole run's median and share significant in A's dominant sign move, as in
 * "B adds 1 control (income) to "controls"; the 4 shared specifications are identical; the 4 added ones
 * move the median from 0.041 to 0.037 and the share significant and positive from 62% to 55%."
 */
final class ComparisonSentence {
    private ComparisonSentence() {
    }

    static String of(RunComparison c) {
        List<String> clauses = c.plan().clauses();
        String changes = clauses.isEmpty() ? "B's plan has the same decisions and alternatives as A's"
                : "B " + joined(clauses);
        return changes + "; " + shared(c) + moves(c) + ".";
    }

    private static String shared(RunComparison c) {
        long shared = c.shared();
        if (shared == 0) {
            return "the runs share no specification";
        }
        List<RunComparison.MatchedRow> differing = c.differing();
        if (differing.isEmpty()) {
            return shared == 1 ? "the 1 shared specification is identical"
                    : "the " + HumanNumbers.count(shared) + " shared specifications are identical";
        }
        RunComparison.MatchedRow first = differing.get(0);
        return HumanNumbers.count(differing.size()) + " of the " + HumanNumbers.count(shared) + " shared "
                + "specifications differ (first: A's specification " + first.inA().spec() + ", B's "
                + first.inB().spec() + ", " + first.difference().column() + " " + cell(first.difference().valueA())
                + " in A, " + cell(first.difference().valueB()) + " in B)";
    }

    private static String moves(RunComparison c) {
        long added = c.onlyInB();
        long removed = c.onlyInA();
        if (added + removed == 0) {
            return "";
        }
        String ones = added > 0 && removed > 0
                ? "the " + HumanNumbers.count(added) + " added and " + HumanNumbers.count(removed) + " removed ones"
                : added > 0 ? "the " + HumanNumbers.count(added) + " added " + (added == 1 ? "one" : "ones")
                : "the " + HumanNumbers.count(removed) + " removed " + (removed == 1 ? "one" : "ones");
        JsonNode a = c.a().summary();
        JsonNode b = c.b().summary();
        boolean pooled = a.path("median_mixes_units").asBoolean(false) || b.path("median_mixes_units").asBoolean(false);
        String median = pooled ? "the median as fitted (pooling units; compare.json's groups compare within one)"
                : "the median";
        boolean positive = a.path("share_significant_positive").asDouble(0)
                >= a.path("share_significant_negative").asDouble(0);
        String share = positive ? "share_significant_positive" : "share_significant_negative";
        String verb = added + removed == 1 ? "moves" : "move";
        String leaves = added + removed == 1 ? "leaves" : "leave";
        return "; " + ones + " " + change(verb, leaves, median, number(a, "median_estimate"),
                number(b, "median_estimate")) + " and " + change(verb, leaves, "the share significant and "
                + (positive ? "positive" : "negative"), share(a, share), share(b, share));
    }

    private static String change(String verb, String leaves, String what, String from, String to) {
        return from.equals(to) ? leaves + " " + what + " at " + from : verb + " " + what + " from " + from + " to " + to;
    }

    private static String number(JsonNode summary, String key) {
        JsonNode v = summary.path(key);
        return v.isNumber() ? HumanNumbers.number(v.asDouble()) : "undefined";
    }

    private static String share(JsonNode summary, String key) {
        JsonNode v = summary.path(key);
        return v.isNumber() ? HumanNumbers.share(v.asDouble()) : "undefined";
    }

    private static String cell(String value) {
        return value.isEmpty() ? "empty" : value;
    }

    private static String joined(List<String> clauses) {
        if (clauses.size() == 1) {
            return clauses.get(0);
        }
        return String.join(", ", clauses.subList(0, clauses.size() - 1)) + " and " + clauses.get(clauses.size() - 1);
    }
}
