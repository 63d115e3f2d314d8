package org.forkscape.fit;

import java.util.ArrayList;
import java.util.HashMap;
import java.util.List;
import java.util.Map;

/**
 * Per-cluster cross-products for the CR1 meat without a pass over rows: the cluster's score for the
 * key coefficient is sum_i e_i u_i = a' S w - beta a's - alpha w's + n alpha beta over each
 * (cluster, fixed-effect level) cell, with S, s and n the cell's cross-products, sums and count around
 * the level's shift; in a weighted variant the weighted sums and the weight total, so that the score is
 * sum_i w_i e_i u_i. Cells are kept per missing-pattern group so that each specification sums exactly
 * its own usable rows. Beside two absorbed columns the within values depend on the usable set, so each set's
 * cells are summed from its own demeaned rows instead ({@link #ofWithinRows}).
 */
final class ClusterMoments {
    /** One (group, cluster, level) cell. */
    static final class Cell {
        final int group;
        final int cluster;
        final int level;
        int n;
        /** The weight total of the cell's rows (0 when unweighted: {@link #n} serves). */
        double weight;
        final double[] sum;
        final double[] cross;

        Cell(int group, int cluster, int level, int p) {
            this(group, cluster, level, new double[p], new double[p * p]);
        }

        /** A cell over the given sums (not copied). */
        Cell(int group, int cluster, int level, double[] sum, double[] cross) {
            this.group = group;
            this.cluster = cluster;
            this.level = level;
            this.sum = sum;
            this.cross = cross;
        }
    }

    /** The cells of one usable set, summed over its groups. */
    static final class Usable {
        final int[] cluster;
        final int[] level;
        final int[] n;
        /** Per cell: the weight total of its rows; null when unweighted. */
        final double[] weight;
        final double[][] sum;
        final double[][] cross;
        final int clusters;

        Usable(int[] cluster, int[] level, int[] n, double[] weight, double[][] sum, double[][] cross, int clusters) {
            this.cluster = cluster;
            this.level = level;
            this.n = n;
            this.weight = weight;
            this.sum = sum;
            this.cross = cross;
            this.clusters = clusters;
        }
    }

    private final int p;
    private final List<Cell> cells;

    private ClusterMoments(int p, List<Cell> cells) {
        this.p = p;
        this.cells = cells;
    }

    /** Cells summed elsewhere (by the parts of a table, {@link PartialStatistics}), over {@code p} columns. */
    static ClusterMoments of(int p, List<Cell> cells) {
        return new ClusterMoments(p, List.copyOf(cells));
    }

    /** The (group, cluster, level) cells, read-only. */
    List<Cell> cells() {
        return cells;
    }

    /** Cost of building, in multiply-adds: one upper triangle per row. */
    static long buildCost(int rows, int columns) {
        return (long) rows * columns * (columns + 1) / 2;
    }

