package org.forkscape.plan;

import java.math.BigInteger;
import java.util.Arrays;
import java.util.HashSet;
import java.util.List;
import java.util.SplittableRandom;

/**
 * The set of specifications of a plan as mixed-radix numbers: digit {@code d} is the chosen alternative
 * of decision {@code d}, the last decision varying fastest. Nothing is materialised; a random sample of
 * specifications is a sample of integers.
 *
 * <p>Specifications are addressed by a {@code long} <em>key</em>. When the count fits in a {@code long}
 * (below 2<sup>63</sup>) the key is the mixed-radix index itself. A larger space can only be sampled
 * ({@code MultiverseRunner.checkCount} refuses to enumerate it), and there the key is the rank of the
 * specification in the plan's seeded sample, sorted by index; {@link #number} gives its exact number in
 * the whole space. The sample is a function of the plan alone (its size and seed), so every holder of the
 * plan sees the same keys.
 */
public final class SpecificationSpace {
    private static final BigInteger LONG_LIMIT = BigInteger.valueOf(Long.MAX_VALUE);

    private final List<Decision> decisions;
    private final long[] radix;
    private final BigInteger count;
    private final long total;
    private final long sampleSize;
    private final long seed;
    /** The sampled digits of a space beyond a long, row-major by key; drawn on first use. */
    private volatile long[] sampleDigits;

    public SpecificationSpace(Plan plan) {
        this.decisions = plan.decisions();
        this.radix = new long[decisions.size()];
        BigInteger c = BigInteger.ONE;
        for (int d = 0; d < radix.length; d++) {
            radix[d] = decisions.get(d).alternativeCount();
            c = c.multiply(BigInteger.valueOf(radix[d]));
        }
        this.count = c;
        this.total = c.compareTo(LONG_LIMIT) >= 0 ? Long.MAX_VALUE : c.longValueExact();
        this.sampleSize = plan.sampleSize();
        this.seed = plan.seed();
    }

    /** The number of specifications; {@link Long#MAX_VALUE} when it is that or more (see {@link #count}). */
    public long size() {
        return total;
    }

    /** The exact number of specifications. */
    public BigInteger count() {
        return count;
    }

    /** Whether the count is beyond a {@code long}, so that keys are ranks in the seeded sample. */
    public boolean beyondLong() {
        return count.compareTo(LONG_LIMIT) >= 0;
    }

    public List<Decision> decisions() {
        return decisions;
    }

    public int decisionCount() {
        return radix.length;
    }

    /**
     * Writes the choices of the specification with this key into {@code choices} (modified; length =
     * number of decisions).
     */
    public void decode(long key, long[] choices) {
        if (beyondLong()) {
            long[] digits = sample();
            if (key < 0 || key >= digits.length / radix.length) {
                throw new IndexOutOfBoundsException("specification key " + key + " outside the sample");
            }
            System.arraycopy(digits, Math.toIntExact(key * radix.length), choices, 0, radix.length);
            return;
        }
        if (key < 0 || key >= total) {
            throw new IndexOutOfBoundsException("specification index " + key + " outside 0.." + (total - 1));
        }
        long rest = key;
        for (int d = radix.length - 1; d >= 0; d--) {
            choices[d] = rest % radix[d];
            rest /= radix[d];
        }
    }

    /**
     * The index of the specification with these choices (one per decision, each below its count); only
     * for a space within a {@code long}, where index and key are the same.
     */
    public long encode(long[] choices) {
        if (beyondLong()) {
            throw new IllegalStateException("a space of " + count + " specifications has no long index");
        }
        return index(choices).longValueExact();
    }

    /** The exact mixed-radix index of the specification with these choices. */
    public BigInteger index(long[] choices) {
        BigInteger index = BigInteger.ZERO;
        for (int d = 0; d < radix.length; d++) {
            if (choices[d] < 0 || choices[d] >= radix[d]) {
                throw new IndexOutOfBoundsException("choice " + choices[d] + " of decision " + d + " outside 0.."
                        + (radix[d] - 1));
            }
            index = index.multiply(BigInteger.valueOf(radix[d])).add(BigInteger.valueOf(choices[d]));
        }
        return index;
    }

    /** The 1-based number of the specification with this key in the whole space (column spec of the results). */
    public SpecificationNumber number(long key) {
        if (!beyondLong()) {
            return new SpecificationNumber(BigInteger.valueOf(key + 1), false);
        }
        long[] choices = new long[radix.length];
        decode(key, choices);
        return new SpecificationNumber(index(choices).add(BigInteger.ONE), true);
    }

