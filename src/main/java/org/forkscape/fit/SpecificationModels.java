package org.forkscape.fit;

import java.util.concurrent.ExecutorService;
import org.forkscape.data.Table;
import org.forkscape.plan.ErrorType;
import org.forkscape.plan.ModelFamily;
import org.forkscape.plan.Plan;
import org.forkscape.plan.SpecificationSpace;

/**
 * Turns a specification's choices into what the engine fits: its data variant and its
 * {@link SpecificationModel}, both from the plan compiled once ({@link CompiledPlan}).
 */
public final class SpecificationModels {
    private final CompiledPlan plan;
    private final SpecificationSpace space;
    private final long[] sampleRadix;
    private final long variantCount;
    private final VariantSource variants;

    public SpecificationModels(Plan plan, Table table) {
        this(plan, table, null);
    }

    /**
     * @param variants where the variants come from; null to code them from {@code table}'s rows (a table
     *                 with the columns and no rows will do when they come from elsewhere)
     */
    public SpecificationModels(Plan plan, Table table, VariantSource variants) {
        this.plan = new CompiledPlan(plan, table);
        this.variants = variants != null ? variants : (key, pool) -> VariantBuilder.build(this.plan, key, pool);
        this.space = new SpecificationSpace(plan);
        int[] sampleAt = this.plan.sampleAt;
        sampleRadix = new long[sampleAt.length];
        long count = 1;
        for (int s = 0; s < sampleAt.length; s++) {
            sampleRadix[s] = this.plan.samples[s].alternativeCount();
            count *= sampleRadix[s];
        }
        variantCount = count * this.plan.absorbAlternatives() * this.plan.weightAlternatives();
    }

    public ModelColumns layout() {
        return plan.layout;
    }

    CompiledPlan compiled() {
        return plan;
    }

    public SpecificationSpace space() {
        return space;
    }

    /** Number of distinct data variants (sample alternatives times absorb alternatives times weights alternatives). */
    public long variantCount() {
        return variantCount;
    }

    /** The variant ordinal of a specification's choices, 0..variantCount-1. */
    public int variantOrdinal(long[] choices) {
        int[] sampleAt = plan.sampleAt;
        long v = 0;
        for (int s = 0; s < sampleAt.length; s++) {
            v = v * sampleRadix[s] + choices[sampleAt[s]];
        }
        if (plan.absorbAt >= 0) {
            v = v * plan.absorbAlternatives() + choices[plan.absorbAt];
        }
        if (plan.weightsAt >= 0) {
            v = v * plan.weightAlternatives() + choices[plan.weightsAt];
        }
        return (int) v;
    }

    /** The variant key of an ordinal. */
    public VariantKey variantKey(int ordinal) {
        long rest = ordinal;
        int weights = -1;
        if (plan.weightsAt >= 0) {
            long r = plan.weightAlternatives();
            weights = (int) (rest % r);
            rest /= r;
        }
        int absorb = -1;
        if (plan.absorbAt >= 0) {
            long r = plan.absorbAlternatives();
            absorb = (int) (rest % r);
            rest /= r;
        }
        int[] samples = new int[sampleRadix.length];
        for (int s = sampleRadix.length - 1; s >= 0; s--) {
            samples[s] = (int) (rest % sampleRadix[s]);
            rest /= sampleRadix[s];
        }
        return new VariantKey(samples, absorb, weights);
    }

    /**
     * Builds the data variant of {@code key} over the plan's table. Plan errors that only the data reveal (a
     * log of a non-positive value, a trim on a constant column) are thrown here as
     * {@link org.forkscape.plan.PlanException}.
     */
    public DataVariant variant(VariantKey key) {
        return variant(key, null);
    }

    /** As above, summing row blocks on {@code pool} when given (the result does not depend on it). */
    public DataVariant variant(VariantKey key, ExecutorService pool) {
        return variants.variant(key, pool);
    }

    /** Bootstrap draws made where the rows are held, or null when the variants hold their rows ({@link VariantSource#bootstrap}). */
    public BootstrapByParts bootstrap(BootstrapDesign design) {
        return variants.bootstrap(design);
    }

    /** The model of a specification from its decoded choices. */
    public SpecificationModel model(long[] choices) {
        ModelColumns layout = plan.layout;
        int outcome = (int) choices[plan.outcomeAt];
        int predictor = (int) choices[plan.predictorAt];
        long mask = 1L << plan.outcomes[outcome].variable() | 1L << plan.predictors[predictor].variable();
        int[] buffer = new int[layout.size()];
        boolean[] taken = new boolean[layout.size()];
        int count = 0;
        for (CompiledPlan.ControlDecision d : plan.controls) {
            for (CompiledPlan.ControlRef ref : d.required()) {
                mask |= ref.bit();
                count = append(ref.columns(), buffer, taken, count);
            }
            long choice = choices[d.at()];
            if (d.sets() == null) {
                CompiledPlan.ControlRef[] optional = d.optional();
                for (int j = 0; j < optional.length; j++) {
                    if ((choice >>> j & 1L) != 0) {
                        mask |= optional[j].bit();
                        count = append(optional[j].columns(), buffer, taken, count);
                    }
                }
            } else {
                for (CompiledPlan.ControlRef ref : d.sets()[(int) choice]) {
                    mask |= ref.bit();
                    count = append(ref.columns(), buffer, taken, count);
                }
            }
        }
        ErrorType errors = ErrorType.CLASSICAL;
        if (plan.errorsAt >= 0) {
            errors = plan.errorTypes[(int) choices[plan.errorsAt]];
            mask |= plan.errorBits[(int) choices[plan.errorsAt]];
        }
        if (plan.absorbAt >= 0) {
            mask |= plan.absorbBits[(int) choices[plan.absorbAt]];
        }
        if (plan.weightsAt >= 0) {
            mask |= plan.weightBits[(int) choices[plan.weightsAt]];
        }
        ModelFamily family = plan.modelAt < 0 ? ModelFamily.OLS : plan.families[(int) choices[plan.modelAt]];
        return new SpecificationModel(plan.outcomes[outcome].modelColumn(), java.util.Arrays.copyOf(buffer, count),
                plan.predictors[predictor].modelColumn(), mask, errors, family);
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
}
