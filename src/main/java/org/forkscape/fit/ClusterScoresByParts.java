package org.forkscape.fit;

import java.util.SortedMap;

/**
 * The CR1 variance of one specification of a variant whose rows are held in parts, where its per-cluster
 * cells could lose digits and one machine would pass over the rows: each part sums the score of each of its
 * clusters, sum of e_i u_i over the cluster's usable rows (w_i e_i u_i when weighted), by the engine's own
 * row pass ({@link VariantByParts#clusterScores}); the scores are added cluster by cluster in part order, and
 * the variance is G/(G-1) (N-1)/(N-K) sum over clusters of the score squared (Cameron &amp; Miller 2015, "A
 * practitioner's guide to cluster-robust inference", Journal of Human Resources 50(2)), G the clusters with a
 * usable row, as {@link KeyCoefficientSandwich#variance} makes it from the rows. One pass over the parts per
 * specification and clustering: it serves the few specifications whose cells decline, and multi-way
 * clusters beside two absorbed columns (one-way ones there go in batches, {@link RowPassesByParts}).
 */
final class ClusterScoresByParts {
    private ClusterScoresByParts() {
    }

    /**
     * @param request    the solution's pieces ({@link RowPassRequest#of})
     * @param clusterKey the cluster column, or an intersection's key ({@link ClusterComponents})
     */
    static KeyCoefficientSandwich.Variance variance(DataVariant variant, RowPassRequest request, String clusterKey,
            int n, int k) {
        SortedMap<Long, Double> scores = variant.clusterScoreReduction.scores(request, clusterKey);
        variant.clusterScorePasses.incrementAndGet();
        double[] inOrder = scores == null ? new double[0]
                : scores.values().stream().mapToDouble(Double::doubleValue).toArray();
        return ofScores(inOrder, inOrder.length, n, k);
    }

    /**
     * The CR1 variance from the first {@code groups} clusters' scores, in the clusters' order: the one
     * expression of both routes by parts, one specification's pass ({@link #variance}) and a batch's
     * ({@link RowPassesByParts#finish}), so that they give the same bits.
     */
    static KeyCoefficientSandwich.Variance ofScores(double[] scores, int groups, int n, int k) {
        if (groups < 2) {
            return new KeyCoefficientSandwich.Variance(Double.NaN, groups, FitStatus.ONE_CLUSTER, "");
        }
        double meat = 0;
        for (int g = 0; g < groups; g++) {
            meat += scores[g] * scores[g];
        }
        return new KeyCoefficientSandwich.Variance(meat * groups / (groups - 1) * (n - 1.0) / (n - k), groups, null,
                "");
    }
}
