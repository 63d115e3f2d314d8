package org.forkscape.fit;

import java.util.concurrent.ExecutorService;
import org.forkscape.data.Column;

/**
 * Assembles a data variant, one job after another: the table rows it keeps ({@link RowSelection}), the
 * outcome and predictor alternatives coded over them ({@link ColumnCoding}), the analytic weights, which drop
 * rows whose weight is missing or zero ({@link AnalyticWeights}), the absorbed fixed effect's
 * levels, which drop rows missing it ({@link FixedEffectLevels}), the controls, the cluster codes
 * ({@link ClusterCodes}), the missing-pattern groups ({@link MissingPatterns}) and the level shifts
 * ({@link LevelShifts}): the {@link CodedRows}; then the cell sums of its statistics ({@link CellSums}).
 * The same steps code one part of a variant's rows when the facts that need all of them are given
 * ({@link WholeRows}, see {@link VariantByParts}).
 */
final class VariantBuilder {
    private VariantBuilder() {
    }

    /** The steps' results over the rows at hand, before they are joined into {@link CodedRows}. */
    record Coding(FixedEffectLevels levels, double[] weight, LevelShifts shifts, MissingPatterns patterns,
            ClusterCodes clusters, double[][] recorded) {
        CodedRows coded(CompiledPlan plan) {
            return new CodedRows(plan.layout, levels, weight, shifts, patterns, clusters, recorded);
        }
    }

    /**
     * The variant {@code key} of the compiled plan. Plan errors that only the data reveal (a log of a
     * non-positive value, a trim on a constant column) are thrown as {@link org.forkscape.plan.PlanException}.
     *
     * @param pool where to sum row blocks (the result does not depend on it), or null
     */
    static DataVariant build(CompiledPlan plan, VariantKey key, ExecutorService pool) {
        CodedRows coded = code(plan, key, WholeRows.NONE).coded(plan);
        return new DataVariant(coded, new CellSums(coded, pool));
    }

    /** Codes the variant's rows of {@code plan}'s table, taking from {@code whole} the facts it gives. */
    static Coding code(CompiledPlan plan, VariantKey key, WholeRows whole) {
        int[] sampled = RowSelection.of(plan, key, whole);
        double[][] raw = ColumnCoding.alternatives(plan, sampled, plan.describeRows(key.sampleChoices()), whole);
        AnalyticWeights weights = AnalyticWeights.of(
                key.weightChoice() < 0 ? null : plan.weightColumns[key.weightChoice()], sampled);
        weights.compact(raw);
        FixedEffectLevels levels = FixedEffectLevels.of(absorbedColumns(plan, key), weights.tableRows, whole);
        levels.compact(raw);
        ColumnCoding.controls(plan, levels.tableRows, raw);
        ClusterCodes clusters = new ClusterCodes(plan, levels.tableRows, whole);
        MissingPatterns patterns = new MissingPatterns(plan, raw, clusters, levels.tableRows.length);
        double[][] recorded = plan.generalized ? recorded(plan, raw) : null;
        LevelShifts shifts = new LevelShifts(raw, levels, whole);
        return new Coding(levels, weights.at(levels), shifts, patterns, clusters, recorded);
    }

    /** The columns the variant absorbs: none, one or several. */
    static Column[] absorbedColumns(CompiledPlan plan, VariantKey key) {
        return key.absorbChoice() < 0 ? new Column[0] : plan.absorbColumns[key.absorbChoice()];
    }

    /**
     * The one column the variant absorbs, or null, for a runner by parts ({@link VariantByParts}), which
     * absorbs at most one (the Spark runner refuses plans with several).
     */
    static Column absorbed(CompiledPlan plan, VariantKey key) {
        Column[] columns = absorbedColumns(plan, key);
        if (columns.length > 1) {
            throw new IllegalStateException("a variant built by parts absorbs one column at most");
        }
        return columns.length == 0 ? null : columns[0];
    }

    /**
     * Copies of the outcome and predictor columns as coded, before the level shifts replace them: a
     * generalized linear model fits the outcome's own 0/1 or count values, and a 0/1 key predictor's
     * discrete change is taken from 0 to 1 (the other entries are null).
     */
    private static double[][] recorded(CompiledPlan plan, double[][] raw) {
        double[][] copy = new double[raw.length][];
        for (CompiledPlan.CodedVariable v : plan.outcomes) {
            copy[v.modelColumn()] = raw[v.modelColumn()].clone();
        }
        for (CompiledPlan.CodedVariable v : plan.predictors) {
            copy[v.modelColumn()] = raw[v.modelColumn()].clone();
        }
        return copy;
    }
}
