package org.forkscape.fit;

/**
 * Raw moments up to order four of a variant's shifted columns over one set of usable rows, arranged
 * for the HC0 meat without a pass over rows. With e_i = z_i'a - alpha and u_i = z_i'w - beta (a the
 * residual's coefficients, w the key row of (X'X)^-1, alpha and beta the specification's mean offsets),
 * sum e_i^2 u_i^2 expands into contractions of sum z(x)z(x)z(x)z, sum z(x)z(x)z, sum z z', sum z and n.
 * The fourth-order part is stored as a symmetric matrix over column pairs, Q[(i,j)][(k,l)] = sum
 * z_i z_j z_k z_l, so a contraction is a sum over the specification's pairs. Built from the per-group
 * tensors in variants without absorbed fixed effects (with one absorbed column each level would need its
 * own tensor), and from the explicit demeaned rows of each usable set beside two absorbed columns
 * ({@link #ofWithinRows}), weighted or not. In a weighted variant without absorbed columns every order is
 * weighted by w^2 (sum w^2 z(x)z(x)z(x)z down to sum w^2), so that the same contraction gives the weighted
 * HC0 meat sum w^2 e^2 u^2.
 */
final class FourthMoments {
    final int columns;
    final int pairs;
    /** pairIndex[i * columns + j] for any order of i and j. */
    final int[] pairIndex;
    /** pairs x pairs. */
    final double[] q;
    /** pairs x columns: Q3[(i,j)][k] = sum z_i z_j z_k. */
    final double[] q3;
    /** columns x columns: sum z_i z_j. */
    final double[] s2;
    final double[] s1;
    /** The rows; in a weighted variant without absorbed columns, the sum of w^2 (every order above weighted by w^2). */
    final double n;

    private FourthMoments(int columns) {
        this.columns = columns;
        this.pairs = columns * (columns + 1) / 2;
        pairIndex = new int[columns * columns];
        int next = 0;
        for (int i = 0; i < columns; i++) {
            for (int j = i; j < columns; j++) {
                pairIndex[i * columns + j] = next;
                pairIndex[j * columns + i] = next;
                next++;
            }
        }
        q = new double[pairs * pairs];
        q3 = new double[pairs * columns];
        s2 = new double[columns * columns];
        s1 = new double[columns];
        n = 0;
    }

    private FourthMoments(FourthMoments shape, double n) {
        this.columns = shape.columns;
        this.pairs = shape.pairs;
        this.pairIndex = shape.pairIndex;
        this.q = shape.q;
        this.q3 = shape.q3;
        this.s2 = shape.s2;
        this.s1 = shape.s1;
        this.n = n;
    }

    /** Number of distinct fourth-order products per row for P columns, C(P+3, 4): the build cost per row. */
    static long distinctFourth(int p) {
        return (long) p * (p + 1) * (p + 2) * (p + 3) / 24;
    }

    /** Number of distinct third-order products, C(P+2, 3). */
    static long distinctThird(int p) {
        return (long) p * (p + 1) * (p + 2) / 6;
    }

    /** Rows per block of the tensor sums. */
    static final int BLOCK_ROWS = 2048;

