package org.forkscape.compare;

import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Objects;
import org.forkscape.InputException;

/**
 * How run B's plan differs from run A's, decision by decision (matched by name): decisions added or
 * removed, and within a decision both have, the choices added or removed (by label, or by control name
 * for an all-subsets controls decision), the labels whose definition changed, and the required controls
 * added or removed (which change every specification of the decision without changing a label).
 */
record PlanDifferences(List<PlanDecision> added, List<PlanDecision> removed, List<DecisionChange> changed) {

    record DecisionChange(PlanDecision a, PlanDecision b, List<String> added, List<String> removed,
            List<String> redefined, List<String> requiredAdded, List<String> requiredRemoved) {
        boolean any() {
            return !(added.isEmpty() && removed.isEmpty() && redefined.isEmpty() && requiredAdded.isEmpty()
                    && requiredRemoved.isEmpty() && a.kind().equals(b.kind()) && a.noun().equals(b.noun()));
        }
    }

    static PlanDifferences between(List<PlanDecision> a, List<PlanDecision> b) {
        Map<String, PlanDecision> inA = byName(a);
        Map<String, PlanDecision> inB = byName(b);
        List<PlanDecision> added = b.stream().filter(d -> !inA.containsKey(d.name())).toList();
        List<PlanDecision> removed = a.stream().filter(d -> !inB.containsKey(d.name())).toList();
        List<DecisionChange> changed = new ArrayList<>();
        for (PlanDecision da : a) {
            PlanDecision db = inB.get(da.name());
            if (db == null) {
                continue;
            }
            DecisionChange c = new DecisionChange(da, db, missingFrom(db.choices(), da.choices()),
                    missingFrom(da.choices(), db.choices()),
                    da.choices().stream().filter(db.definitions()::containsKey)
                            .filter(l -> !Objects.equals(da.definitions().get(l), db.definitions().get(l))).toList(),
                    missingFrom(db.required(), da.required()), missingFrom(da.required(), db.required()));
            if (c.any()) {
                changed.add(c);
            }
        }
        return new PlanDifferences(added, removed, changed);
    }

    boolean none() {
        return added.isEmpty() && removed.isEmpty() && changed.isEmpty();
    }

    /** compare.json's {@code plan} section. */
    Map<String, Object> toJson() {
        Map<String, Object> json = new LinkedHashMap<>();
        json.put("decisions_added", added.stream().map(PlanDifferences::decisionJson).toList());
        json.put("decisions_removed", removed.stream().map(PlanDifferences::decisionJson).toList());
        json.put("decisions_changed", changed.stream().map(c -> {
            Map<String, Object> m = new LinkedHashMap<>();
            m.put("name", c.a().name());
            m.put("kind_a", c.a().kind());
            m.put("kind_b", c.b().kind());
            m.put("choices_a", c.a().noun() + "s");
            m.put("choices_b", c.b().noun() + "s");
            m.put("added", c.added());
            m.put("removed", c.removed());
            m.put("redefined", c.redefined());
            m.put("required_added", c.requiredAdded());
            m.put("required_removed", c.requiredRemoved());
            return m;
        }).toList());
        return json;
    }

    /** The changes as clauses of the sentence, each with B as its subject ("adds 1 control (income) to ..."). */
    List<String> clauses() {
        List<String> clauses = new ArrayList<>();
        for (PlanDecision d : added) {
            clauses.add("adds the decision " + InputException.quoted(d.name()) + " (" + counted(d.choices().size(),
                    d.noun()) + ")");
        }
        for (PlanDecision d : removed) {
            clauses.add("drops the decision " + InputException.quoted(d.name()));
        }
        for (DecisionChange c : changed) {
            String of = InputException.quoted(c.a().name());
            if (!c.a().kind().equals(c.b().kind()) || !c.a().noun().equals(c.b().noun())) {
                clauses.add("makes " + of + " a decision of another form (" + c.b().kind() + ", by " + c.b().noun()
                        + "s)");
                continue;
            }
            if (!c.added().isEmpty()) {
                clauses.add("adds " + listed(c.added(), c.b().noun()) + " to " + of);
            }
            if (!c.removed().isEmpty()) {
                clauses.add("drops " + listed(c.removed(), c.a().noun()) + " from " + of);
            }
            if (!c.redefined().isEmpty()) {
                clauses.add("redefines " + listed(c.redefined(), c.a().noun()) + " of " + of);
            }
            if (!c.requiredAdded().isEmpty()) {
                clauses.add("adds " + listed(c.requiredAdded(), "required control") + " to " + of);
            }
            if (!c.requiredRemoved().isEmpty()) {
                clauses.add("drops " + listed(c.requiredRemoved(), "required control") + " from " + of);
            }
        }
        return clauses;
    }

    private static Map<String, Object> decisionJson(PlanDecision d) {
        Map<String, Object> m = new LinkedHashMap<>();
        m.put("name", d.name());
        m.put("kind", d.kind());
        m.put(d.noun() + "s", d.choices());
        return m;
    }

    private static String listed(List<String> labels, String noun) {
        return counted(labels.size(), noun) + " (" + String.join(", ", labels) + ")";
    }

    private static String counted(int n, String noun) {
        return n + " " + noun + (n == 1 ? "" : "s");
    }

    private static List<String> missingFrom(List<String> list, List<String> other) {
        return list.stream().filter(x -> !other.contains(x)).toList();
    }

    private static Map<String, PlanDecision> byName(List<PlanDecision> decisions) {
        Map<String, PlanDecision> map = new LinkedHashMap<>();
        decisions.forEach(d -> map.put(d.name(), d));
        return map;
    }
}
