package org.forkscape.compare;

import java.util.ArrayList;
import java.util.HashSet;
import java.util.LinkedHashMap;
import java.util.LinkedHashSet;
import java.util.List;
import java.util.Map;
import java.util.Objects;
import java.util.Set;

/**
 * Two runs side by side. Specifications are matched by the label each chose for every decision of
 * either plan, never by number (adding an alternative renumbers the mixed radix); a decision only one
 * plan has makes all of that run's specifications its own, since the other run never chose among its
 * alternatives. A shared specification is identical when every result cell of specifications.csv both
 * files have (estimate to status) is the same text, which for their shortest round-trip decimals is the
 * same double.
 */
record RunComparison(RunFolder a, RunFolder b, PlanDifferences plan, List<String> decisionNames,
        List<MatchedRow> rows) {
    /** How many differing shared specifications compare.json lists; the count gives the rest. */
    static final int LISTED_DIFFERENCES = 10;

    /** One row of compare.csv: a specification of A, of B, or of both. */
    record MatchedRow(Map<String, String> labels, SpecificationRow inA, SpecificationRow inB, Difference difference) {
        boolean shared() {
            return inA != null && inB != null;
        }

        boolean identical() {
            return shared() && difference == null;
        }
    }

    /** The first cell, in specifications.csv's column order, in which a shared specification differs. */
    record Difference(String column, String valueA, String valueB) {
    }

    private static MatchedRow matched(SpecificationRow inA, SpecificationRow inB, List<String> columns) {
        Map<String, String> labels = new LinkedHashMap<>((inA == null ? inB : inA).labels());
        if (inA != null && inB != null) {
            inB.labels().forEach(labels::putIfAbsent);
            for (String c : columns) {
                String x = inA.cells().get(c);
                String y = inB.cells().get(c);
                if (!Objects.equals(x, y)) {
                    return new MatchedRow(labels, inA, inB, new Difference(c, x, y));
                }
            }
        }
        return new MatchedRow(labels, inA, inB, null);
    }

    static RunComparison of(RunFolder a, RunFolder b) {
        Set<String> names = new LinkedHashSet<>();
        a.decisions().forEach(d -> names.add(d.name()));
        b.decisions().forEach(d -> names.add(d.name()));
        List<String> decisionNames = List.copyOf(names);
        Map<List<String>, SpecificationRow> bByKey = new LinkedHashMap<>();
        b.rows().forEach(r -> bByKey.put(key(r, decisionNames), r));
        List<String> columns = a.resultColumns().stream().filter(b.resultColumns()::contains).toList();
        List<MatchedRow> rows = new ArrayList<>();
        Set<List<String>> matched = new HashSet<>();
        for (SpecificationRow r : a.rows()) {
            List<String> k = key(r, decisionNames);
            SpecificationRow other = bByKey.get(k);
            if (other != null) {
                matched.add(k);
            }
            rows.add(matched(r, other, columns));
        }
        for (SpecificationRow r : b.rows()) {
            if (!matched.contains(key(r, decisionNames))) {
                rows.add(matched(null, r, columns));
            }
        }
        return new RunComparison(a, b, PlanDifferences.between(a.decisions(), b.decisions()), decisionNames, rows);
    }

    long shared() {
        return rows.stream().filter(MatchedRow::shared).count();
    }

    long onlyInA() {
        return rows.stream().filter(r -> r.inB() == null).count();
    }

    long onlyInB() {
        return rows.stream().filter(r -> r.inA() == null).count();
    }

    /** The shared specifications that differ, in compare.csv's order. */
    List<MatchedRow> differing() {
        return rows.stream().filter(r -> r.shared() && r.difference() != null).toList();
    }

    /** A decision the row's run does not have is null in its key, which no label of the other run equals. */
    private static List<String> key(SpecificationRow r, List<String> decisionNames) {
        List<String> key = new ArrayList<>();
        decisionNames.forEach(n -> key.add(r.labels().get(n)));
        return key;
    }
}