    /**
     * The key of the specification with this 1-based number, the inverse of {@link #number}; -1 when the
     * number is outside the space or, beyond a long, outside the plan's sample.
     */
    public long key(BigInteger number) {
        BigInteger index = number.subtract(BigInteger.ONE);
        if (index.signum() < 0 || index.compareTo(count) >= 0) {
            return -1;
        }
        if (!beyondLong()) {
            return index.longValueExact();
        }
        long[] wanted = digits(index);
        long[] digits = sample();
        int n = radix.length;
        long low = 0;
        long high = digits.length / n - 1;
        while (low <= high) {
            long mid = (low + high) >>> 1;
            int c = Arrays.compare(digits, Math.toIntExact(mid * n), Math.toIntExact(mid * n + n), wanted, 0, n);
            if (c == 0) {
                return mid;
            }
            if (c < 0) {
                low = mid + 1;
            } else {
                high = mid - 1;
            }
        }
        return -1;
    }

    /**
     * The keys to fit, in increasing order of index: all of them, or a seeded sample without replacement of
     * {@code n}. Within a {@code long} the sample uses Floyd's algorithm (Bentley &amp; Floyd 1987,
     * "Programming pearls: a sample of brilliance", CACM 30(9)), so its cost depends on {@code n}, not on
     * the size of the space; beyond it, see {@link #sample}. The same seed gives the same sample. Callers
     * check the count against the cap first ({@code MultiverseRunner.checkCount}); more than an array can
     * hold is refused here.
     */
    public long[] indices(long n, long seed) {
        long fitted = n <= 0 ? total : Math.min(n, total);
        if (fitted > Integer.MAX_VALUE - 8) {
            throw new IllegalArgumentException(fitted + " specifications do not fit in one run");
        }
        if (beyondLong()) {
            if (n != sampleSize || seed != this.seed) {
                throw new IllegalArgumentException("a space beyond a long is sampled with its plan's own size and seed");
            }
            long[] keys = new long[sample().length / radix.length];
            for (int i = 0; i < keys.length; i++) {
                keys[i] = i;
            }
            return keys;
        }
        if (n <= 0 || n >= total) {
            long[] all = new long[Math.toIntExact(total)];
            for (int i = 0; i < all.length; i++) {
                all[i] = i;
            }
            return all;
        }
        HashSet<Long> chosen = new HashSet<>();
        SplittableRandom random = new SplittableRandom(seed);
        for (long j = total - n; j < total; j++) {
            long t = random.nextLong(j + 1);
            if (!chosen.add(t)) {
                chosen.add(j);
            }
        }
        long[] out = chosen.stream().mapToLong(Long::longValue).toArray();
        Arrays.sort(out);
        return out;
    }

    /**
     * The seeded sample of a space beyond a long, as digits row-major in increasing order of index. Each
     * specification is drawn as its mixed-radix digits, decision by decision, each uniform over its
     * alternatives from one seeded stream: independent uniform digits make a uniform draw over the whole
     * space. A draw that repeats an earlier one is drawn again, so the sample is without replacement and
     * every set of {@code n} specifications is equally likely (sequential rejection; with at least
     * 2<sup>63</sup> specifications a repeat has probability below n<sup>2</sup>/2<sup>64</sup>).
     */
    private long[] sample() {
        long[] digits = sampleDigits;
        if (digits != null) {
            return digits;
        }
        synchronized (this) {
            if (sampleDigits == null) {
                sampleDigits = draw();
            }
            return sampleDigits;
        }
    }

    private long[] draw() {
        if (sampleSize <= 0 || sampleSize > Integer.MAX_VALUE - 8) {
            throw new IllegalStateException("a plan of " + count + " specifications needs a sample to run");
        }
        int n = Math.toIntExact(sampleSize);
        SplittableRandom random = new SplittableRandom(seed);
        HashSet<BigInteger> seen = new HashSet<>();
        BigInteger[] drawn = new BigInteger[n];
        long[] choices = new long[radix.length];
        for (int i = 0; i < n; ) {
            for (int d = 0; d < radix.length; d++) {
                choices[d] = random.nextLong(radix[d]);
            }
            BigInteger index = index(choices);
            if (seen.add(index)) {
                drawn[i++] = index;
            }
        }
        Arrays.sort(drawn);
        long[] digits = new long[n * radix.length];
        for (int i = 0; i < n; i++) {
            System.arraycopy(digits(drawn[i]), 0, digits, i * radix.length, radix.length);
        }
        return digits;
    }

    private long[] digits(BigInteger index) {
        long[] choices = new long[radix.length];
        BigInteger rest = index;
        for (int d = radix.length - 1; d >= 0; d--) {
            BigInteger[] qr = rest.divideAndRemainder(BigInteger.valueOf(radix[d]));
            choices[d] = qr[1].longValueExact();
            rest = qr[0];
        }
        return choices;
    }
}
