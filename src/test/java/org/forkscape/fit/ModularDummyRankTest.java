package org.forkscape.fit;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.math.BigInteger;
import java.util.Arrays;
import java.util.OptionalInt;
import java.util.SplittableRandom;
import org.apache.commons.math3.linear.Array2DRowRealMatrix;
import org.apache.commons.math3.linear.SingularValueDecomposition;
import org.junit.jupiter.api.Test;

/**
 * The exact rank of several crossed dimensions' dummies against the numerical rank of the explicit 0/1 dummy
 * matrix by Apache Commons Math 3.6.1's {@code SingularValueDecomposition.getRank} (exact here: the designs are
 * small and their singular values far from its threshold), on invented designs with fixed seeds: random
 * unbalanced three- and four-way designs, a third dimension nested in the first, one that is a function of the
 * pair of the others, two disconnected blocks; the general route on two dimensions against the count by
 * connected components; and the certificate's steps (the primes, the lift, the Chinese remainder combination).
 */
class ModularDummyRankTest {
    @Test
    void randomDesignsHaveTheRankOfTheirExplicitDummies() {
        SplittableRandom random = new SplittableRandom(20261204);
        for (int trial = 0; trial < 60; trial++) {
            int dims = 3 + trial % 2;
            int n = 8 + random.nextInt(40);
            int[][] raw = new int[dims][n];
            for (int d = 0; d < dims; d++) {
                int levels = 2 + random.nextInt(d == 0 ? 12 : 6);
                for (int i = 0; i < n; i++) {
                    raw[d][i] = random.nextInt(levels);
                }
            }
            check(raw, "random design " + trial);
        }
    }

    @Test
    void aNestedOrCollinearThirdDimensionAndDisconnectedBlocks() {
        SplittableRandom random = new SplittableRandom(77);
        for (int trial = 0; trial < 30; trial++) {
            int n = 20 + random.nextInt(40);
            int[][] raw = new int[3][n];
            for (int i = 0; i < n; i++) {
                int block = random.nextInt(2);
                raw[0][i] = block * 10 + random.nextInt(6 + trial % 4);
                raw[1][i] = block * 10 + random.nextInt(4);
                raw[2][i] = switch (trial % 3) {
                    case 0 -> raw[0][i] / 3; // nested in the first: a region of units
                    case 1 -> (raw[0][i] + raw[1][i]) % 3; // a function of the pair
                    default -> block * 10 + random.nextInt(3); // crossed within each block
                };
            }
            check(raw, "structured design " + trial);
        }
    }

    @Test
    void onTwoDimensionsTheGeneralRouteAgreesWithTheComponentCount() {
        SplittableRandom random = new SplittableRandom(5);
        for (int trial = 0; trial < 40; trial++) {
            int n = 5 + random.nextInt(60);
            int[][] raw = new int[2][n];
            for (int i = 0; i < n; i++) {
                int block = random.nextInt(1 + trial % 3);
                raw[0][i] = block * 20 + random.nextInt(3 + trial % 15);
                raw[1][i] = block * 20 + random.nextInt(2 + trial % 5);
            }
            int[] levels = new int[2];
            int[][] codes = dense(raw, levels);
            ModularDummyRank general = new ModularDummyRank(codes, levels);
            assertEquals(FixedEffectRank.ofTwo(codes[0], levels[0], codes[1], levels[1]), general.rank().orElseThrow(),
                    "two dimensions, trial " + trial);
            assertEquals(1, general.primesTried, "one prime certifies it");
        }
    }

    @Test
    void theEngineTakesTheGeneralRouteForThreeDimensions() {
        int[][] raw = {{0, 0, 1, 1, 2, 2}, {0, 1, 0, 1, 0, 1}, {0, 0, 0, 1, 1, 1}};
        int[] levels = new int[3];
        int[][] codes = dense(raw, levels);
        // 3 + 2 + 2 levels; the second and third are crossed with the first; lm's rank of factor(a)+factor(b)+factor(c)
        // is 1 + (3 - 1) + (2 - 1) + (2 - 1) = 5 here (no extra dependency), computed by the SVD below
        assertEquals(OptionalInt.of(svdRank(codes, levels)), FixedEffectRank.of(codes, levels));
        assertEquals(5, svdRank(codes, levels));
    }

