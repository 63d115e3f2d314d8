package org.forkscape.infer;

import org.forkscape.InputException;
import org.forkscape.plan.Plan;

/**
 * What the null draws of a run are: how many, by which method, from which seed, and the column whose
 * clusters the bootstrap resamples whole ({@code null} for single rows).
 */
public record NullDrawSettings(int draws, NullMethod method, long seed, String clusterColumn) {
    /** The cap on draws unless the caller sets another: 10,000 draws put p-values on a 0.0001 grid. */
    public static final int DEFAULT_MAX_DRAWS = 10_000;

    /** The settings a plan asks for (after command-line overrides). */
    public static NullDrawSettings of(Plan plan) {
        return new NullDrawSettings(plan.nullDraws(), NullMethod.of(plan.nullMethod()), plan.seed(), plan.nullCluster());
    }

    /**
     * Refuses settings that cannot run.
     *
     * @param drawsWhere   the plan key or command-line option the number of draws came from, for the message
     * @param clusterWhere likewise for the cluster column
     */
    public void check(int maxDraws, String drawsWhere, String clusterWhere) {
        if (draws > maxDraws) {
            throw new InputException(drawsWhere, String.format("%,d null draws are above the cap of %,d; ask for "
                    + "fewer, or raise the cap with --max-null-draws", draws, maxDraws));
        }
        if (draws > 0 && method == NullMethod.PERMUTE && clusterColumn != null) {
            throw new InputException(clusterWhere, "whole clusters are resampled by the bootstrap only; the "
                    + "permutation shuffles the key predictor between rows, so drop the cluster or use the bootstrap");
        }
    }
}
