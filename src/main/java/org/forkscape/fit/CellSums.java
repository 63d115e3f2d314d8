package org.forkscape.fit;

/**
 * The cells of a variant's sufficient statistics: per (missing-pattern group, fixed-effect level) cell, the
 * row count, the sums of the shifted model columns and their cross-products (P x P, full). In a weighted
 * variant the sums and cross-products are weighted (sum w z, sum w z z') and each cell also keeps its
 * weight total: the moments of weighted least squares, whose within matrix is then the weighted within
 * matrix (each level centred on its weighted mean).
 */
final class CellSums {
    /** Rows per block of the cross-product sums. */
    static final int BLOCK_ROWS = 8192;
    /** Beyond this many doubles of partial sums (many fixed-effect levels), rows are summed in one block. */
    static final long MAX_BLOCK_DOUBLES = 1L << 24;

    final int[][] cellCount;
    /** Per cell: the sum of the rows' weights; null when the variant is unweighted (the counts are the weights). */
    final double[][] cellWeight;
    final double[][][] cellSum;
    final double[][][] cellCross;

    /**
     * Cells summed elsewhere (by the parts of a table held on a cluster, {@link PartialStatistics}).
     *
     * @param cellWeight per cell, the weight total of a weighted variant's sums; null when unweighted
     */
    CellSums(int[][] cellCount, double[][] cellWeight, double[][][] cellSum, double[][][] cellCross) {
        this.cellCount = cellCount;
        this.cellWeight = cellWeight;
        this.cellSum = cellSum;
        this.cellCross = cellCross;
    }

    /** Sums the cells of {@code coded}, summing row blocks on {@code pool} when given (the result does not depend on it). */
    CellSums(CodedRows coded, java.util.concurrent.ExecutorService pool) {
        int groups = coded.groupMissing.length;
        cellCount = new int[groups][coded.levels];
        cellWeight = coded.weight == null ? null : new double[groups][coded.levels];
        cellSum = new double[groups][coded.levels][];
        cellCross = new double[groups][coded.levels][];
        accumulate(coded, pool);
    }