    /**
     * Small primes make the lift fail at first (bound sqrt(p/2)), so the residues must be combined; a single one
     * too small certifies nothing, and the rank is then reported as not certified, never guessed.
     */
    @Test
    void smallPrimesAreCombinedByTheChineseRemainderTheorem() {
        SplittableRandom random = new SplittableRandom(9);
        int combined = 0;
        int refused = 0;
        for (int trial = 0; trial < 30; trial++) {
            int n = 12 + random.nextInt(10);
            int[][] raw = new int[3][n];
            for (int i = 0; i < n; i++) {
                raw[0][i] = random.nextInt(6);
                raw[1][i] = random.nextInt(4);
                raw[2][i] = (raw[0][i] * 2 + raw[1][i]) % 5;
            }
            int[] levels = new int[3];
            int[][] codes = dense(raw, levels);
            ModularDummyRank rank = new ModularDummyRank(codes, levels);
            long[] small = {23, 29, 31, 37, 41, 43, 47, 53, 59, 61, 67, 71};
            OptionalInt got = rank.rank(small);
            if (got.isPresent()) {
                assertEquals(svdRank(codes, levels), got.getAsInt(), "small primes, trial " + trial);
                combined += rank.primesTried > 1 ? 1 : 0;
            }
            // one prime too small for the lift: no rank rather than a guess, or the right one
            OptionalInt alone = new ModularDummyRank(codes, levels).rank(new long[] {23});
            if (alone.isPresent()) {
                assertEquals(svdRank(codes, levels), alone.getAsInt(), "the prime 23 alone, trial " + trial);
            } else {
                refused++;
            }
        }
        assertTrue(combined > 0, "some designs needed more than one small prime");
        assertTrue(refused > 0, "some designs were not certified by the prime 23 alone");
    }

    @Test
    void theDefaultPrimesArePrimesBelowTwoToThe31() {
        for (long p : ModularDummyRank.PRIMES) {
            assertTrue(BigInteger.valueOf(p).isProbablePrime(60), p + " is prime (BigInteger.isProbablePrime)");
            assertTrue(p < 1L << 31 && p > Integer.MAX_VALUE - 100, p + " is just below 2^31");
        }
        assertEquals(ModularDummyRank.PRIMES.length, Arrays.stream(ModularDummyRank.PRIMES).distinct().count());
        assertThrows(IllegalArgumentException.class, () -> new ModularDummyRank(new int[][] {{0, 1}, {0, 1}, {0, 0}},
                new int[] {2, 2, 1}).rank(new long[] {2}));
    }

    /** The lift returns the fraction of smallest terms when it exists, and null when it does not. */
    @Test
    void rationalReconstructionRecoversSmallFractions() {
        BigInteger m = BigInteger.valueOf(ModularDummyRank.PRIMES[0]);
        BigInteger bound = m.shiftRight(1).sqrt();
        int[][] fractions = {{0, 1}, {1, 1}, {-1, 1}, {3, 7}, {-5, 12}, {32000, 32001}};
        for (int[] f : fractions) {
            BigInteger u = BigInteger.valueOf(f[0]).multiply(BigInteger.valueOf(f[1]).modInverse(m)).mod(m);
            BigInteger[] q = ModularDummyRank.reconstruct(u, m, bound);
            assertEquals(BigInteger.valueOf(f[0]), q[0], Arrays.toString(f));
            assertEquals(BigInteger.valueOf(f[1]), q[1], Arrays.toString(f));
        }
        // 1/2 mod 101 is 51; with the bound 2 over modulus 11, 51 mod 11 = 7 = -4: no fraction within the bound
        assertEquals(null, ModularDummyRank.reconstruct(BigInteger.valueOf(51), BigInteger.valueOf(11),
                BigInteger.TWO.subtract(BigInteger.ONE)));
    }

    private static void check(int[][] raw, String where) {
        int[] levels = new int[raw.length];
        int[][] codes = dense(raw, levels);
        ModularDummyRank rank = new ModularDummyRank(codes, levels);
        assertEquals(svdRank(codes, levels), rank.rank().orElseThrow(), where
                + ", Commons Math SingularValueDecomposition.getRank of the explicit dummies");
        assertTrue(rank.primesTried >= 1, where);
    }

    /** The codes renumbered densely over the rows, levels written into {@code levels}. */
    static int[][] dense(int[][] raw, int[] levels) {
        int[][] out = new int[raw.length][raw[0].length];
        for (int d = 0; d < raw.length; d++) {
            int[] map = new int[1 + Arrays.stream(raw[d]).max().orElse(0)];
            Arrays.fill(map, -1);
            for (int i = 0; i < raw[d].length; i++) {
                if (map[raw[d][i]] < 0) {
                    map[raw[d][i]] = levels[d]++;
                }
                out[d][i] = map[raw[d][i]];
            }
        }
        return out;
    }

    static int svdRank(int[][] codes, int[] levels) {
        int total = Arrays.stream(levels).sum();
        double[][] d = new double[codes[0].length][total];
        for (int i = 0; i < codes[0].length; i++) {
            int at = 0;
            for (int k = 0; k < codes.length; k++) {
                d[i][at + codes[k][i]] = 1;
                at += levels[k];
            }
        }
        return new SingularValueDecomposition(new Array2DRowRealMatrix(d, false)).getRank();
    }
}
