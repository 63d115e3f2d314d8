package org.forkscape.fit;

import org.forkscape.plan.Plan;
import org.forkscape.plan.Transform;

/**
 * Fits one specification in full, for the reader who opens it: every coefficient with its standard error
 * of the specification's type, t statistic, p-value and interval, by the same estimator the run uses,
 * asked for every coefficient ({@link Estimator#fitAll}). For least squares the rows are refit by
 * Householder QR ({@link QrRefit}, the engine's precision route), so the key estimate and standard error
 * agree with the engine's to rounding.
 */
public final class FullFitter {
    private final Estimator estimator = new ModelDispatch(true);
    private final ObservedRows rows = new ObservedRows();

    /** Fits specification {@code index} (0-based, in the plan's full space) of the plan over its data. */
    public FullFit fit(Plan plan, SpecificationModels models, long index) {
        long[] choices = new long[models.space().decisionCount()];
        models.space().decode(index, choices);
        DataVariant variant = models.variant(models.variantKey(models.variantOrdinal(choices)));
        CompiledPlan compiled = models.compiled();
        CompiledPlan.CodedVariable key = compiled.predictors[(int) choices[compiled.predictorAt]];
        String keyTerm = key.transform() instanceof Transform.Identity ? key.column().name()
                : key.transform().spelling() + "(" + key.column().name() + ")";
        return fit(variant, models.model(choices), plan.confidence(), keyTerm);
    }

    FullFit fit(DataVariant variant, SpecificationModel spec, double confidence, String keyTerm) {
        return estimator.fitAll(spec, rows.of(variant), confidence, keyTerm);
    }
}
