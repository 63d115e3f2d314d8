package org.forkscape.infer;

import static org.junit.jupiter.api.Assertions.assertEquals;

import org.apache.commons.math3.distribution.NormalDistribution;
import org.apache.commons.math3.distribution.TDistribution;
import org.junit.jupiter.api.Test;

/** Normal scores of t statistics against Commons Math's normal and t distributions. */
class NormalScoresTest {
    private static final NormalDistribution PHI = new NormalDistribution(null, 0, 1);

    @Test
    void upperQuantileInvertsTheNormalTailDeepIntoIt() {
        for (double z : new double[] {0.1, 1, 1.959963984540054, 3.2, 5, 8, 12, 20, 30, 37}) {
            double q = PHI.cumulativeProbability(-z);
            assertEquals(z, NormalScores.upperQuantile(q), 1e-9 * z, "z = " + z);
        }
        assertEquals(0, NormalScores.upperQuantile(0.5), 1e-15);
    }

    @Test
    void aTStatisticGetsTheScoreWithTheSameTail() {
        // Cauchy (df = 1): P(T > 1) = 1/2 - atan(1)/pi = 1/4, so z = Phi^-1(3/4)
        assertEquals(PHI.inverseCumulativeProbability(0.75), NormalScores.ofT(1, 1), 1e-12);
        assertEquals(-PHI.inverseCumulativeProbability(0.75), NormalScores.ofT(-1, 1), 1e-12);
        TDistribution t5 = new TDistribution(null, 5);
        assertEquals(-PHI.inverseCumulativeProbability(t5.cumulativeProbability(-2.5)), NormalScores.ofT(2.5, 5), 1e-9);
        // with very many degrees of freedom t is already normal
        assertEquals(3, NormalScores.ofT(3, 1e9), 1e-6);
        assertEquals(0, NormalScores.ofT(0, 10), 0);
    }

    @Test
    void anUnderflowingTailIsCapped() {
        assertEquals(NormalScores.MAX_SCORE, NormalScores.ofT(1e6, 1e6), 0);
        assertEquals(-NormalScores.MAX_SCORE, NormalScores.ofTwoSidedP(0, -5), 0);
    }
}
