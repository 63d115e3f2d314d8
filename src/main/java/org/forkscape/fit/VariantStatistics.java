package org.forkscape.fit;

import java.util.BitSet;
import java.util.Map;
import java.util.concurrent.ConcurrentHashMap;
import java.util.concurrent.ExecutorService;

/**
 * A variant's sufficient statistics: the cell sums, and built from them when first asked for and then kept,
 * the {@link Moments} of each set of usable rows, the per-group fourth-moment tensors and the per-cluster
 * cells. Safe for concurrent use, and deterministic: a structure is the same numbers whichever thread builds
 * it.
 */
final class VariantStatistics {
    final CellSums cells;
    private final DataVariant variant;
    private final Map<BitSet, Moments> momentsByGroups = new ConcurrentHashMap<>();
    private final Map<Long, Moments> momentsByVariables = new ConcurrentHashMap<>();
    private final Map<String, ClusterMoments> clusterMoments = new ConcurrentHashMap<>();
    private volatile double[][][] groupTensors;
    private final DemeanedCache demeaned = new DemeanedCache(DemeanedCache.MAX_DOUBLES);

    /** @param variant the variant whose coded rows the structures built later read */
    VariantStatistics(DataVariant variant, CellSums cells) {
        this.variant = variant;
        this.cells = cells;
    }

    /**
     * Statistics summed elsewhere, with the structures that would otherwise be built from the rows later:
     * the per-group tensors (null when none were summed) and the per-cluster cells by cluster column.
     */
    VariantStatistics(DataVariant variant, CellSums cells, double[][][] groupTensors,
            Map<String, ClusterMoments> clusterMoments) {
        this(variant, cells);
        this.groupTensors = groupTensors;
        this.clusterMoments.putAll(clusterMoments);
    }

    /** Whether the per-group tensors are built or were given. */
    boolean hasGroupTensors() {
        return groupTensors != null;
    }

    /** The cluster columns whose per-cluster cells were given. */
    java.util.Set<String> givenClusterMoments() {
        return clusterMoments.keySet();
    }

    /** See {@link DataVariant#moments(long)}. */
    Moments moments(long variables) {
        long[] groupMissing = variant.groupMissing;
        long variableMask = variables & variant.coded.everMissing;
        Moments cached = momentsByVariables.get(variableMask);
        if (cached != null) {
            return cached;
        }
        BitSet usable = new BitSet(groupMissing.length);
        for (int g = 0; g < groupMissing.length; g++) {
            if ((groupMissing[g] & variableMask) == 0) {
                usable.set(g);
            }
        }
        Moments m = momentsByGroups.computeIfAbsent(usable,
                u -> variant.absorbsSeveral ? several(u) : new Moments(variant, u));
        momentsByVariables.putIfAbsent(variableMask, m);
        return m;
    }

    /** The moments of a variant with several absorbed columns; its demeaned rows go to the bounded cache. */
    private Moments several(BitSet usable) {
        if (!variant.holdsRows()) {
            // held in parts: solved exactly where the rows are, no demeaned rows here
            variant.crossedSolves.incrementAndGet();
            return new Moments(variant, usable, variant.crossedWithin.within(usable));
        }
        SeveralEffectsWithin w = SeveralEffectsWithin.of(variant, usable);
        demeaned.put(usable, w.columns);
        return new Moments(variant, usable, w);
    }

    /**
     * The demeaned rows of {@code mom} (several absorbed columns), from the cache or computed again: the same
     * numbers either way, since the demeaning reads the same rows in the same order.
     */
    double[][] demeanedColumns(Moments mom) {
        double[][] columns = demeaned.get(mom.usableGroups);
        if (columns == null) {
            columns = SeveralEffectsWithin.of(variant, mom.usableGroups).columns;
            demeaned.put(mom.usableGroups, columns);
        }
        return columns;
    }

    /** Builds the per-group fourth-moment tensors now, summing on {@code pool} when given. */
    void buildGroupTensors(ExecutorService pool) {
        groupTensors = FourthMoments.groupTensors(variant, pool);
    }

    /** The per-group third and fourth moments, built on first use. */
    double[][][] groupTensors() {
        double[][][] t = groupTensors;
        if (t == null) {
            synchronized (this) {
                t = groupTensors;
                if (t == null) {
                    t = FourthMoments.groupTensors(variant, null);
                    groupTensors = t;
                }
            }
        }
        return t;
    }

    ClusterMoments clusterMoments(String column) {
        return clusterMoments.computeIfAbsent(column, c -> ClusterMoments.build(variant, variant.clusters.get(c)));
    }
}