    static ClusterMoments build(DataVariant v, int[] clusterCodes) {
        int p = v.columns;
        // number the (group, cluster, level) cells in order of first appearance
        Map<Long, Integer> ids = new HashMap<>();
        int[] cellOf = new int[v.rows];
        List<int[]> keys = new ArrayList<>();
        long lastKey = -1;
        int lastId = -1;
        for (int r = 0; r < v.rows; r++) {
            int c = clusterCodes[r];
            if (c < 0) {
                cellOf[r] = -1;
                continue;
            }
            long key = ((long) v.group[r] * (1L << 20) + c) * (1L << 21) + v.level[r];
            if (key != lastKey) {
                Integer id = ids.get(key);
                if (id == null) {
                    id = keys.size();
                    ids.put(key, id);
                    keys.add(new int[] {v.group[r], c, v.level[r]});
                }
                lastKey = key;
                lastId = id;
            }
            cellOf[r] = lastId;
        }
        int cells = keys.size();
        // every cell's sums in one pass in row order, each row's products added to its cell's accumulator
        // (sums, then the pairs z_i z_j, i <= j, by j), which stays in cache where gathering each cell's rows
        // column by column would read the columns out of order
        int pairs = p * (p + 1) / 2;
        int width = 1 + p + pairs;
        double[] acc = new double[cells * width];
        int[] count = new int[cells];
        double[] z = new double[p];
        double[][] shifted = v.shifted;
        double[] weight = v.weight;
        for (int r = 0; r < v.rows; r++) {
            int id = cellOf[r];
            if (id < 0) {
                continue;
            }
            count[id]++;
            int at = id * width;
            double w = weight == null ? 1 : weight[r];
            acc[at] += w;
            at++;
            for (int j = 0; j < p; j++) {
                z[j] = shifted[j][r];
                acc[at + j] += weight == null ? z[j] : z[j] * w;
            }
            at += p;
            for (int j = 0; j < p; j++, at += j) {
                double zj = z[j];
                if (weight == null) {
                    for (int i = 0; i <= j; i++) {
                        acc[at + i] += z[i] * zj;
                    }
                } else {
                    for (int i = 0; i <= j; i++) {
                        acc[at + i] += (z[i] * w) * zj;
                    }
                }
            }
        }
        List<Cell> out = new ArrayList<>(cells);
        for (int id = 0; id < cells; id++) {
            int[] k = keys.get(id);
            Cell cell = new Cell(k[0], k[1], k[2], p);
            cell.n = count[id];
            int at = id * width;
            cell.weight = weight == null ? 0 : acc[at];
            System.arraycopy(acc, at + 1, cell.sum, 0, p);
            at += 1 + p;
            for (int j = 0; j < p; j++, at += j) {
                for (int i = 0; i <= j; i++) {
                    cell.cross[i * p + j] = acc[at + i];
                    cell.cross[j * p + i] = acc[at + i];
                }
            }
            out.add(cell);
        }
        return new ClusterMoments(p, out);
    }

    /**
     * The per-cluster cross-products of the explicit rows of a set with two absorbed columns, laid out by
     * column pair: {@code cross[pair][g]} is the sum over cluster g's rows of z_i z_j ({@code pairIndex} as in
     * {@link FourthMoments}), so that a specification's scores a'S_g w for every cluster are a few streams over
     * contiguous arrays, reading only the pairs of its own columns.
     */
    static final class WithinCells {
        /** Clusters with rows in the set, in order of first appearance. */
        final int clusters;
        /** Per cluster: rows. */
        final int[] n;
        final int columns;
        /** pairIndex[i * columns + j] for any order of i and j. */
        final int[] pairIndex;
        /** Per column pair (i <= j): the per-cluster sums of z_i z_j; null for a pair of a column not in the set. */
        final double[][] cross;

        private WithinCells(int clusters, int[] n, int columns, int[] pairIndex, double[][] cross) {
            this.clusters = clusters;
            this.n = n;
            this.columns = columns;
            this.pairIndex = pairIndex;
            this.cross = cross;
        }
    }

    /**
     * The per-cluster cells of the explicit rows of a set with two absorbed columns: per cluster (one level,
     * offsets 0), the count and cross-products of the set's demeaned rows ({@code demeaned}, over the
     * variant's rows), each times the square root of its weight in a weighted variant. The cluster's score
     * a'S w is then sum_i w_i e_i u_i, the score of weighted least squares. Clusters are numbered in order
     * of first appearance and each cluster's rows summed in row order, so the cells do not depend on the
     * thread that builds them.
     *
     * @param clusterCodes the variant's code of each row for the cluster column (-1 where missing)
     */
    static WithinCells ofWithinRows(Moments mom, double[][] demeaned, int[] clusterCodes) {
        DataVariant v = mom.variant;
        int p = v.columns;
        int[] rows = mom.usableRows();
        int codes = 0;
        for (int row : rows) {
            codes = Math.max(codes, clusterCodes[row] + 1);
        }
        int[] cellOfCluster = new int[codes];
        java.util.Arrays.fill(cellOfCluster, -1);
        int[] cellOf = new int[rows.length];
        int cells = 0;
        for (int i = 0; i < rows.length; i++) {
            int c = clusterCodes[rows[i]];
            if (c < 0) {
                cellOf[i] = -1;
                continue;
            }
            if (cellOfCluster[c] < 0) {
                cellOfCluster[c] = cells++;
            }
            cellOf[i] = cellOfCluster[c];
        }
        int[] n = new int[cells];
        for (int id : cellOf) {
            if (id >= 0) {
                n[id]++;
            }
        }
        return new WithinCells(cells, n, p, pairIndex(p), withinCross(demeaned, v.weight, rows, cellOf, cells));
    }

