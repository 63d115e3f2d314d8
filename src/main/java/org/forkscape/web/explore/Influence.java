package org.forkscape.web.explore;

import java.util.List;

/**
 * What moves the estimate within a set of specifications, as the influence panel shows it: per factor,
 * the estimates at each level side by side and the factor's share of their variance, and the sentence of
 * the inference package about where the share significant in the dominant sign turns.
 *
 * @param factors       one entry per factor, in plan order
 * @param interactions  1 minus the summed variance shares: what no single factor explains
 * @param dominantSign  {@code positive} or {@code negative}: the sign of the median estimate
 * @param shareDominant share of the set significant in that sign
 * @param sentence      the finding in words
 */
public record Influence(List<FactorInfluence> factors, double interactions, String dominantSign, double shareDominant,
        String sentence) {

    public Influence {
        factors = List.copyOf(factors);
    }

    /**
     * One factor: {@code varianceShare} = between-level sum of squares of the estimates over their total
     * sum of squares (in a full factorial, its orthogonal main effect).
     */
    public record FactorInfluence(int factor, String name, String decision, double varianceShare,
            List<LevelEstimates> levels) {
        public FactorInfluence {
            levels = List.copyOf(levels);
        }
    }

    /**
     * The estimates of the specifications at one level of a factor (NaN quantities when none).
     *
     * @param shareSignificant share significant in the dominant sign
     */
    public record LevelEstimates(int level, String label, int count, double mean, double lowerQuartile, double median,
            double upperQuartile, double shareSignificant) {
    }
}