    /**
     * Per missing-pattern group, the distinct third- and fourth-order sums of the variant's shifted
     * columns: index 0 holds the fourth order in the order of nested loops i <= j <= k <= l, index 1 the
     * third order. Rows are taken in fixed blocks per group, each block's sums formed column-wise
     * (products of columns, then dot products over the block's rows) and added in block order, so the
     * result is the same whatever the number of threads.
     */
    static double[][][] groupTensors(DataVariant v, java.util.concurrent.ExecutorService pool) {
        int p = v.columns;
        int groups = v.groupMissing.length;
        int[][] rowsOf = new int[groups][];
        int[] count = new int[groups];
        for (int r = 0; r < v.rows; r++) {
            count[v.group[r]]++;
        }
        for (int g = 0; g < groups; g++) {
            rowsOf[g] = new int[count[g]];
            count[g] = 0;
        }
        for (int r = 0; r < v.rows; r++) {
            int g = v.group[r];
            rowsOf[g][count[g]++] = r;
        }
        java.util.List<int[]> tasks = new java.util.ArrayList<>();
        for (int g = 0; g < groups; g++) {
            for (int from = 0; from < rowsOf[g].length; from += BLOCK_ROWS) {
                tasks.add(new int[] {g, from, Math.min(rowsOf[g].length, from + BLOCK_ROWS)});
            }
        }
        double[][][] partial = new double[tasks.size()][][];
        java.util.function.IntConsumer work = t -> {
            int[] task = tasks.get(t);
            partial[t] = block(v.shifted, null, rowsOf[task[0]], task[1], task[2], v.weight);
        };
        if (pool == null || tasks.size() == 1) {
            for (int t = 0; t < tasks.size(); t++) {
                work.accept(t);
            }
        } else {
            java.util.List<java.util.concurrent.Future<?>> futures = new java.util.ArrayList<>();
            for (int t = 0; t < tasks.size(); t++) {
                int index = t;
                futures.add(pool.submit(() -> work.accept(index)));
            }
            for (java.util.concurrent.Future<?> f : futures) {
                try {
                    f.get();
                } catch (InterruptedException e) {
                    Thread.currentThread().interrupt();
                    throw new IllegalStateException("interrupted while summing fourth moments", e);
                } catch (java.util.concurrent.ExecutionException e) {
                    throw new IllegalStateException(e.getCause());
                }
            }
        }
        double[][][] out = new double[groups][][];
        for (int t = 0; t < tasks.size(); t++) {
            int g = tasks.get(t)[0];
            if (out[g] == null) {
                out[g] = partial[t];
            } else {
                for (int o = 0; o < partial[t].length; o++) {
                    double[] into = out[g][o];
                    double[] add = partial[t][o];
                    for (int k = 0; k < into.length; k++) {
                        into[k] += add[k];
                    }
                }
            }
        }
        for (int g = 0; g < groups; g++) {
            if (out[g] == null) {
                out[g] = new double[][] {null, null};
            }
        }
        return out;
    }

    /** Rows whose products are added to the sums together ({@link #block}). */
    private static final int ROWS_AT_ONCE = 4;

