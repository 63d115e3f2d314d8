package org.forkscape.web.plan;

import java.util.List;
import org.forkscape.InputException;
import org.forkscape.plan.PlanException;

/**
 * The answer to "can this plan run on this analysis's data?", as the plan form shows it.
 *
 * @param valid          whether the plan reads, fits its data and is under the specification cap
 * @param specifications specifications in the plan's space, or -1 when the plan does not read
 * @param fitted         specifications a run would fit (the sample size when the plan asks for one), or -1
 * @param where          for an invalid plan, the JSON path of the field the first problem concerns
 * @param message        for an invalid plan, the first problem in a sentence
 * @param problems       for an invalid plan, every problem found in the same reading (the first one first)
 */
public record PlanCheck(boolean valid, long specifications, long fitted, String where, String message,
        List<Problem> problems) {

    /** One problem: the JSON path of its field and the sentence. */
    public record Problem(String where, String message) {
    }

    static PlanCheck ready(long specifications, long fitted) {
        return new PlanCheck(true, specifications, fitted, "", "", List.of());
    }

    static PlanCheck refused(long specifications, long fitted, InputException e) {
        List<Problem> all = e instanceof PlanException p
                ? p.all().stream().map(x -> new Problem(x.where(), x.problem())).toList()
                : List.of(new Problem(e.where(), e.problem()));
        return new PlanCheck(false, specifications, fitted, e.where(), e.problem(), all);
    }
}
