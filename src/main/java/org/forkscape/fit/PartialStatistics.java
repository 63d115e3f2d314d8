package org.forkscape.fit;

import java.io.Serializable;
import java.util.ArrayList;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.TreeMap;

/**
 * The sufficient statistics of one part of a variant's rows, in a form that parts add up in: per
 * (missing pattern, fixed-effect level) cell the count, column sums and cross-products around the level
 * shifts every part shares ({@link WholeRows}); per missing pattern the third- and fourth-order sums when
 * asked for; per cluster column the (pattern, cluster, level) cells. In a weighted variant every cell also
 * keeps its weight total, its sums are weighted (sum w z, sum w z z') and the tensors weighted by w^2 with
 * their w^2-weighted lower orders, exactly as the single-machine engine sums them ({@link CellSums},
 * {@link FourthMoments#groupTensors}, {@link ClusterMoments#build}). Cells are keyed by the pattern's
 * missing mask rather than by a group number (which each part would number in its own order of first
 * appearance), and kept in key order, so that merging parts in a fixed order gives the same numbers
 * whatever the order the parts were computed in. {@link #variant} turns the sum of every part into the
 * {@link DataVariant} the solvers read, with the very cells the single-machine engine sums from its rows.
 * Not thread safe; {@link #add} modifies this object.
 */
public final class PartialStatistics implements Serializable {
    private static final long serialVersionUID = 1L;

    /**
     * A cell's place: missing mask, cluster (-1 for the cells of the cross-products; a cluster code, or for an
     * intersection of cluster columns its key over the whole table, {@link #of}) and level.
     */
    private record CellKey(long mask, long cluster, int level) implements Comparable<CellKey>, Serializable {
        @Override
        public int compareTo(CellKey o) {
            int c = Long.compare(mask, o.mask);
            if (c != 0) {
                return c;
            }
            c = Long.compare(cluster, o.cluster);
            return c != 0 ? c : Integer.compare(level, o.level);
        }
    }

    /** A cell's count, weight total (0 when unweighted), column sums and full cross-products. */
    private static final class Sums implements Serializable {
        private static final long serialVersionUID = 1L;
        long n;
        double weight;
        final double[] sum;
        final double[] cross;

        Sums(long n, double weight, double[] sum, double[] cross) {
            this.n = n;
            this.weight = weight;
            this.sum = sum;
            this.cross = cross;
        }

        void add(Sums o) {
            n += o.n;
            weight += o.weight;
            for (int j = 0; j < sum.length; j++) {
                sum[j] += o.sum[j];
            }
            for (int k = 0; k < cross.length; k++) {
                cross[k] += o.cross[k];
            }
        }
    }

    private final int columns;
    private boolean weighted;
    private long rows;
    private final TreeMap<CellKey, Sums> cells = new TreeMap<>();
    /**
     * Per missing mask: {fourth order, third order}, and when weighted the w^2-weighted second and first
     * orders and the sum of w^2 ({@link FourthMoments#groupTensors}); null when the tensors were not asked for.
     */
    private final TreeMap<Long, double[][]> tensors;
    private final TreeMap<String, TreeMap<CellKey, Sums>> clusterCells = new TreeMap<>();
    private final TreeMap<String, Integer> clusterCounts = new TreeMap<>();
    /** The intersections of cluster columns, whose cells are keyed by their clusters' keys, not codes. */
    private final java.util.TreeSet<String> intersections = new java.util.TreeSet<>();

    private PartialStatistics(int columns, boolean withTensors) {
        this.columns = columns;
        this.tensors = withTensors ? new TreeMap<>() : null;
    }

    /**
     * The statistics of one part's coded rows: its cell sums, and as asked the per-group tensors and the
     * per-cluster cells of every cluster column the plan names and of every intersection of them a multi-way
     * error type needs ({@link ClusterComponents}), each summed by the engine's own routines. A part numbers an
     * intersection's clusters in its own order of first appearance, so its cells are keyed instead by each
     * cluster's key over the whole table ({@code intersectionKeys}), which {@link #variant} numbers densely.
     *
     * @param intersectionKeys per intersection key, the whole table's key of each of the part's cluster codes
     */
    static PartialStatistics of(DataVariant part, boolean withTensors, List<String> clusterColumns,
            Map<String, long[]> intersectionKeys) {
        PartialStatistics p = new PartialStatistics(part.columns, withTensors);
        p.rows = part.rows;
        p.weighted = part.weighted;
        long[] masks = part.groupMissing;
        for (int g = 0; g < masks.length; g++) {
            for (int l = 0; l < part.levels; l++) {
                if (part.cellCount[g][l] > 0) {
                    p.cells.put(new CellKey(masks[g], -1, l), new Sums(part.cellCount[g][l],
                            part.cellWeight == null ? 0 : part.cellWeight[g][l], part.cellSum[g][l],
                            part.cellCross[g][l]));
                }
            }
        }
        if (withTensors) {
            double[][][] t = FourthMoments.groupTensors(part, null);
            for (int g = 0; g < masks.length; g++) {
                if (t[g][0] != null) {
                    p.tensors.put(masks[g], t[g]);
                }
            }
        }
        List<String> keys = new ArrayList<>(clusterColumns);
        keys.addAll(intersectionKeys.keySet());
        for (String column : keys) {
            long[] global = intersectionKeys.get(column);
            TreeMap<CellKey, Sums> byCell = new TreeMap<>();
            for (ClusterMoments.Cell c : ClusterMoments.build(part, part.clusters.get(column)).cells()) {
                byCell.put(new CellKey(masks[c.group], global == null ? c.cluster : global[c.cluster], c.level),
                        new Sums(c.n, c.weight, c.sum, c.cross));
            }
            p.clusterCells.put(column, byCell);
            if (global == null) {
                p.clusterCounts.put(column, part.clusterCounts.get(column));
            } else {
                p.intersections.add(column);
            }
        }
        return p;
    }

