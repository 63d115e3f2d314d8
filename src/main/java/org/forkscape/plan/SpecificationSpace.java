package org.forkscape.plan;

import java.util.Arrays;
import java.util.HashSet;
import java.util.List;
import java.util.SplittableRandom;

/**
 * The set of specifications of a plan as mixed-radix numbers: digit {@code d} is the chosen alternative
 * of decision {@code d}, the last decision varying fastest. Nothing is materialised; a random sample of
 * specifications is a sample of integers.
 */
public final class SpecificationSpace {
    private final List<Decision> decisions;
    private final long[] radix;
    private final long total;

    public SpecificationSpace(Plan plan) {
        this.decisions = plan.decisions();
        this.radix = new long[decisions.size()];
        long t = 1;
        boolean overflow = false;
        for (int d = 0; d < radix.length; d++) {
            radix[d] = decisions.get(d).alternativeCount();
            if (t > Long.MAX_VALUE / radix[d]) {
                overflow = true;
            } else {
                t *= radix[d];
            }
        }
        this.total = overflow ? Long.MAX_VALUE : t;
    }

    /** The number of specifications; {@link Long#MAX_VALUE} when it overflows. */
    public long size() {
        return total;
    }

    public List<Decision> decisions() {
        return decisions;
    }

    public int decisionCount() {
        return radix.length;
    }

    /**
     * Writes the choices of specification {@code index} into {@code choices} (modified; length =
     * number of decisions).
     */
    public void decode(long index, long[] choices) {
        if (index < 0 || index >= total) {
            throw new IndexOutOfBoundsException("specification index " + index + " outside 0.." + (total - 1));
        }
        long rest = index;
        for (int d = radix.length - 1; d >= 0; d--) {
            choices[d] = rest % radix[d];
            rest /= radix[d];
        }
    }

    /** The index of the specification with these choices (one per decision, each below its count). */
    public long encode(long[] choices) {
        long index = 0;
        for (int d = 0; d < radix.length; d++) {
            if (choices[d] < 0 || choices[d] >= radix[d]) {
                throw new IndexOutOfBoundsException("choice " + choices[d] + " of decision " + d + " outside 0.."
                        + (radix[d] - 1));
            }
            index = index * radix[d] + choices[d];
        }
        return index;
    }

    /**
     * The indices to fit: all of them, or a seeded sample without replacement of {@code n}, in increasing
     * order. Sampling uses Floyd's algorithm (Bentley &amp; Floyd 1987, "Programming pearls: a sample of
     * brilliance", CACM 30(9)), so its cost depends on {@code n}, not on the size of the space. The same
     * seed gives the same sample. Callers check the count against the cap first
     * ({@code MultiverseRunner.checkCount}); more than an array can hold is refused here.
     */
    public long[] indices(long n, long seed) {
        long count = n <= 0 ? total : Math.min(n, total);
        if (count > Integer.MAX_VALUE - 8) {
            throw new IllegalArgumentException(count + " specifications do not fit in one run");
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
}
