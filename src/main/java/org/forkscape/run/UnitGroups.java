package org.forkscape.run;

import java.util.ArrayList;
import java.util.List;
import org.forkscape.plan.Decision;
import org.forkscape.plan.Plan;
import org.forkscape.plan.SpecificationSpace;

/**
 * The comparable groups of a run's estimates as fitted: one per outcome alternative and key-predictor
 * alternative, numbered {@code outcome * predictors + predictor} in plan order. Within a group every
 * estimate is in the same units (outcome units per predictor unit); across groups only the unit-free
 * {@link Scale scales} compare. (Not the likelihood groups of the inference stage, which also fix the rows.)
 */
public final class UnitGroups {
    /**
     * @param id              the group's number, as in the explorer's {@code group} parameter
     * @param outcomeChoice   the outcome alternative's position in its decision
     * @param predictorChoice the key-predictor alternative's position in its decision
     * @param outcome         the outcome alternative's label
     * @param predictor       the key-predictor alternative's label
     * @param fitted          fitted specifications in the group
     */
    public record Group(int id, int outcomeChoice, int predictorChoice, String outcome, String predictor, int fitted) {
    }

    private final Plan plan;
    private final List<Group> groups;
    private final int[] groupOfSlot;

    private UnitGroups(Plan plan, List<Group> groups, int[] groupOfSlot) {
        this.plan = plan;
        this.groups = groups;
        this.groupOfSlot = groupOfSlot;
    }

    public static UnitGroups of(RunResult run) {
        Plan plan = run.plan();
        List<Decision> decisions = plan.decisions();
        int outcomeAt = decisions.indexOf(plan.outcome());
        int predictorAt = decisions.indexOf(plan.predictor());
        int outcomes = (int) plan.outcome().alternativeCount();
        int predictors = (int) plan.predictor().alternativeCount();
        ResultTable r = run.results();
        SpecificationSpace space = run.models().space();
        long[] choices = new long[decisions.size()];
        int[] groupOf = new int[r.size()];
        int[] fitted = new int[outcomes * predictors];
        for (int slot = 0; slot < r.size(); slot++) {
            space.decode(r.specIndex(slot), choices);
            int g = (int) choices[outcomeAt] * predictors + (int) choices[predictorAt];
            groupOf[slot] = g;
            if (r.fitted(slot)) {
                fitted[g]++;
            }
        }
        List<Group> groups = new ArrayList<>();
        for (int o = 0; o < outcomes; o++) {
            for (int p = 0; p < predictors; p++) {
                int g = o * predictors + p;
                groups.add(new Group(g, o, p, plan.outcome().label(o), plan.predictor().label(p), fitted[g]));
            }
        }
        return new UnitGroups(plan, List.copyOf(groups), groupOf);
    }

    /** Every outcome-by-predictor group, fitted or not, by number. */
    public List<Group> groups() {
        return groups;
    }

    public int groupOf(int slot) {
        return groupOfSlot[slot];
    }

    /** Whether estimates as fitted come in more than one set of units: fitted specifications in two groups or more. */
    public boolean unitsDiffer() {
        return groups.stream().filter(g -> g.fitted() > 0).count() > 1;
    }

    /** The first group with a fitted specification (0 when none has). */
    public int firstFitted() {
        return groups.stream().filter(g -> g.fitted() > 0).mapToInt(Group::id).findFirst().orElse(0);
    }

    /**
     * What one unit of a scale is, in words, for an axis: as fitted, the group's outcome per unit of its key
     * predictor; on the common scales, in the decisions' names.
     */
    public String unit(Scale scale, Group group) {
        String outcome = plan.outcome().name();
        String predictor = plan.predictor().name();
        return switch (scale) {
            case AS_FITTED -> group.outcome() + " per unit of " + predictor + " (" + group.predictor() + ")";
            case STANDARDIZED -> "standard deviations of " + outcome + " per standard deviation of " + predictor;
            case PARTIAL_CORRELATION -> "partial correlation of " + outcome + " and " + predictor
                    + " given the controls";
            case T_STATISTIC -> "t statistic of " + predictor + " (estimate / standard error)";
        };
    }
}