    /**
     * The distinct third- and fourth-order sums over the rows {@code rows[from..to)} of {@code source}, each
     * value times the square root of its row's weight when {@code weight} is given; a null column reads as 0.
     * With {@code squaredWeight} (a weighted variant's analytic weights, for the weighted HC0 meat sum w^2 e^2
     * u^2 in the variant's shifted coordinates) every product is weighted by w^2 instead, and the block also
     * returns the w^2-weighted second- and first-order sums and the sum of w^2 (indices 2, 3 and 4), which
     * the cells, weighted by w, do not hold.
     *
     * <p>Row by row, so that the arithmetic runs along long contiguous runs the JIT turns into vector
     * instructions: with the pairs z_i z_j ordered by j, the triples z_i z_j z_k ordered by k are, for each
     * k, the pairs with j &lt;= k (a prefix) times z_k; and the fourth-order sums with last index l are, for
     * each l, the triples with k &lt;= l (again a prefix) times z_l, added into an accumulator per l. Each
     * sum takes its rows in row order, ((z_i z_j) z_k) z_l added one row after the other, four rows per pass
     * over the accumulators (the same additions in the same order, with fewer loads), so every sum is the
     * same whatever the JIT makes of the loops. The accumulators are laid out in the nested-loop order at
     * the end.
     */
    static double[][] block(double[][] source, double[] weight, int[] rows, int from, int to,
            double[] squaredWeight) {
        int p = source.length;
        int pairs = p * (p + 1) / 2;
        int triples = (int) distinctThird(p);
        // pairsUpTo[j]: the pairs (i, j') with i <= j' <= j; triplesUpTo[k]: the triples with last index <= k
        int[] pairsUpTo = new int[p];
        int[] triplesUpTo = new int[p];
        int count = 0;
        for (int j = 0; j < p; j++) {
            pairsUpTo[j] = (j + 1) * (j + 2) / 2;
            count += pairsUpTo[j];
            triplesUpTo[j] = count;
        }
        double[][] z = new double[ROWS_AT_ONCE][p];
        double[] w2 = new double[ROWS_AT_ONCE];
        double[][] pair = new double[ROWS_AT_ONCE][pairs];
        double[][] triple = new double[ROWS_AT_ONCE][triples];
        double[][] fourth = new double[p][];
        for (int l = 0; l < p; l++) {
            fourth[l] = new double[triplesUpTo[l]];
        }
        double[] third = new double[triples];
        double[] second = squaredWeight == null ? null : new double[pairs];
        double[] first = squaredWeight == null ? null : new double[p];
        double squaredWeights = 0;
        for (int r = from; r < to; r += ROWS_AT_ONCE) {
            for (int q = 0; q < ROWS_AT_ONCE; q++) {
                // rows past the end read as zeros, which add nothing
                int row = r + q < to ? rows[r + q] : -1;
                double[] zq = z[q];
                double root = row < 0 || weight == null ? 1 : Math.sqrt(weight[row]);
                for (int j = 0; j < p; j++) {
                    double[] col = source[j];
                    zq[j] = row < 0 || col == null ? 0 : weight == null ? col[row] : col[row] * root;
                }
                double[] pq = pair[q];
                for (int j = 0, at = 0; j < p; at += ++j) {
                    double zj = zq[j];
                    for (int i = 0; i <= j; i++) {
                        pq[at + i] = zq[i] * zj;
                    }
                }
                if (squaredWeight != null) {
                    double w = row < 0 ? 0 : squaredWeight[row];
                    w2[q] = w * w;
                    for (int t = 0; t < pairs; t++) {
                        pq[t] *= w2[q];
                    }
                }
                double[] tq = triple[q];
                for (int k = 0, at = 0; k < p; at += pairsUpTo[k++]) {
                    double zk = zq[k];
                    for (int t = 0, len = pairsUpTo[k]; t < len; t++) {
                        tq[at + t] = pq[t] * zk;
                    }
                }
            }
            double[] t0 = triple[0];
            double[] t1 = triple[1];
            double[] t2 = triple[2];
            double[] t3 = triple[3];
            for (int t = 0; t < triples; t++) {
                third[t] = (((third[t] + t0[t]) + t1[t]) + t2[t]) + t3[t];
            }
            for (int l = 0; l < p; l++) {
                double a0 = z[0][l];
                double a1 = z[1][l];
                double a2 = z[2][l];
                double a3 = z[3][l];
                double[] f = fourth[l];
                for (int t = 0, len = f.length; t < len; t++) {
                    f[t] = (((f[t] + t0[t] * a0) + t1[t] * a1) + t2[t] * a2) + t3[t] * a3;
                }
            }
            if (squaredWeight != null) {
                double[] p0 = pair[0];
                double[] p1 = pair[1];
                double[] p2 = pair[2];
                double[] p3 = pair[3];
                for (int t = 0; t < pairs; t++) {
                    second[t] = (((second[t] + p0[t]) + p1[t]) + p2[t]) + p3[t];
                }
                for (int j = 0; j < p; j++) {
                    first[j] = (((first[j] + z[0][j] * w2[0]) + z[1][j] * w2[1]) + z[2][j] * w2[2]) + z[3][j] * w2[3];
                }
                squaredWeights = (((squaredWeights + w2[0]) + w2[1]) + w2[2]) + w2[3];
            }
        }
        double[] f4 = new double[(int) distinctFourth(p)];
        double[] f3 = new double[triples];
        int i4 = 0;
        int i3 = 0;
        for (int i = 0; i < p; i++) {
            for (int j = i; j < p; j++) {
                for (int k = j; k < p; k++) {
                    int t = (k == 0 ? 0 : triplesUpTo[k - 1]) + j * (j + 1) / 2 + i;
                    f3[i3++] = third[t];
                    for (int l = k; l < p; l++) {
                        f4[i4++] = fourth[l][t];
                    }
                }
            }
        }
        if (squaredWeight == null) {
            return new double[][] {f4, f3};
        }
        double[] s2 = new double[p * p];
        for (int j = 0, at = 0; j < p; at += ++j) {
            for (int i = 0; i <= j; i++) {
                s2[i * p + j] = second[at + i];
                s2[j * p + i] = second[at + i];
            }
        }
        return new double[][] {f4, f3, s2, first, {squaredWeights}};
    }

