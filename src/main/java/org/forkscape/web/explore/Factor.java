package org.forkscape.web.explore;

import java.util.List;

/**
 * One way specifications differ, as the explorer groups them: a decision with its alternatives as levels,
 * except that an all-subsets controls decision contributes one factor per optional control, with the
 * levels {@code without} (0) and {@code with} (1).
 *
 * @param id            position in {@link RankedRun#factors()}
 * @param decision      the decision's name
 * @param decisionIndex the decision's position in the plan
 * @param control       the optional control's column for a control factor, otherwise {@code null}
 * @param controlBit    the control's bit in the decision's subset mask, or -1
 * @param levels        level labels: the alternatives' labels, or {@code without}/{@code with}
 */
public record Factor(int id, String decision, int decisionIndex, String control, int controlBit, List<String> levels) {
    public Factor {
        levels = List.copyOf(levels);
    }

    public boolean isControl() {
        return control != null;
    }

    /** What the factor is called on screen: the decision, or the optional control. */
    public String name() {
        return isControl() ? control : decision;
    }

    /** A level in words, for sentences: {@code outcome = log trips}, {@code with income}. */
    public String describe(int level) {
        if (isControl()) {
            return (level == 1 ? "with " : "without ") + control;
        }
        return decision + " = " + levels.get(level);
    }
}
