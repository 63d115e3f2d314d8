package org.forkscape.web.plan;

/**
 * The answer to "can this plan run on this analysis's data?", as the plan form shows it.
 *
 * @param valid          whether the plan reads, fits its data and is under the specification cap
 * @param specifications specifications in the plan's space, or -1 when the plan does not read
 * @param fitted         specifications a run would fit (the sample size when the plan asks for one), or -1
 * @param where          for an invalid plan, the JSON path of the field the problem concerns
 * @param message        for an invalid plan, the problem in a sentence
 */
public record PlanCheck(boolean valid, long specifications, long fitted, String where, String message) {
}