    /** Sums the groups usable in {@code mom} and lays the result out over column pairs. */
    static FourthMoments of(Moments mom, double[][][] tensors) {
        DataVariant v = mom.variant;
        int p = v.columns;
        FourthMoments m = new FourthMoments(p);
        double[] f4 = new double[(int) distinctFourth(p)];
        double[] f3 = new double[(int) distinctThird(p)];
        int count = 0;
        double squaredWeights = 0;
        for (int g = mom.usableGroups.nextSetBit(0); g >= 0; g = mom.usableGroups.nextSetBit(g + 1)) {
            if (tensors[g][0] == null) {
                continue;
            }
            for (int k = 0; k < f4.length; k++) {
                f4[k] += tensors[g][0][k];
            }
            for (int k = 0; k < f3.length; k++) {
                f3[k] += tensors[g][1][k];
            }
            if (tensors[g].length > 2) {
                // weighted: the w^2-weighted lower orders summed with the tensors
                double[] s = tensors[g][3];
                double[] c = tensors[g][2];
                for (int j = 0; j < p; j++) {
                    m.s1[j] += s[j];
                }
                for (int k = 0; k < c.length; k++) {
                    m.s2[k] += c[k];
                }
                squaredWeights += tensors[g][4][0];
                continue;
            }
            count += v.cellCount[g][0];
            double[] s = v.cellSum[g][0];
            double[] c = v.cellCross[g][0];
            for (int j = 0; j < p; j++) {
                m.s1[j] += s[j];
            }
            for (int k = 0; k < c.length; k++) {
                m.s2[k] += c[k];
            }
        }
        layOut(m, f4, f3);
        return new FourthMoments(m, v.weighted ? squaredWeights : count);
    }

    /**
     * The moments of the explicit rows of a set with two absorbed columns: its demeaned rows ({@code demeaned},
     * over the variant's rows), each times the square root of its weight in a weighted variant, so that the
     * plain sums over them are the sums weighted least squares needs (sum w^2 e^2 u^2 = sum (sqrt(w) e)^2
     * (sqrt(w) u)^2). Their offsets are 0. Rows are taken in fixed blocks in row order and the blocks' sums
     * added in that order, so the result does not depend on the thread that builds it; the second-order sums
     * are the set's within matrix, formed from the same scaled rows.
     */
    static FourthMoments ofWithinRows(Moments mom, double[][] demeaned) {
        DataVariant v = mom.variant;
        return ofWithinSums(withinRowSums(demeaned, v.weight, mom.usableRows()), mom.within, mom.n);
    }