    /**
     * Sums each (group, level) cell's column sums and cross-products. Rows are taken in fixed blocks
     * whose partial sums are added in block order, so the result is the same whatever the number of
     * threads, and blocked (pairwise-like) summation also bounds the rounding error's growth (Higham,
     * Accuracy and Stability of Numerical Algorithms, 2nd ed., section 4.2).
     */
    private void accumulate(CodedRows coded, java.util.concurrent.ExecutorService pool) {
        int p = coded.columns;
        int rows = coded.rows;
        int levels = coded.levels;
        int[] group = coded.group;
        int[] level = coded.level;
        double[][] shifted = coded.shifted;
        double[] weight = coded.weight;
        int groups = coded.groupMissing.length;
        int cells = groups * levels;
        int blocks = Math.max(1, (rows + BLOCK_ROWS - 1) / BLOCK_ROWS);
        if ((long) blocks * cells * (p + 1L) * p > MAX_BLOCK_DOUBLES) {
            blocks = 1;
        }
        int blockRows = blocks == 1 ? rows : BLOCK_ROWS;
        double[][][] partialSum = new double[blocks][][];
        double[][][] partialCross = new double[blocks][][];
        int[][] partialCount = new int[blocks][];
        double[][] partialWeight = new double[blocks][];
        java.util.function.IntConsumer block = b -> {
            double[][] sum = new double[cells][];
            double[][] cross = new double[cells][];
            int[] count = new int[cells];
            double[] weights = weight == null ? null : new double[cells];
            int from = b * blockRows;
            int to = Math.min(rows, from + blockRows);
            // rows of one cell contiguous: a counting sort of the block by cell
            int[] start = new int[cells + 1];
            for (int i = from; i < to; i++) {
                start[group[i] * levels + level[i] + 1]++;
            }
            for (int c = 0; c < cells; c++) {
                start[c + 1] += start[c];
            }
            int[] order = new int[to - from];
            int[] fill = start.clone();
            for (int i = from; i < to; i++) {
                order[fill[group[i] * levels + level[i]]++] = i;
            }
            // cells is 0 when no row survives the sample rules: then there is nothing to sum
            boolean oneCell = cells <= 1 || start[cells] == start[1];
            double[][] z = new double[p][];
            double[][] wz = weight == null ? null : new double[p][];
            double[] wc = null;
            for (int cell = 0; cell < cells; cell++) {
                int m = start[cell + 1] - start[cell];
                if (m == 0) {
                    continue;
                }
                for (int j = 0; j < p; j++) {
                    if (oneCell && m == to - from) {
                        z[j] = java.util.Arrays.copyOfRange(shifted[j], from, to);
                    } else {
                        double[] col = shifted[j];
                        double[] zj = new double[m];
                        for (int k = 0; k < m; k++) {
                            zj[k] = col[order[start[cell] + k]];
                        }
                        z[j] = zj;
                    }
                }
                count[cell] = m;
                double[] s = new double[p];
                double[] c = new double[p * p];
                double[][] left = z;
                if (weight != null) {
                    // the weighted sums: sum w z and sum (w z) z', with the weights in the cell's row order
                    if (wc == null || wc.length < m) {
                        wc = new double[m];
                    }
                    for (int k = 0; k < m; k++) {
                        wc[k] = weight[order[start[cell] + k]];
                    }
                    weights[cell] = Kernels.sum(wc, m);
                    for (int a = 0; a < p; a++) {
                        double[] za = z[a];
                        double[] wza = new double[m];
                        for (int k = 0; k < m; k++) {
                            wza[k] = wc[k] * za[k];
                        }
                        wz[a] = wza;
                    }
                    left = wz;
                }
                for (int a = 0; a < p; a++) {
                    s[a] = Kernels.sum(left[a], m);
                    for (int k = a; k < p; k++) {
                        c[a * p + k] = Kernels.dot(left[a], z[k], m);
                    }
                }
                sum[cell] = s;
                cross[cell] = c;
            }
            partialSum[b] = sum;
            partialCross[b] = cross;
            partialCount[b] = count;
            partialWeight[b] = weights;
        };
        if (pool == null || blocks == 1) {
            for (int b = 0; b < blocks; b++) {
                block.accept(b);
            }
        } else {
            java.util.List<java.util.concurrent.Future<?>> futures = new java.util.ArrayList<>();
            for (int b = 0; b < blocks; b++) {
                int index = b;
                futures.add(pool.submit(() -> block.accept(index)));
            }
            for (java.util.concurrent.Future<?> f : futures) {
                try {
                    f.get();
                } catch (InterruptedException e) {
                    Thread.currentThread().interrupt();
                    throw new IllegalStateException("interrupted while summing cross-products", e);
                } catch (java.util.concurrent.ExecutionException e) {
                    throw new IllegalStateException(e.getCause());
                }
            }
        }
        for (int cell = 0; cell < cells; cell++) {
            int g = cell / levels;
            int l = cell % levels;
            for (int b = 0; b < blocks; b++) {
                double[] s = partialSum[b][cell];
                if (s == null) {
                    continue;
                }
                cellCount[g][l] += partialCount[b][cell];
                if (cellWeight != null) {
                    cellWeight[g][l] += partialWeight[b][cell];
                }
                if (cellSum[g][l] == null) {
                    cellSum[g][l] = s;
                    cellCross[g][l] = partialCross[b][cell];
                } else {
                    double[] ts = cellSum[g][l];
                    double[] tc = cellCross[g][l];
                    double[] c = partialCross[b][cell];
                    for (int j = 0; j < p; j++) {
                        ts[j] += s[j];
                    }
                    for (int k = 0; k < tc.length; k++) {
                        tc[k] += c[k];
                    }
                }
            }
            double[] c = cellCross[g][l];
            if (c != null) {
                for (int a = 0; a < p; a++) {
                    for (int k = a + 1; k < p; k++) {
                        c[k * p + a] = c[a * p + k];
                    }
                }
            }
        }
    }
}
