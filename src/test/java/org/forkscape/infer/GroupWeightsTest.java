package org.forkscape.infer;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;

import java.util.List;
import java.util.Map;
import java.util.Set;
import org.apache.commons.math3.distribution.NormalDistribution;
import org.junit.jupiter.api.Test;

/**
 * Likelihood and BIC weights on two-model cases that can be worked out by hand; normal probabilities
 * from Commons Math's NormalDistribution.
 */
class GroupWeightsTest {
    private static final NormalDistribution PHI = new NormalDistribution(null, 0, 1);

    @Test
    void equalFitsSplitTheLikelihoodAndBicChargesTheExtraCoefficient() {
        // same RSS and rows: equal likelihoods; K = 2 and 3 on n = 9 rows: BIC differs by log 9 = 2 log 3,
        // so the BIC weights are 1 / (1 + 1/3) = 3/4 and 1/4
        GroupWeights w = GroupWeights.of(new double[] {1, 3}, new double[] {1, 1}, new double[] {1, 1},
                new int[] {9, 9}, new int[] {2, 3});
        assertArrayEquals(new double[] {0.5, 0.5}, w.likelihoodWeights(), 1e-15);
        assertArrayEquals(new double[] {0.75, 0.25}, w.bicWeights(), 1e-15);
        // model-averaged estimate 0.75 * 1 + 0.25 * 3 = 1.5; variance 0.75 (1 + 1) + 0.25 (1 + 9) - 1.5^2
        assertEquals(1.5, w.bicEstimate(), 1e-15);
        assertEquals(Math.sqrt(1.75), w.bicStdError(), 1e-15);
        // Sala-i-Martin's normal CDF(0): mean 2, variance 1; non-normal: (Phi(-1) + Phi(-3)) / 2
        assertEquals(PHI.cumulativeProbability(-2), w.cdfNormal(), 1e-15);
        assertEquals((PHI.cumulativeProbability(-1) + PHI.cumulativeProbability(-3)) / 2, w.cdfNonNormal(), 1e-15);
        assertEquals(w.cdfNormal(), w.cdfNormalUnweighted(), 1e-15);
    }

    @Test
    void aThreeTimesLikelierModelGetsThreeQuartersOfTheWeight() {
        // l = -n/2 (log(2 pi RSS/n) + 1): RSS2 = 3^(-2/n) RSS1 makes l2 - l1 = log 3
        int n = 10;
        double rss2 = Math.pow(3, -2.0 / n);
        GroupWeights w = GroupWeights.of(new double[] {1, 3}, new double[] {1, 1}, new double[] {1, rss2},
                new int[] {n, n}, new int[] {2, 2});
        assertEquals(Math.log(3), GroupWeights.logLikelihood(rss2, n) - GroupWeights.logLikelihood(1, n), 1e-14);
        assertArrayEquals(new double[] {0.25, 0.75}, w.likelihoodWeights(), 1e-14);
        assertArrayEquals(new double[] {0.25, 0.75}, w.bicWeights(), 1e-14);
        // weighted: mean 2.5, variance 1; unweighted: mean 2
        assertEquals(PHI.cumulativeProbability(-2.5), w.cdfNormal(), 1e-14);
        assertEquals(PHI.cumulativeProbability(-2), w.cdfNormalUnweighted(), 1e-15);
        assertEquals(0.25 * PHI.cumulativeProbability(-1) + 0.75 * PHI.cumulativeProbability(-3), w.cdfNonNormal(),
                1e-14);
    }

    @Test
    void logLikelihoodOfAKnownFit() {
        // n = 2, RSS = 2: -1 (log(2 pi) + 1)
        assertEquals(-(Math.log(2 * Math.PI) + 1), GroupWeights.logLikelihood(2, 2), 1e-15);
        assertEquals(2 * (Math.log(2 * Math.PI) + 1) + 3 * Math.log(2), GroupWeights.bic(2, 2, 3), 1e-14);
    }

    @Test
    void inclusionCountsOnlyControlsThatSomeModelsLeaveOut() {
        Map<String, Double> pip = ComparableGroups.inclusion(List.of(Set.of("a"), Set.of("a", "b"), Set.of("a", "c")),
                new double[] {0.5, 0.3, 0.2});
        assertEquals(Map.of("b", 0.3, "c", 0.2), pip);
    }
}
