package org.forkscape.plan;

import java.util.ArrayList;
import java.util.List;

/**
 * One way specifications differ: a decision with its alternatives as levels, except that an all-subsets
 * controls decision contributes one factor per optional control, with the levels 0 (left out) and 1 (put
 * in), the control's bit in the decision's subset mask. The explorer filters, groups and draws its choice
 * grid by factors, and the inference stage's influence analysis takes them as the factors of its analysis
 * of variance; both get them from {@link #listOf(Plan)}, so both number factors and levels alike.
 *
 * <p>It belongs to {@code plan} because a factor is a function of the plan's decisions and of the
 * specification space's choices alone: {@code infer} and {@code web} both depend on {@code plan}, while
 * {@code infer} must not depend on {@code web}, and the explorer's filters have no business with the
 * inference package.
 *
 * <p>A control's levels are worded for where they are shown: the explorer says {@code without} and
 * {@code with} ({@link #levels()}, {@link #describe(int)}); the inference report (summary.json's influence
 * sections and the influence sentence) says {@code out} and {@code in} and lists {@code in} first
 * ({@link #reportLabel(int)}, {@link #reportOrder()}).
 *
 * @param id            position in {@link #listOf(Plan)}
 * @param decision      the decision's name
 * @param decisionIndex the decision's position in the plan
 * @param control       the optional control's column for a control factor, otherwise {@code null}
 * @param controlBit    the control's bit in the decision's subset mask, or -1
 * @param levels        level labels: the alternatives' labels, or {@code without}/{@code with}
 */
public record Factor(int id, String decision, int decisionIndex, String control, int controlBit, List<String> levels) {
    private static final List<String> CONTROL_LEVELS = List.of("without", "with");
    private static final int[] CONTROL_REPORT_ORDER = {1, 0};

    public Factor {
        levels = List.copyOf(levels);
    }

    /** A plan's factors in plan order, each all-subsets decision's optional controls in their listed order. */
    public static List<Factor> listOf(Plan plan) {
        List<Decision> decisions = plan.decisions();
        List<Factor> out = new ArrayList<>();
        for (int d = 0; d < decisions.size(); d++) {
            Decision decision = decisions.get(d);
            if (decision instanceof Decision.Controls c && c.allSubsets()) {
                for (int j = 0; j < c.optional().size(); j++) {
                    out.add(new Factor(out.size(), c.name(), d, c.optional().get(j), j, CONTROL_LEVELS));
                }
            } else {
                List<String> labels = new ArrayList<>();
                for (long a = 0; a < decision.alternativeCount(); a++) {
                    labels.add(decision.label(a));
                }
                out.add(new Factor(out.size(), decision.name(), d, null, -1, labels));
            }
        }
        return List.copyOf(out);
    }

    public boolean isControl() {
        return control != null;
    }

    /** What the factor is called on screen and in summary.json: the decision, or the optional control. */
    public String name() {
        return isControl() ? control : decision;
    }

    /** The level of the specification whose choices {@link SpecificationSpace#decode} wrote. */
    public int levelOf(long[] choices) {
        long c = choices[decisionIndex];
        return isControl() ? (int) (c >>> controlBit & 1L) : (int) c;
    }

    /** A level in words, for the explorer's sentences: {@code outcome = log trips}, {@code with income}. */
    public String describe(int level) {
        if (isControl()) {
            return (level == 1 ? "with " : "without ") + control;
        }
        return decision + " = " + levels.get(level);
    }

    /** A level as the inference report names it: the alternative's label, or {@code in}/{@code out}. */
    public String reportLabel(int level) {
        if (isControl()) {
            return level == 1 ? "in" : "out";
        }
        return levels.get(level);
    }

    /** The levels in the order the inference report lists them: a control's {@code in} before its {@code out}. */
    public int[] reportOrder() {
        if (isControl()) {
            return CONTROL_REPORT_ORDER.clone();
        }
        int[] order = new int[levels.size()];
        for (int l = 0; l < order.length; l++) {
            order[l] = l;
        }
        return order;
    }
}
