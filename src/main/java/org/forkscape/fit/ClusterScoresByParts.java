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
 * specification and clustering: it serves only the few specifications whose cells decline.
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
        int groups = scores == null ? 0 : scores.size();
        if (groups < 2) {
            return new KeyCoefficientSandwich.Variance(Double.NaN, groups, FitStatus.ONE_CLUSTER, "");
        }
        double meat = 0;
        for (double score : scores.values()) {
            meat += score * score;
        }
        return new KeyCoefficientSandwich.Variance(meat * groups / (groups - 1) * (n - 1.0) / (n - k), groups, null,
                "");
    }
}
