package org.forkscape.reference;

import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import org.forkscape.plan.Decision;
import org.forkscape.plan.Plan;
import org.forkscape.plan.SpecificationSpace;
import org.forkscape.run.ResultTable;
import org.forkscape.run.RunResult;

/**
 * A reference file's rows matched to a run's results by their {@code spec} number: each decision's label
 * and the status must be R's (a mismatch is added to the failures and the row left out), and each matched
 * row comes with its result slot and a description for messages.
 */
final class ReferenceRows {
    /** A row whose labels and status agree, its slot in the run's results, and where it is, for messages. */
    record Match(Map<String, String> row, int slot, String where) {
    }

    private ReferenceRows() {
    }

    static List<Match> match(RunResult run, Plan plan, List<Map<String, String>> expected, List<String> failures) {
        ResultTable r = run.results();
        int[] slotOf = new int[r.size()];
        for (int slot = 0; slot < r.size(); slot++) {
            slotOf[(int) r.specIndex(slot)] = slot;
        }
        SpecificationSpace space = run.models().space();
        List<Decision> decisions = plan.decisions();
        long[] choices = new long[space.decisionCount()];
        List<Match> matches = new ArrayList<>();
        for (Map<String, String> row : expected) {
            int slot = slotOf[Integer.parseInt(row.get("spec")) - 1];
            space.decode(r.specIndex(slot), choices);
            List<String> labels = new ArrayList<>();
            for (int d = 0; d < decisions.size(); d++) {
                labels.add(decisions.get(d).label(choices[d]));
                if (!labels.get(d).equals(row.get(decisions.get(d).name()))) {
                    failures.add("spec " + row.get("spec") + ": Forkscape's " + decisions.get(d).name() + " is "
                            + labels.get(d) + ", R's " + row.get(decisions.get(d).name()));
                }
            }
            String where = "spec " + row.get("spec") + " (" + String.join(" | ", labels) + ")";
            String status = row.get("status");
            if (!r.status(slot).startsWith(status)) {
                failures.add(where + ": status \"" + r.status(slot) + "\", R gives \"" + status + "\"");
                continue;
            }
            matches.add(new Match(row, slot, where));
        }
        return matches;
    }
}
