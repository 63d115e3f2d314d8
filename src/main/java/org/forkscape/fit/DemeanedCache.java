package org.forkscape.fit;

import java.util.BitSet;
import java.util.Iterator;
import java.util.LinkedHashMap;
import java.util.Map;

/**
 * The demeaned rows of a variant with several absorbed columns, per set of usable groups, kept while they fit
 * in a memory bound and evicted least recently used first. An evicted set is demeaned again when a row pass
 * asks for it ({@link VariantStatistics#demeanedColumns}), which gives the same numbers, so eviction costs
 * time, never exactness. The most recent set is always kept, whatever its size. Safe for concurrent use.
 */
final class DemeanedCache {
    /** Doubles of demeaned rows kept per variant: 2^24, 128 MiB. */
    static final long MAX_DOUBLES = 1L << 24;

    private final long maxDoubles;
    private final LinkedHashMap<BitSet, double[][]> sets = new LinkedHashMap<>(16, 0.75f, true);
    private long held;

    DemeanedCache(long maxDoubles) {
        this.maxDoubles = maxDoubles;
    }

    synchronized double[][] get(BitSet usable) {
        return sets.get(usable);
    }

    synchronized void put(BitSet usable, double[][] columns) {
        double[][] earlier = sets.put(usable, columns);
        if (earlier != null) {
            held -= size(earlier);
        }
        held += size(columns);
        Iterator<Map.Entry<BitSet, double[][]>> oldest = sets.entrySet().iterator();
        while (held > maxDoubles && sets.size() > 1) {
            Map.Entry<BitSet, double[][]> e = oldest.next();
            if (e.getKey().equals(usable)) {
                continue;
            }
            held -= size(e.getValue());
            oldest.remove();
        }
    }

    private static long size(double[][] columns) {
        long s = 0;
        for (double[] c : columns) {
            if (c != null) {
                s += c.length;
            }
        }
        return s;
    }
}