    /**
     * The distinct fourth- and third-order sums and the first-order sums of the demeaned rows {@code rows} of
     * {@code demeaned} (a null column reads as 0), each value times the square root of its row's weight when
     * {@code weight} is given: {f4, f3, s1}, in blocks of {@link #BLOCK_ROWS} rows in row order. Sums over
     * disjoint sets of rows add, element by element: a variant held in parts sums each part's rows where they
     * are ({@link CrossedEffectsByParts#withinSums}).
     */
    static double[][] withinRowSums(double[][] demeaned, double[] weight, int[] rows) {
        int p = demeaned.length;
        double[] f4 = new double[(int) distinctFourth(p)];
        double[] f3 = new double[(int) distinctThird(p)];
        for (int from = 0; from < rows.length; from += BLOCK_ROWS) {
            double[][] part = block(demeaned, weight, rows, from, Math.min(rows.length, from + BLOCK_ROWS), null);
            for (int k = 0; k < f4.length; k++) {
                f4[k] += part[0][k];
            }
            for (int k = 0; k < f3.length; k++) {
                f3[k] += part[1][k];
            }
        }
        double[] s1 = new double[p];
        for (int j = 0; j < p; j++) {
            double[] col = demeaned[j];
            if (col == null) {
                continue;
            }
            double t = 0;
            for (int row : rows) {
                t += weight == null ? col[row] : col[row] * Math.sqrt(weight[row]);
            }
            s1[j] = t;
        }
        return new double[][] {f4, f3, s1};
    }

    /**
     * The moments of a set's explicit rows from their {@link #withinRowSums}, its within matrix (the
     * second-order sums, formed from the same scaled rows) and its row count.
     */
    static FourthMoments ofWithinSums(double[][] sums, double[] within, int n) {
        int p = sums[2].length;
        FourthMoments m = new FourthMoments(p);
        System.arraycopy(sums[2], 0, m.s1, 0, p);
        System.arraycopy(within, 0, m.s2, 0, p * p);
        layOut(m, sums[0], sums[1]);
        return new FourthMoments(m, n);
    }

    /** Lays the distinct sums (nested-loop order i <= j <= k <= l) out over column pairs into {@code m}. */
    private static void layOut(FourthMoments m, double[] f4, double[] f3) {
        int p = m.columns;
        int i4 = 0;
        int i3 = 0;
        int[] pi = m.pairIndex;
        int np = m.pairs;
        for (int i = 0; i < p; i++) {
            for (int j = i; j < p; j++) {
                for (int k = j; k < p; k++) {
                    double t = f3[i3++];
                    m.q3[pi[i * p + j] * p + k] = t;
                    m.q3[pi[i * p + k] * p + j] = t;
                    m.q3[pi[j * p + k] * p + i] = t;
                    for (int l = k; l < p; l++) {
                        double u = f4[i4++];
                        // the three ways to split {i,j,k,l} into two pairs, both orders
                        int ij = pi[i * p + j];
                        int kl = pi[k * p + l];
                        int ik = pi[i * p + k];
                        int jl = pi[j * p + l];
                        int il = pi[i * p + l];
                        int jk = pi[j * p + k];
                        m.q[ij * np + kl] = u;
                        m.q[kl * np + ij] = u;
                        m.q[ik * np + jl] = u;
                        m.q[jl * np + ik] = u;
                        m.q[il * np + jk] = u;
                        m.q[jk * np + il] = u;
                    }
                }
            }
        }
    }

