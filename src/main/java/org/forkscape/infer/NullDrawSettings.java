package org.forkscape.infer;

import java.util.List;
import org.forkscape.InputException;
import org.forkscape.plan.Plan;

/**
 * What the null draws of a run are: how many, by which method, from which seed, and the column whose
 * clusters the bootstrap resamples whole ({@code null} for single rows).
 *
 * @param clusterColumn the column whose clusters are resampled whole, or {@code null} for single rows
 * @param byDefault     whether the unit was chosen by {@link #of} because neither the plan nor the command
 *                      line named one (rather than asked for)
 */
public record NullDrawSettings(int draws, NullMethod method, long seed, String clusterColumn, boolean byDefault) {
    /** The cap on draws unless the caller sets another: 10,000 draws put p-values on a 0.0001 grid. */
    public static final int DEFAULT_MAX_DRAWS = 10_000;

    /**
     * The settings a plan asks for (after command-line overrides). A named column is resampled whole and
     * {@link Plan#NULL_CLUSTER_ROWS} means single rows. When neither is named, the bootstrap resamples the
     * clusters of the one column the errors decision clusters on, if there is exactly one (across all its
     * alternatives): row draws under a clustered design make the joint tests over-reject, which
     * {@code NullDrawsClusteredCalibrationTest} shows. Otherwise, and always for the permutation, which
     * cannot move whole clusters, the draws take single rows.
     */
    public static NullDrawSettings of(Plan plan) {
        NullMethod method = NullMethod.of(plan.nullMethod());
        String named = plan.nullCluster();
        if (named != null) {
            return new NullDrawSettings(plan.nullDraws(), method, plan.seed(),
                    named.equals(Plan.NULL_CLUSTER_ROWS) ? null : named, false);
        }
        List<String> clustered = plan.errorClusterColumns();
        String column = method == NullMethod.BOOTSTRAP && clustered.size() == 1 ? clustered.get(0) : null;
        return new NullDrawSettings(plan.nullDraws(), method, plan.seed(), column, true);
    }

    /**
     * Refuses settings that cannot run: more draws than the cap, whole clusters with the permutation. Draws
     * beside two absorbed columns run (each draw demeans its own rows again, {@code fit.ResampledVariant}).
     *
     * @param drawsWhere   the plan key or command-line option the number of draws came from, for the message
     * @param clusterWhere likewise for the cluster column
     */
    public void check(Plan plan, int maxDraws, String drawsWhere, String clusterWhere) {
        if (draws > maxDraws) {
            throw new InputException(drawsWhere, String.format("%,d null draws are above the cap of %,d; ask for "
                    + "fewer, or raise the cap with --max-null-draws", draws, maxDraws));
        }
        if (draws > 0 && method == NullMethod.PERMUTE && clusterColumn != null) {
            throw new InputException(clusterWhere, "whole clusters are resampled by the bootstrap only; the "
                    + "permutation shuffles the key predictor between rows, so name no cluster column (or \"" + Plan.NULL_CLUSTER_ROWS + "\") or use the bootstrap");
        }
    }
}
