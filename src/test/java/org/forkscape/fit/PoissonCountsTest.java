package org.forkscape.fit;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.SplittableRandom;
import org.apache.commons.math3.distribution.PoissonDistribution;
import org.apache.commons.math3.stat.inference.ChiSquareTest;
import org.junit.jupiter.api.Test;

/** The hash and the Poisson(1) counts of the bootstrap by parts, against the JDK, coreutils and Commons Math. */
class PoissonCountsTest {
    @Test
    void theFinaliserIsSplitMix64s() {
        // java.util.SplittableRandom(seed).nextLong() is mix64(seed + golden gamma) (Steele, Lea & Flood 2014)
        SplittableRandom seeds = new SplittableRandom(5);
        for (int i = 0; i < 1000; i++) {
            long seed = seeds.nextLong();
            assertEquals(new SplittableRandom(seed).nextLong(), PoissonCounts.mix64(seed + PoissonCounts.GAMMA));
        }
    }

    @Test
    void textEntersAsTheFirstBytesOfItsSha256() {
        // printf 'part-00000.parquet' | sha256sum (GNU coreutils): dd32721c7b2653e3...
        assertEquals(0xdd32721c7b2653e3L, PoissonCounts.textHash("part-00000.parquet"));
        // printf 's003' | sha256sum: 15817969c26b134b...
        assertEquals(0x15817969c26b134bL, PoissonCounts.textHash("s003"));
    }

    @Test
    void countsFollowPoissonOneAndDrawsAreIndependent() {
        int units = 200_000;
        int cells = 6;
        long[] observed = new long[cells];
        double cross = 0;
        double sum0 = 0;
        double sum1 = 0;
        long file = PoissonCounts.textHash("part-00003.parquet");
        for (int r = 0; r < units; r++) {
            long key = PoissonCounts.rowKey(file, r);
            int k = PoissonCounts.count(2026, key, 17);
            int next = PoissonCounts.count(2026, key, 18);
            assertEquals(k, PoissonCounts.count(2026, key, 17), "a pure function of (seed, unit, draw)");
            observed[Math.min(k, cells - 1)]++;
            cross += k * next;
            sum0 += k;
            sum1 += next;
        }
        // Pearson's chi-square against Poisson(1), the last cell 5 or more (Commons Math)
        PoissonDistribution poisson = new PoissonDistribution(1);
        double[] expected = new double[cells];
        for (int k = 0; k < cells - 1; k++) {
            expected[k] = units * poisson.probability(k);
        }
        expected[cells - 1] = units * (1 - poisson.cumulativeProbability(cells - 2));
        double p = new ChiSquareTest().chiSquareTest(expected, observed);
        assertTrue(p > 0.001, "counts against Poisson(1): chi-square p = " + p);
        // two draws of the same units: covariance near 0 (its standard error is 1 / sqrt(units) for Poisson(1))
        double covariance = cross / units - (sum0 / units) * (sum1 / units);
        assertTrue(Math.abs(covariance) < 4 / Math.sqrt(units), "covariance of two draws' counts " + covariance);
        assertTrue(Math.abs(sum0 / units - 1) < 4 / Math.sqrt(units), "mean count " + sum0 / units);
    }

    @Test
    void aClusterIsOneUnitWhereverItsRowsAre() {
        org.forkscape.data.Table t = PartsOfTable.schools(3, 10, 5, 0.2, 0);
        long[] rows = PartsOfTable.rowKeys("a.parquet", t.rowCount());
        long[] units = new BootstrapDesign(9, "school").unitKeys(t, rows);
        int[] counts = new BootstrapDesign(9, "school").counts(units, 4);
        int[] codes = ((org.forkscape.data.CategoricalColumn) t.column("school")).codes();
        for (int r = 0; r < t.rowCount(); r++) {
            assertEquals(PoissonCounts.count(9, PoissonCounts.textKey(String.format("s%03d", codes[r])), 4), counts[r]);
        }
        assertEquals(rows[3], new BootstrapDesign(9, null).unitKeys(t, rows)[3], "single rows: the row's identity");
    }
}