    /**
     * sum over the usable rows of (z'a - alpha)^2 (z'w - beta)^2.
     *
     * @param aCols columns where a is non-zero, {@code aVal} its values (not modified)
     * @param wCols columns where w is non-zero, {@code wVal} its values (not modified)
     */
    double meat(int[] aCols, double[] aVal, int na, int[] wCols, double[] wVal, int nw, double alpha, double beta,
            int[] wPairs, double[] wPairCoef) {
        int p = columns;
        int np = pairs;
        int nwp = 0;
        for (int x = 0; x < nw; x++) {
            for (int y = x; y < nw; y++) {
                wPairs[nwp] = pairIndex[wCols[x] * p + wCols[y]];
                wPairCoef[nwp] = (x == y ? 1 : 2) * wVal[x] * wVal[y];
                nwp++;
            }
        }
        double s4 = 0;
        double s3a = 0;
        double s3b = 0;
        double s2aa = 0;
        double s2aw = 0;
        double s2ww = 0;
        double s1a = 0;
        double s1w = 0;
        for (int x = 0; x < na; x++) {
            int ax = aCols[x];
            for (int y = x; y < na; y++) {
                int pair = pairIndex[ax * p + aCols[y]];
                double coef = (x == y ? 1 : 2) * aVal[x] * aVal[y];
                int row = pair * np;
                double sum = 0;
                for (int t = 0; t < nwp; t++) {
                    sum += wPairCoef[t] * q[row + wPairs[t]];
                }
                s4 += coef * sum;
                int row3 = pair * p;
                double w3 = 0;
                for (int t = 0; t < nw; t++) {
                    w3 += wVal[t] * q3[row3 + wCols[t]];
                }
                s3a += coef * w3;
                s2aa += coef * s2[ax * p + aCols[y]];
            }
            s1a += aVal[x] * s1[ax];
            for (int t = 0; t < nw; t++) {
                s2aw += aVal[x] * wVal[t] * s2[ax * p + wCols[t]];
            }
        }
        for (int t = 0; t < nwp; t++) {
            int row3 = wPairs[t] * p;
            double a3 = 0;
            for (int x = 0; x < na; x++) {
                a3 += aVal[x] * q3[row3 + aCols[x]];
            }
            s3b += wPairCoef[t] * a3;
        }
        for (int x = 0; x < nw; x++) {
            s1w += wVal[x] * s1[wCols[x]];
            for (int y = 0; y < nw; y++) {
                s2ww += wVal[x] * wVal[y] * s2[wCols[x] * p + wCols[y]];
            }
        }
        return s4 - 2 * beta * s3a + beta * beta * s2aa - 2 * alpha * s3b + 4 * alpha * beta * s2aw
                - 2 * alpha * beta * beta * s1a + alpha * alpha * s2ww - 2 * alpha * alpha * beta * s1w
                + n * alpha * alpha * beta * beta;
    }

    /**
     * An upper bound of the sum over the usable rows of (|z|'|a| + |alpha|)^2 (|z|'|w| + |beta|)^2, the
     * absolute-value counterpart of {@link #meat}: ||(a s, alpha sqrt n)||^2 ||(w s, beta sqrt n)||^2 times
     * the sum of ||(z / s, 1 / sqrt n)||^4 over rows, with s_j^2 the stored sum of squares of column j
     * (Cauchy-Schwarz in scaled coordinates; see {@link RowFreeSandwich}). The last sum is
     * sum_{i,j} Q[(i,i)][(j,j)] / (s_i^2 s_j^2) + (2 na + 1) / n.
     *
     * @param cols columns where a is non-zero, {@code aVal} its values; w lives on the first {@code nw} of
     *             them with values {@code wVal} (none modified)
     * @return the bound, or infinity when a column has no spread to scale by
     */
    double absoluteBound(int[] cols, double[] aVal, int na, double[] wVal, int nw, double alpha, double beta) {
        int p = columns;
        int np = pairs;
        double aNorm = alpha * alpha * n;
        double wNorm = beta * beta * n;
        double fourth = (2.0 * na + 1) / n;
        for (int x = 0; x < na; x++) {
            int c = cols[x];
            double sx = s2[c * p + c];
            if (!(sx > 0)) {
                return Double.POSITIVE_INFINITY;
            }
            aNorm += aVal[x] * aVal[x] * sx;
            if (x < nw) {
                wNorm += wVal[x] * wVal[x] * sx;
            }
            int row = pairIndex[c * p + c] * np;
            for (int y = 0; y < na; y++) {
                int d = cols[y];
                fourth += q[row + pairIndex[d * p + d]] / (sx * s2[d * p + d]);
            }
        }
        return aNorm * wNorm * fourth;
    }
}
