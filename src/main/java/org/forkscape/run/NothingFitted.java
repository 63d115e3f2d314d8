package org.forkscape.run;

import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import org.forkscape.plan.Decision;
import org.forkscape.plan.SpecificationSpace;

/** Why a run fitted no specification, in the one sentence both the command line and the pages give. */
public final class NothingFitted {
    private NothingFitted() {
    }

    /**
     * The most common reason among the specifications, how many it stopped, and the choices of the first
     * of them, so the message points at the decision to revisit.
     */
    public static String reason(RunResult run) {
        ResultTable results = run.results();
        Map<String, Integer> count = new LinkedHashMap<>();
        Map<String, Integer> firstSlot = new LinkedHashMap<>();
        for (int slot = 0; slot < results.size(); slot++) {
            count.merge(results.status(slot), 1, Integer::sum);
            firstSlot.putIfAbsent(results.status(slot), slot);
        }
        Map.Entry<String, Integer> top = count.entrySet().stream().max(Map.Entry.comparingByValue()).orElseThrow();
        String share = results.size() == 1 ? "the only specification failed"
                : top.getValue() == results.size() ? String.format("all %,d failed", results.size())
                : String.format("%,d of %,d failed", top.getValue(), results.size());
        SpecificationSpace space = run.models().space();
        long[] choices = new long[space.decisionCount()];
        space.decode(results.specIndex(firstSlot.get(top.getKey())), choices);
        List<String> chosen = new ArrayList<>();
        for (int d = 0; d < choices.length; d++) {
            Decision decision = space.decisions().get(d);
            chosen.add(decision.name() + " = " + decision.label(choices[d]));
        }
        return "no specification could be fitted: " + share + " with \"" + top.getKey() + "\" (first: "
                + String.join(", ", chosen) + "); nothing was written";
    }
}