    /** pairIndex[a * p + b]: the pair (a, b) for any order, numbered in nested-loop order a &lt;= b. */
    private static int[] pairIndex(int p) {
        int[] pairIndex = new int[p * p];
        int pairs = 0;
        for (int a = 0; a < p; a++) {
            for (int b = a; b < p; b++) {
                pairIndex[a * p + b] = pairs;
                pairIndex[b * p + a] = pairs;
                pairs++;
            }
        }
        return pairIndex;
    }

    /**
     * Per column pair, each cell's sum of z_a z_b over the rows {@code rows} whose cell is {@code cellOf[i]}
     * (-1: none), each value times the square root of its row's weight when {@code weight} is given; rows in
     * order, each product added to its cell's sum, so every sum is in row order.
     */
    private static double[][] withinCross(double[][] demeaned, double[] weight, int[] rows, int[] cellOf,
            int cells) {
        int p = demeaned.length;
        double[] root = null;
        if (weight != null) {
            root = new double[rows.length];
            for (int i = 0; i < rows.length; i++) {
                root[i] = Math.sqrt(weight[rows[i]]);
            }
        }
        int[] pairIndex = pairIndex(p);
        double[][] cross = new double[p * (p + 1) / 2][];
        for (int a = 0; a < p; a++) {
            double[] ca = demeaned[a];
            if (ca == null) {
                continue;
            }
            for (int b = a; b < p; b++) {
                double[] cb = demeaned[b];
                if (cb == null) {
                    continue;
                }
                double[] sum = new double[cells];
                for (int i = 0; i < rows.length; i++) {
                    int cell = cellOf[i];
                    if (cell >= 0) {
                        int row = rows[i];
                        sum[cell] += root == null ? ca[row] * cb[row] : (ca[row] * root[i]) * (cb[row] * root[i]);
                    }
                }
                cross[pairIndex[a * p + b]] = sum;
            }
        }
        return cross;
    }

    /**
     * One part's per-cluster cells of a set's within values, for a variant held in parts beside two absorbed
     * columns ({@link CrossedEffectsByParts#withinSums}): the clusters keyed by their key over the whole table
     * (ascending), so that the parts' cells of one cluster add ({@link #add}) wherever its rows are.
     */
    static final class WithinCellSums implements java.io.Serializable {
        private static final long serialVersionUID = 1L;
        int columns;
        /** The clusters' keys over the whole table, ascending. */
        long[] keys;
        /** Per cluster: the part's usable rows in it. */
        int[] n;
        /** Per column pair: the per-cluster sums of z_a z_b, as {@link WithinCells#cross}. */
        double[][] cross;

        /** The cells of one part's usable rows {@code rows}, each row's cluster key in {@code keyOfRow} (-1: none). */
        static WithinCellSums of(double[][] demeaned, double[] weight, int[] rows, long[] keyOfRow) {
            long[] keys = java.util.Arrays.stream(rows).mapToLong(r -> keyOfRow[r]).filter(k -> k >= 0).distinct()
                    .sorted().toArray();
            int[] cellOf = new int[rows.length];
            int[] n = new int[keys.length];
            for (int i = 0; i < rows.length; i++) {
                long key = keyOfRow[rows[i]];
                cellOf[i] = key < 0 ? -1 : java.util.Arrays.binarySearch(keys, key);
                if (cellOf[i] >= 0) {
                    n[cellOf[i]]++;
                }
            }
            WithinCellSums out = new WithinCellSums();
            out.columns = demeaned.length;
            out.keys = keys;
            out.n = n;
            out.cross = withinCross(demeaned, weight, rows, cellOf, keys.length);
            return out;
        }

