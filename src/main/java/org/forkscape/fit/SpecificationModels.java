package org.forkscape.fit;

import java.util.ArrayList;
import java.util.List;
import org.forkscape.data.Table;
import org.forkscape.plan.Decision;
import org.forkscape.plan.ErrorType;
import org.forkscape.plan.Plan;
import org.forkscape.plan.SpecificationSpace;

/**
 * Turns a specification's choices into what the engine fits: its data variant and its
 * {@link SpecificationModel}. Decision positions are looked up once.
 */
public final class SpecificationModels {
    private final Plan plan;
    private final ModelColumns layout;
    private final SpecificationSpace space;
    private final int outcomeAt;
    private final int predictorAt;
    private final int[] controlsAt;
    private final int[] sampleAt;
    private final int errorsAt;
    private final int absorbAt;
    private final long[] sampleRadix;
    private final long variantCount;

    public SpecificationModels(Plan plan, Table table) {
        this.plan = plan;
        this.layout = new ModelColumns(plan, table);
        this.space = new SpecificationSpace(plan);
        List<Decision> ds = plan.decisions();
        outcomeAt = DataVariant.decisionIndices(plan, Decision.Outcome.class)[0];
        predictorAt = DataVariant.decisionIndices(plan, Decision.Predictor.class)[0];
        controlsAt = DataVariant.decisionIndices(plan, Decision.Controls.class);
        sampleAt = DataVariant.decisionIndices(plan, Decision.Sample.class);
        int[] errors = DataVariant.decisionIndices(plan, Decision.Errors.class);
        errorsAt = errors.length == 0 ? -1 : errors[0];
        int[] absorb = DataVariant.decisionIndices(plan, Decision.Absorb.class);
        absorbAt = absorb.length == 0 ? -1 : absorb[0];
        sampleRadix = new long[sampleAt.length];
        long count = 1;
        for (int s = 0; s < sampleAt.length; s++) {
            sampleRadix[s] = ds.get(sampleAt[s]).alternativeCount();
            count *= sampleRadix[s];
        }
        variantCount = count * (absorbAt < 0 ? 1 : ds.get(absorbAt).alternativeCount());
    }

    public ModelColumns layout() {
        return layout;
    }

    public SpecificationSpace space() {
        return space;
    }

    /** Number of distinct data variants (sample alternatives times absorb alternatives). */
    public long variantCount() {
        return variantCount;
    }

    /** The variant ordinal of a specification's choices, 0..variantCount-1. */
    public int variantOrdinal(long[] choices) {
        long v = 0;
        for (int s = 0; s < sampleAt.length; s++) {
            v = v * sampleRadix[s] + choices[sampleAt[s]];
        }
        if (absorbAt >= 0) {
            v = v * plan.decisions().get(absorbAt).alternativeCount() + choices[absorbAt];
        }
        return (int) v;
    }

    /** The variant key of an ordinal. */
    public VariantKey variantKey(int ordinal) {
        long rest = ordinal;
        int absorb = -1;
        if (absorbAt >= 0) {
            long r = plan.decisions().get(absorbAt).alternativeCount();
            absorb = (int) (rest % r);
            rest /= r;
        }
        int[] samples = new int[sampleAt.length];
        for (int s = sampleAt.length - 1; s >= 0; s--) {
            samples[s] = (int) (rest % sampleRadix[s]);
            rest /= sampleRadix[s];
        }
        return new VariantKey(samples, absorb);
    }

    /** The model of a specification from its decoded choices. */
    public SpecificationModel model(long[] choices) {
        int outcome = (int) choices[outcomeAt];
        int predictor = (int) choices[predictorAt];
        long mask = 1L << layout.outcomeVariable(outcome) | 1L << layout.predictorVariable(predictor);
        List<Integer> controlCols = new ArrayList<>();
        for (int at : controlsAt) {
            Decision.Controls c = (Decision.Controls) plan.decisions().get(at);
            List<String> names = new ArrayList<>(c.required());
            names.addAll(c.chosen(choices[at]));
            for (String name : names) {
                mask |= 1L << layout.variable(name, true);
                for (int col : layout.controlColumns(name)) {
                    if (!controlCols.contains(col)) {
                        controlCols.add(col);
                    }
                }
            }
        }
        ErrorType errors = ErrorType.CLASSICAL;
        if (errorsAt >= 0) {
            errors = ((Decision.Errors) plan.decisions().get(errorsAt)).alternatives().get((int) choices[errorsAt]);
            if (errors.kind() == ErrorType.Kind.CLUSTER) {
                mask |= 1L << layout.variable(errors.clusterColumn(), true);
            }
        }
        if (absorbAt >= 0) {
            for (String col : ((Decision.Absorb) plan.decisions().get(absorbAt)).alternatives()
                    .get((int) choices[absorbAt]).columns()) {
                mask |= 1L << layout.variable(col, true);
            }
        }
        int[] controls = controlCols.stream().mapToInt(Integer::intValue).toArray();
        return new SpecificationModel(layout.outcomeColumn(outcome), controls, layout.predictorColumn(predictor), mask,
                errors);
    }
}