    /** Adds {@code other}'s sums to this one's (modified); returns this. */
    public PartialStatistics add(PartialStatistics other) {
        rows += other.rows;
        weighted |= other.weighted;
        addCells(cells, other.cells);
        if (tensors != null) {
            other.tensors.forEach((mask, t) -> tensors.merge(mask, copy(t), (a, b) -> {
                for (int o = 0; o < a.length; o++) {
                    for (int k = 0; k < a[o].length; k++) {
                        a[o][k] += b[o][k];
                    }
                }
                return a;
            }));
        }
        other.clusterCells.forEach((column, c) -> addCells(clusterCells.computeIfAbsent(column,
                k -> new TreeMap<>()), c));
        other.clusterCounts.forEach((column, g) -> clusterCounts.merge(column, g, Math::max));
        intersections.addAll(other.intersections);
        return this;
    }

    private static double[][] copy(double[][] t) {
        double[][] out = new double[t.length][];
        for (int o = 0; o < t.length; o++) {
            out[o] = t[o].clone();
        }
        return out;
    }

    private static void addCells(TreeMap<CellKey, Sums> into, TreeMap<CellKey, Sums> from) {
        from.forEach((key, s) -> {
            Sums mine = into.get(key);
            if (mine == null) {
                into.put(key, new Sums(s.n, s.weight, s.sum.clone(), s.cross.clone()));
            } else {
                mine.add(s);
            }
        });
    }

    /** Number of rows summed. */
    public long rows() {
        return rows;
    }

    /**
     * The variant of these statistics, without rows: groups numbered in ascending order of their missing
     * masks, the row-free routes' structures where they were summed.
     *
     * @param dimensions the absorbed columns when two or more, else 0
     */
    DataVariant variant(ModelColumns layout, int levels, String absorbColumn, double[][] levelShift,
            int dimensions) {
        if (rows > Integer.MAX_VALUE) {
            throw new IllegalArgumentException("a data variant of " + rows + " rows is above the engine's limit of "
                    + Integer.MAX_VALUE + " rows per variant");
        }
        java.util.TreeSet<Long> maskSet = new java.util.TreeSet<>();
        cells.keySet().forEach(k -> maskSet.add(k.mask()));
        long[] masks = maskSet.stream().mapToLong(Long::longValue).toArray();
        Map<Long, Integer> groupOf = new HashMap<>();
        for (int g = 0; g < masks.length; g++) {
            groupOf.put(masks[g], g);
        }
        int[][] count = new int[masks.length][levels];
        double[][][] sum = new double[masks.length][levels][];
        double[][][] cross = new double[masks.length][levels][];
        double[][] weight = weighted ? new double[masks.length][levels] : null;
        cells.forEach((key, s) -> {
            int g = groupOf.get(key.mask());
            count[g][key.level()] = (int) s.n;
            if (weight != null) {
                weight[g][key.level()] = s.weight;
            }
            sum[g][key.level()] = s.sum;
            cross[g][key.level()] = s.cross;
        });
        double[][][] groupTensors = null;
        if (tensors != null) {
            groupTensors = new double[masks.length][][];
            for (int g = 0; g < masks.length; g++) {
                double[][] t = tensors.get(masks[g]);
                groupTensors[g] = t == null ? new double[][] {null, null} : t;
            }
        }
        Map<String, ClusterMoments> clusterMoments = new HashMap<>();
        Map<String, Integer> counts = new TreeMap<>(clusterCounts);
        Map<String, long[]> keysByCode = new HashMap<>();
        clusterCells.forEach((column, byCell) -> {
            // an intersection's clusters numbered densely in the order of their keys, the same on every part
            Map<Long, Integer> dense = new HashMap<>();
            if (intersections.contains(column)) {
                long[] ascending = byCell.keySet().stream().mapToLong(CellKey::cluster).distinct().sorted().toArray();
                for (long k : ascending) {
                    dense.put(k, dense.size());
                }
                counts.put(column, dense.size());
                keysByCode.put(column, ascending);
            }
            List<ClusterMoments.Cell> list = new ArrayList<>(byCell.size());
            byCell.forEach((key, s) -> {
                int cluster = dense.isEmpty() ? (int) key.cluster() : dense.get(key.cluster());
                ClusterMoments.Cell c = new ClusterMoments.Cell(groupOf.get(key.mask()), cluster, key.level(),
                        s.sum, s.cross);
                c.n = (int) s.n;
                c.weight = s.weight;
                list.add(c);
            });
            clusterMoments.put(column, ClusterMoments.of(columns, list));
        });
        CodedRows shape = new CodedRows(layout, (int) rows, levels, absorbColumn, levelShift, masks, counts,
                weighted, dimensions);
        DataVariant variant = new DataVariant(shape, new CellSums(count, weight, sum, cross), groupTensors,
                clusterMoments);
        variant.intersectionClusterKeys = Map.copyOf(keysByCode);
        return variant;
    }
}
