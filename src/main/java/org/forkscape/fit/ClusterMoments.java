package org.forkscape.fit;

import java.util.ArrayList;
import java.util.HashMap;
import java.util.List;
import java.util.Map;

/**
 * Per-cluster cross-products for the CR1 meat without a pass over rows: the cluster's score for the
 * key coefficient is sum_i e_i u_i = a' S w - beta a's - alpha w's + n alpha beta over each
 * (cluster, fixed-effect level) cell, with S, s and n the cell's cross-products, sums and count around
 * the level's shift. Cells are kept per missing-pattern group so that each specification sums exactly
 * its own usable rows.
 */
final class ClusterMoments {
    /** One (group, cluster, level) cell. */
    private static final class Cell {
        final int group;
        final int cluster;
        final int level;
        int n;
        final double[] sum;
        final double[] cross;

        Cell(int group, int cluster, int level, int p) {
            this.group = group;
            this.cluster = cluster;
            this.level = level;
            sum = new double[p];
            cross = new double[p * p];
        }
    }

    /** The cells of one usable set, summed over its groups. */
    static final class Usable {
        final int[] cluster;
        final int[] level;
        final int[] n;
        final double[][] sum;
        final double[][] cross;
        final int clusters;

        Usable(int[] cluster, int[] level, int[] n, double[][] sum, double[][] cross, int clusters) {
            this.cluster = cluster;
            this.level = level;
            this.n = n;
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

    /** Cost of building, in multiply-adds: one upper triangle per row. */
    static long buildCost(DataVariant v) {
        return (long) v.rows * v.columns * (v.columns + 1) / 2;
    }

    static ClusterMoments build(DataVariant v, int[] clusterCodes) {
        int p = v.columns;
        Map<Long, Cell> byKey = new HashMap<>();
        List<Cell> cells = new ArrayList<>();
        double[] z = new double[p];
        for (int r = 0; r < v.rows; r++) {
            int c = clusterCodes[r];
            if (c < 0) {
                continue;
            }
            long key = ((long) v.group[r] * (1L << 20) + c) * (1L << 21) + v.level[r];
            Cell cell = byKey.get(key);
            if (cell == null) {
                cell = new Cell(v.group[r], c, v.level[r], p);
                byKey.put(key, cell);
                cells.add(cell);
            }
            cell.n++;
            for (int j = 0; j < p; j++) {
                z[j] = v.shifted[j][r];
                cell.sum[j] += z[j];
            }
            double[] cross = cell.cross;
            for (int a = 0; a < p; a++) {
                double za = z[a];
                int base = a * p;
                for (int b = a; b < p; b++) {
                    cross[base + b] += za * z[b];
                }
            }
        }
        for (Cell cell : cells) {
            for (int a = 0; a < p; a++) {
                for (int b = a + 1; b < p; b++) {
                    cell.cross[b * p + a] = cell.cross[a * p + b];
                }
            }
        }
        return new ClusterMoments(p, cells);
    }

    /** The (cluster, level) cells of the usable rows of {@code mom}, in first-appearance order. */
    Usable usable(Moments mom) {
        Map<Long, Integer> index = new HashMap<>();
        List<int[]> keys = new ArrayList<>();
        List<double[]> sums = new ArrayList<>();
        List<double[]> crosses = new ArrayList<>();
        List<Integer> counts = new ArrayList<>();
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
            }
        }
        int m = keys.size();
        int[] cluster = new int[m];
        int[] level = new int[m];
        int[] n = new int[m];
        for (int i = 0; i < m; i++) {
            cluster[i] = keys.get(i)[0];
            level[i] = keys.get(i)[1];
            n[i] = counts.get(i);
        }
        return new Usable(cluster, level, n, sums.toArray(new double[0][]), crosses.toArray(new double[0][]),
                maxCluster + 1);
    }
}
