package org.forkscape.run;

import java.util.ArrayList;
import java.util.List;
import org.forkscape.plan.Decision;
import org.forkscape.plan.ModelFamily;
import org.forkscape.plan.Plan;
import org.forkscape.plan.SpecificationSpace;

/**
 * The comparable groups of a run's estimates on a scale that has units. As fitted: one per outcome
 * alternative, key-predictor alternative and, when the plan has a model decision, model, because a logit
 * coefficient (log-odds) and a least-squares one are never in the same units; numbered
 * {@code (outcome * predictors + predictor) * models + model} in plan order. On the average-marginal-effect
 * scale: one per outcome and key-predictor alternative, numbered {@code outcome * predictors + predictor},
 * since every model's effect is in units of the outcome itself. Within a group every value is in the same
 * units; across groups only the unit-free {@link Scale scales} compare. (Not the likelihood groups of the
 * inference stage, which also fix the rows.)
 */
public final class UnitGroups {
    /**
     * @param id              the group's number, as in the explorer's {@code group} parameter
     * @param outcomeChoice   the outcome alternative's position in its decision
     * @param predictorChoice the key-predictor alternative's position in its decision
     * @param modelChoice     the model alternative's position in the model decision, -1 when the groups do not
     *                        fix the model
     * @param outcome         the outcome alternative's label
     * @param predictor       the key-predictor alternative's label
     * @param model           the model the group fixes, {@code null} when it fixes none
     * @param fitted          fitted specifications in the group
     */
    public record Group(int id, int outcomeChoice, int predictorChoice, int modelChoice, String outcome,
            String predictor, ModelFamily model, int fitted) {
        /** The group in words: "turnout on hours", with ", logit" when it fixes the model. */
        public String title() {
            return outcome + " on " + predictor + (model == null ? "" : ", " + model.spelling());
        }
    }

    private final Plan plan;
    private final List<Group> groups;
    private final int[] groupOfSlot;

    private UnitGroups(Plan plan, List<Group> groups, int[] groupOfSlot) {
        this.plan = plan;
        this.groups = groups;
        this.groupOfSlot = groupOfSlot;
    }

    /** The groups of the estimates as fitted. */
    public static UnitGroups of(RunResult run) {
        return of(run, Scale.AS_FITTED);
    }

    /**
     * The groups of a scale with units: as fitted (outcome x key coding x model) or the average marginal
     * effect (outcome x key coding).
     */
    public static UnitGroups of(RunResult run, Scale scale) {
        if (scale.unitFree()) {
            throw new IllegalArgumentException("the " + scale.title() + " scale is unit-free and has no groups");
        }
        Plan plan = run.plan();
        List<Decision> decisions = plan.decisions();
        int outcomeAt = decisions.indexOf(plan.outcome());
        int predictorAt = decisions.indexOf(plan.predictor());
        List<Decision.Model> modelDecisions = plan.all(Decision.Model.class);
        Decision.Model modelDecision = scale == Scale.AS_FITTED && !modelDecisions.isEmpty() ? modelDecisions.get(0)
                : null;
        int modelAt = modelDecision == null ? -1 : decisions.indexOf(modelDecision);
        int outcomes = (int) plan.outcome().alternativeCount();
        int predictors = (int) plan.predictor().alternativeCount();
        int models = modelDecision == null ? 1 : modelDecision.alternatives().size();
        ResultTable r = run.results();
        SpecificationSpace space = run.models().space();
        long[] choices = new long[decisions.size()];
        int[] groupOf = new int[r.size()];
        int[] fitted = new int[outcomes * predictors * models];
        for (int slot = 0; slot < r.size(); slot++) {
            space.decode(r.specIndex(slot), choices);
            int g = ((int) choices[outcomeAt] * predictors + (int) choices[predictorAt]) * models
                    + (modelAt < 0 ? 0 : (int) choices[modelAt]);
            groupOf[slot] = g;
            if (r.fitted(slot)) {
                fitted[g]++;
            }
        }
        List<Group> groups = new ArrayList<>();
        for (int o = 0; o < outcomes; o++) {
            for (int p = 0; p < predictors; p++) {
                for (int m = 0; m < models; m++) {
                    int g = (o * predictors + p) * models + m;
                    groups.add(new Group(g, o, p, modelDecision == null ? -1 : m, plan.outcome().label(o),
                            plan.predictor().label(p), modelDecision == null ? null : modelDecision.alternatives().get(m),
                            fitted[g]));
                }
            }
        }
        return new UnitGroups(plan, List.copyOf(groups), groupOf);
    }

    /** Every group, fitted or not, by number. */
    public List<Group> groups() {
        return groups;
    }

    public int groupOf(int slot) {
        return groupOfSlot[slot];
    }

    /** Whether the values come in more than one set of units: fitted specifications in two groups or more. */
    public boolean unitsDiffer() {
        return groups.stream().filter(g -> g.fitted() > 0).count() > 1;
    }

    /** The first group with a fitted specification (0 when none has). */
    public int firstFitted() {
        return groups.stream().filter(g -> g.fitted() > 0).mapToInt(Group::id).findFirst().orElse(0);
    }

    /**
     * What one unit of a scale is, in words, for an axis: as fitted, the group's outcome (on its model's link
     * scale) per unit of its key predictor; for the average marginal effect, the change in the outcome (in the
     * probability of it, when the plan fits a logit or probit, whose outcomes are 0/1) per unit of the key
     * predictor; on the unit-free scales, in the decisions' names.
     */
    public String unit(Scale scale, Group group) {
        String outcome = plan.outcome().name();
        String predictor = plan.predictor().name();
        return switch (scale) {
            case AS_FITTED -> linkScale(group.model() == null ? ModelFamily.OLS : group.model(), group.outcome())
                    + " per unit of " + predictor + " (" + group.predictor() + ")";
            case AVERAGE_MARGINAL_EFFECT -> "change in "
                    + (plan.modelFamilies().stream().anyMatch(ModelFamily::binary) ? "the probability of " : "")
                    + group.outcome() + " per unit of " + predictor + " (" + group.predictor() + ")";
            case STANDARDIZED -> "standard deviations of " + outcome + " per standard deviation of " + predictor;
            case PARTIAL_CORRELATION -> "partial correlation of " + outcome + " and " + predictor
                    + " given the controls";
            case T_STATISTIC -> plan.generalized()
                    ? "t or z statistic of " + predictor + " (estimate / standard error; z for logit, probit and Poisson)"
                    : "t statistic of " + predictor + " (estimate / standard error)";
        };
    }

    /** The outcome on the scale of a model's linear predictor. */
    private static String linkScale(ModelFamily model, String outcome) {
        return switch (model) {
            case OLS -> outcome;
            case LOGIT -> "log-odds of " + outcome;
            case PROBIT -> "probit index (normal quantile of the probability) of " + outcome;
            case POISSON -> "log of the expected " + outcome;
        };
    }
}