        /** Two parts' cells as one: the union of their clusters, a cluster in both the sum of its two cells. */
        static WithinCellSums add(WithinCellSums a, WithinCellSums b) {
            long[] keys = java.util.stream.LongStream.concat(java.util.Arrays.stream(a.keys),
                    java.util.Arrays.stream(b.keys)).distinct().sorted().toArray();
            int[] fromA = positions(a.keys, keys);
            int[] fromB = positions(b.keys, keys);
            WithinCellSums out = new WithinCellSums();
            out.columns = a.columns;
            out.keys = keys;
            out.n = new int[keys.length];
            for (int c = 0; c < a.keys.length; c++) {
                out.n[fromA[c]] += a.n[c];
            }
            for (int c = 0; c < b.keys.length; c++) {
                out.n[fromB[c]] += b.n[c];
            }
            out.cross = new double[a.cross.length][];
            for (int pair = 0; pair < out.cross.length; pair++) {
                if (a.cross[pair] == null) {
                    continue;
                }
                double[] sum = new double[keys.length];
                for (int c = 0; c < a.keys.length; c++) {
                    sum[fromA[c]] += a.cross[pair][c];
                }
                for (int c = 0; c < b.keys.length; c++) {
                    sum[fromB[c]] += b.cross[pair][c];
                }
                out.cross[pair] = sum;
            }
            return out;
        }

        private static int[] positions(long[] of, long[] in) {
            int[] out = new int[of.length];
            for (int c = 0; c < of.length; c++) {
                out[c] = java.util.Arrays.binarySearch(in, of[c]);
            }
            return out;
        }

        /** The set's cells as the row-free sandwich reads them, the clusters in the order of their keys. */
        WithinCells cells() {
            return new WithinCells(keys.length, n, columns, pairIndex(columns), cross);
        }
    }

    /** The (cluster, level) cells of the usable rows of {@code mom}, in first-appearance order. */
    Usable usable(Moments mom) {
        Map<Long, Integer> index = new HashMap<>();
        List<int[]> keys = new ArrayList<>();
        List<double[]> sums = new ArrayList<>();
        List<double[]> crosses = new ArrayList<>();
        List<Integer> counts = new ArrayList<>();
        List<Double> weights = new ArrayList<>();
        int maxCluster = -1;
        for (Cell cell : cells) {
            if (!mom.usableGroups.get(cell.group)) {
                continue;
            }
            long key = (long) cell.cluster * (1L << 21) + cell.level;
            Integer at = index.get(key);
            if (at == null) {
                index.put(key, keys.size());
                keys.add(new int[] {cell.cluster, cell.level});
                sums.add(cell.sum.clone());
                crosses.add(cell.cross.clone());
                counts.add(cell.n);
                weights.add(cell.weight);
                maxCluster = Math.max(maxCluster, cell.cluster);
            } else {
                double[] s = sums.get(at);
                double[] c = crosses.get(at);
                for (int j = 0; j < p; j++) {
                    s[j] += cell.sum[j];
                }
                for (int k = 0; k < c.length; k++) {
                    c[k] += cell.cross[k];
                }
                counts.set(at, counts.get(at) + cell.n);
                weights.set(at, weights.get(at) + cell.weight);
            }
        }
        int m = keys.size();
        int[] cluster = new int[m];
        int[] level = new int[m];
        int[] n = new int[m];
        double[] weight = mom.variant.weighted ? new double[m] : null;
        for (int i = 0; i < m; i++) {
            cluster[i] = keys.get(i)[0];
            level[i] = keys.get(i)[1];
            n[i] = counts.get(i);
            if (weight != null) {
                weight[i] = weights.get(i);
            }
        }
        return new Usable(cluster, level, n, weight, sums.toArray(new double[0][]), crosses.toArray(new double[0][]),
                maxCluster + 1);
    }
}
