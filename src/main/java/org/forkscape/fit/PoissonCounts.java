package org.forkscape.fit;

import java.nio.charset.StandardCharsets;
import java.security.MessageDigest;
import java.security.NoSuchAlgorithmException;
import org.apache.commons.math3.distribution.PoissonDistribution;

/**
 * The counts of a Poisson bootstrap draw as a pure function of (seed, unit, draw): each resampled unit (a
 * row, or a cluster) appears in draw d as often as a Poisson(1) variate says, and that variate is read off
 * a hash of the seed, the unit's identity and d, so that every part of a partitioned table computes the
 * same counts for its rows whatever the partitioning, without drawing from a shared stream (the Poisson
 * bootstrap: Hanley &amp; MacGibbon 2006, "Creating non-parametric bootstrap samples using Poisson
 * frequencies", Computer Methods and Programs in Biomedicine 83(1), citation from memory, not checked against
 * the paper here: independent Poisson(1) frequencies per unit approximate the multinomial frequencies of
 * Efron's bootstrap, whose total is fixed at N, with a total that varies around N).
 *
 * <p>The hash: the 64-bit finaliser of SplitMix64 (Steele, Lea &amp; Flood 2014, "Fast splittable pseudorandom
 * number generators", OOPSLA; Stafford's "variant 13" constants, the same function as
 * {@code java.util.SplittableRandom}'s mix64), applied in a chain: h = mix64(mix64(mix64(seed XOR D) XOR unit)
 * + (d + 1) gamma), gamma = 0x9e3779b97f4a7c15 (the golden-ratio increment of SplitMix64). The uniform is the
 * top 53 bits of h times 2^-53, in [0, 1), and the count the smallest k with u &lt; F(k), F the Poisson(1)
 * distribution function from Commons Math (inversion by sequential search, the textbook method for a
 * discrete distribution: Devroye 1986, Non-Uniform Random Variate Generation, Springer, chapter III; from
 * memory). Text (a file name, a cluster's text) enters as the first 8 bytes of its UTF-8 SHA-256 (FIPS
 * 180-4), big-endian.
 */
public final class PoissonCounts {
    /** The golden-ratio increment of SplitMix64. */
    static final long GAMMA = 0x9e3779b97f4a7c15L;
    /** Mixed into the seed: these counts differ from every other stream drawn from the same seed. */
    private static final long DRAWS_DOMAIN = 0x706f6973736f6e31L;
    private static final long ROW_DOMAIN = 0x726f772d696e6478L;
    private static final long NUMBER_DOMAIN = 0x6e756d2d76616c75L;
    private static final long TEXT_DOMAIN = 0x746578742d76616cL;
    /**
     * F(k) of Poisson(1) from k = 0 until F rounds to within 2^-53 of 1, the last entry set to 1: the
     * probability left out, P(K &gt; 18) &lt; 3e-18, is below the uniform's resolution.
     */
    private static final double[] CDF = distribution();

    private PoissonCounts() {
    }

    /** The largest count a unit can have in a draw (where the distribution's table ends). */
    static int maxCount() {
        return CDF.length - 1;
    }

    private static double[] distribution() {
        PoissonDistribution poisson = new PoissonDistribution(null, 1, PoissonDistribution.DEFAULT_EPSILON,
                PoissonDistribution.DEFAULT_MAX_ITERATIONS);
        double[] f = new double[64];
        int k = 0;
        while (true) {
            f[k] = poisson.cumulativeProbability(k);
            if (f[k] >= 1 - 0x1.0p-53) {
                f[k] = 1;
                return java.util.Arrays.copyOf(f, k + 1);
            }
            k++;
        }
    }

    /** The SplitMix64 finaliser (Steele, Lea &amp; Flood 2014), a bijection of 64-bit words. */
    public static long mix64(long z) {
        z = (z ^ (z >>> 30)) * 0xbf58476d1ce4e5b9L;
        z = (z ^ (z >>> 27)) * 0x94d049bb133111ebL;
        return z ^ (z >>> 31);
    }

    /** The first 8 bytes, big-endian, of the SHA-256 of {@code text}'s UTF-8 bytes. */
    public static long textHash(String text) {
        try {
            byte[] d = MessageDigest.getInstance("SHA-256").digest(text.getBytes(StandardCharsets.UTF_8));
            long h = 0;
            for (int i = 0; i < 8; i++) {
                h = h << 8 | (d[i] & 0xff);
            }
            return h;
        } catch (NoSuchAlgorithmException e) {
            throw new IllegalStateException("every Java runtime provides SHA-256", e);
        }
    }

    /** A row's identity: its file's name hash ({@link #textHash}) and its 0-based index within that file. */
    public static long rowKey(long fileHash, long rowIndex) {
        return mix64(fileHash ^ mix64(rowIndex ^ ROW_DOMAIN));
    }

    /** A cluster's identity from a numeric value (-0 and 0 are one value, as the grouping codes have them). */
    public static long numberKey(double value) {
        return mix64(Double.doubleToLongBits(value + 0.0) ^ NUMBER_DOMAIN);
    }

    /** A cluster's identity from a text value. */
    public static long textKey(String value) {
        return mix64(textHash(value) ^ TEXT_DOMAIN);
    }

    /** The uniform in [0, 1) of unit {@code unitKey} in draw {@code draw} (0-based) from {@code seed}. */
    public static double uniform(long seed, long unitKey, int draw) {
        long h = mix64(mix64(mix64(seed ^ DRAWS_DOMAIN) ^ unitKey) + (draw + 1L) * GAMMA);
        return (h >>> 11) * 0x1.0p-53;
    }

    /** How often unit {@code unitKey} appears in draw {@code draw}: a Poisson(1) variate by inversion. */
    public static int count(long seed, long unitKey, int draw) {
        double u = uniform(seed, unitKey, draw);
        int k = 0;
        while (u >= CDF[k]) {
            k++;
        }
        return k;
    }
}
