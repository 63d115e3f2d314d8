package org.forkscape.fit;

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
    private final ControlRef[][] requiredRefs;
    private final ControlRef[][] optionalRefs;
    private final ControlRef[][][] setRefs;
    private final ErrorType[] errorTypes;
    private final long[] errorBits;
    private final long[] absorbBits;

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
        requiredRefs = new ControlRef[controlsAt.length][];
        optionalRefs = new ControlRef[controlsAt.length][];
        setRefs = new ControlRef[controlsAt.length][][];
        for (int d = 0; d < controlsAt.length; d++) {
            Decision.Controls c = (Decision.Controls) ds.get(controlsAt[d]);
            requiredRefs[d] = refs(c.required());
            optionalRefs[d] = refs(c.optional());
            if (!c.allSubsets()) {
                setRefs[d] = c.sets().values().stream().map(this::refs).toArray(ControlRef[][]::new);
            }
        }
        if (errorsAt >= 0) {
            List<ErrorType> types = ((Decision.Errors) ds.get(errorsAt)).alternatives();
            errorTypes = types.toArray(new ErrorType[0]);
            errorBits = new long[types.size()];
            for (int e = 0; e < types.size(); e++) {
                if (types.get(e).kind() == ErrorType.Kind.CLUSTER) {
                    errorBits[e] = 1L << layout.variable(types.get(e).clusterColumn(), true);
                }
            }
        } else {
            errorTypes = new ErrorType[0];
            errorBits = new long[0];
        }
        if (absorbAt >= 0) {
            List<org.forkscape.plan.AbsorbChoice> choices = ((Decision.Absorb) ds.get(absorbAt)).alternatives();
            absorbBits = new long[choices.size()];
            for (int a = 0; a < choices.size(); a++) {
                for (String col : choices.get(a).columns()) {
                    absorbBits[a] |= 1L << layout.variable(col, true);
                }
            }
        } else {
            absorbBits = new long[0];
        }
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
        int[] buffer = new int[layout.size()];
        boolean[] taken = new boolean[layout.size()];
        int count = 0;
        for (int d = 0; d < controlsAt.length; d++) {
            ControlRef[] required = requiredRefs[d];
            for (ControlRef ref : required) {
                mask |= ref.bit();
                count = append(ref.columns(), buffer, taken, count);
            }
            long choice = choices[controlsAt[d]];
            if (setRefs[d] == null) {
                ControlRef[] optional = optionalRefs[d];
                for (int j = 0; j < optional.length; j++) {
                    if ((choice >>> j & 1L) != 0) {
                        mask |= optional[j].bit();
                        count = append(optional[j].columns(), buffer, taken, count);
                    }
                }
            } else {
                for (ControlRef ref : setRefs[d][(int) choice]) {
                    mask |= ref.bit();
                    count = append(ref.columns(), buffer, taken, count);
                }
            }
        }
        ErrorType errors = ErrorType.CLASSICAL;
        if (errorsAt >= 0) {
            errors = errorTypes[(int) choices[errorsAt]];
            mask |= errorBits[(int) choices[errorsAt]];
        }
        if (absorbAt >= 0) {
            mask |= absorbBits[(int) choices[absorbAt]];
        }
        return new SpecificationModel(layout.outcomeColumn(outcome), java.util.Arrays.copyOf(buffer, count),
                layout.predictorColumn(predictor), mask, errors);
    }

    private static int append(int[] columns, int[] buffer, boolean[] taken, int count) {
        for (int col : columns) {
            if (!taken[col]) {
                taken[col] = true;
                buffer[count++] = col;
            }
        }
        return count;
    }

    /** A control's model columns and its variable's bit, looked up once. */
    private record ControlRef(int[] columns, long bit) {
    }

    private ControlRef ref(String name) {
        return new ControlRef(layout.controlColumns(name), 1L << layout.variable(name, true));
    }

    private ControlRef[] refs(List<String> names) {
        return names.stream().map(this::ref).toArray(ControlRef[]::new);
    }
}
