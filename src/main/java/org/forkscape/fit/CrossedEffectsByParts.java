package org.forkscape.fit;

import java.io.Serializable;
import java.util.Arrays;
import java.util.BitSet;
import java.util.HashMap;
import java.util.Map;
import org.apache.commons.math3.linear.Array2DRowRealMatrix;
import org.apache.commons.math3.linear.CholeskyDecomposition;
import org.apache.commons.math3.linear.DecompositionSolver;
import org.apache.commons.math3.linear.ArrayRealVector;
import org.apache.commons.math3.linear.NonPositiveDefiniteMatrixException;

/**
 * The exact within transformation of two crossed absorbed columns, A and B, for a variant held in parts in which
 * every row of an A level sits in one part (the Spark runner partitions on A, the column with more levels). No
 * iterations over the rows: with D = [D_A D_B] and W the weights, the normal equations of x on D are Da a + C b =
 * D_A'Wx and C'a + Db b = D_B'Wx (Da, Db the levels' weight totals, C the (A, B) pairs'), and eliminating a (block
 * Gaussian elimination: the Schur complement, as in Golub &amp; Van Loan 2013, Matrix Computations, 4th ed., Johns
 * Hopkins University Press, cited from memory) leaves S b = t on B alone, S = Db - C'Da^-1 C and t = D_B'W(x -
 * xbar_A), xbar_A each row's A-level mean of x. Both are sums over A levels, so each part sums its own ({@link
 * SchurSums}) and the driver adds them in part order. S is singular: its null space has one vector per connected
 * component of the graph whose nodes are the levels and whose edges are the pairs present, the dummies' rank
 * deficiency (Abowd, Creecy &amp; Kramarz 2002, "Computing person and firm effects using linked longitudinal
 * employer-employee data", U.S. Census Bureau LEHD Technical Paper 2002-06, cited from memory). Fixing one B level
 * per component at 0 (a generalised inverse) leaves a positive definite system, solved by Cholesky (Commons Math)
 * for every column; the residual x - a_A - b_B does not depend on which level is fixed. Each part then makes its
 * rows' within values, x - b_B minus their A-level mean, and sums from them what one machine sums from its demeaned
 * rows: by the Frisch-Waugh-Lovell theorem (Davidson &amp; MacKinnon 2004, Econometric Theory and Methods, sections
 * 2.4 and 2.6) least squares on them gives the coefficients and residuals of the regression with both sets of
 * dummies. K counts the dummies by their rank: the levels present of both columns less the components, as {@link
 * FixedEffectRank} counts them.
 *
 * <p>The driver's solve is cubic in B's levels, hence {@link #MAX_SECOND_LEVELS}; the parts' sums of S are B x B.
 */
public final class CrossedEffectsByParts {
    /** B's levels over the table above which the Spark runner refuses the alternative (the solve is cubic in them). */
    public static final int MAX_SECOND_LEVELS = 2000;
    /**
     * A Cholesky pivot of S at most this fraction of S's largest diagonal entry means levels joined so thinly
     * that the solve would keep few digits; the set is then reported as not demeaned (common practice for a
     * relative pivot threshold, as {@link CholeskySubsetSolver}'s).
     */
    static final double PIVOT_TOLERANCE = 1e-12;

    private CrossedEffectsByParts() {
    }

    /**
     * B's effect on each model column for one set of usable rows, with which a part makes its rows' within
     * values ({@link #demeaned}).
     *
     * @param first   the position of A among the absorbed columns
     * @param second  the position of B
     * @param effects        per model column, B's effect at each of its codes over the whole table; null for a
     *                       column missing in some of the set's rows
     * @param reduced        per B code, its place among the levels not fixed at 0 (-1 for a fixed or absent level)
     * @param inverse        for HC2 and HC3, the inverse of S over those levels (row-major), a generalised inverse
     *                       of S with the fixed levels' rows and columns 0; null when not asked for
     * @param illConditioned whether S was too poorly conditioned for that inverse
     *                       ({@link CrossedDummyLeverage#invert}): the set's HC2 and HC3 are then not computed
     */
    record Effects(int first, int second, double[][] effects, int[] reduced, double[] inverse,
            boolean illConditioned) implements Serializable {
        long doubles() {
            long d = inverse == null ? 0 : inverse.length;
            for (double[] e : effects) {
                d += e == null ? 0 : e.length;
            }
            return d;
        }
    }

    /** One part's sums for a set of usable rows: S's and t's shares, the pairs' links, the columns' spread. */
    static final class SchurSums implements Serializable {
        private static final long serialVersionUID = 1L;
        int rows;
        double weight;
        /** The A codes of the part's usable rows, ascending (each must be in one part only). */
        int[] firstCodes;
        /** B x B, row-major: Db - sum over the part's A levels of c_a c_a' / W_a. */
        double[] schur;
        /** Per model column, B long: sum over the rows of each B level of w (x - xbar_A); null when missing. */
        double[][] rhs;
        /** Union-find over B codes: a code's parent, -1 where the code has no usable row. */
        int[] link;
        /** Per model column {weight total, weighted mean, weighted sum of squares about it}; null when missing. */
        double[][] spread;
    }

    /** The dense codes the rows of a part have among the whole table's levels of each absorbed column. */
    record Codes(int[] first, int[] second) {
    }

    /** The model columns complete on every usable row: none of their variables is missing in a usable pattern. */
    static boolean[] complete(CodedRows coded, long[] usableMasks) {
        long missing = 0;
        for (long m : usableMasks) {
            missing |= m;
        }
        boolean[] out = new boolean[coded.columns];
        for (int j = 0; j < coded.columns; j++) {
            out[j] = (missing & (1L << coded.layout.variableOf(j))) == 0;
        }
        return out;
    }

    /** The part's rows in the usable patterns ({@code usableMasks} ascending), in row order. */
    static int[] usableRows(CodedRows coded, long[] usableMasks) {
        int[] rows = new int[coded.rows];
        int n = 0;
        for (int r = 0; r < coded.rows; r++) {
            if (Arrays.binarySearch(usableMasks, coded.groupMissing[coded.group[r]]) >= 0) {
                rows[n++] = r;
            }
        }
        return Arrays.copyOf(rows, n);
    }

    /** Each row's A level numbered 0.. in the order of their codes, the count last in {@code out}. */
    static int[] localFirst(int[] firstCodes, int[] rows, int[] levelOut) {
        int[] sorted = new int[rows.length];
        for (int i = 0; i < rows.length; i++) {
            sorted[i] = firstCodes[rows[i]];
        }
        int[] distinct = Arrays.stream(sorted).distinct().sorted().toArray();
        for (int i = 0; i < rows.length; i++) {
            levelOut[i] = Arrays.binarySearch(distinct, firstCodes[rows[i]]);
        }
        return distinct;
    }

    /**
     * This part's {@link SchurSums} over its rows in the usable patterns.
     *
     * @param secondLevels B's levels over the whole table
     */
    static SchurSums schurSums(CodedRows coded, Codes codes, int secondLevels, long[] usableMasks) {
        int[] rows = usableRows(coded, usableMasks);
        int n = rows.length;
        int p = coded.columns;
        boolean[] complete = complete(coded, usableMasks);
        int[] level = new int[n];
        int[] firstPresent = localFirst(codes.first(), rows, level);
        int la = firstPresent.length;
        double[] levelWeight = new double[la];
        double[] w = new double[n];
        for (int i = 0; i < n; i++) {
            w[i] = coded.weight == null ? 1 : coded.weight[rows[i]];
            levelWeight[level[i]] += w[i];
        }
        SchurSums out = new SchurSums();
        out.rows = n;
        out.firstCodes = firstPresent;
        out.schur = new double[secondLevels * secondLevels];
        out.rhs = new double[p][];
        out.spread = new double[p][];
        out.link = new int[secondLevels];
        Arrays.fill(out.link, -1);
        for (int i = 0; i < n; i++) {
            out.weight += w[i];
        }
        // per A level, its pairs with B: the weight of each B code among the level's rows (rows grouped by level)
        int[] order = byLevelThenSecond(level, la, codes.second(), rows);
        int start = 0;
        while (start < n) {
            int a = level[order[start]];
            int end = start;
            while (end < n && level[order[end]] == a) {
                end++;
            }
            // the level's distinct B codes and their weights, ascending
            int[] bs = new int[end - start];
            double[] cw = new double[end - start];
            int m = 0;
            for (int k = start; k < end; k++) {
                int i = order[k];
                int b = codes.second()[rows[i]];
                if (m > 0 && bs[m - 1] == b) {
                    cw[m - 1] += w[i];
                } else {
                    bs[m] = b;
                    cw[m++] = w[i];
                }
            }
            double wa = levelWeight[a];
            for (int u = 0; u < m; u++) {
                out.schur[bs[u] * secondLevels + bs[u]] += cw[u];
                for (int v = 0; v < m; v++) {
                    out.schur[bs[u] * secondLevels + bs[v]] -= cw[u] * cw[v] / wa;
                }
                if (out.link[bs[u]] < 0) {
                    out.link[bs[u]] = bs[u];
                }
                union(out.link, bs[0], bs[u]);
            }
            start = end;
        }
        double[] mean = new double[la];
        for (int j = 0; j < p; j++) {
            if (!complete[j]) {
                continue;
            }
            double[] x = coded.shifted[j];
            levelMeans(x, rows, level, w, levelWeight, mean);
            double[] t = new double[secondLevels];
            for (int i = 0; i < n; i++) {
                t[codes.second()[rows[i]]] += w[i] * (x[rows[i]] - mean[level[i]]);
            }
            out.rhs[j] = t;
            out.spread[j] = spread(x, rows, w, out.weight);
        }
        return out;
    }

    /**
     * The rows 0..n-1 ordered by A level, then by B code, then by position: a counting sort by level (stable),
     * then each level's rows sorted by (B code, position) packed in a long, without boxing a row.
     */
    private static int[] byLevelThenSecond(int[] level, int levels, int[] secondCodes, int[] rows) {
        int n = level.length;
        int[] start = new int[levels + 1];
        for (int l : level) {
            start[l + 1]++;
        }
        for (int a = 0; a < levels; a++) {
            start[a + 1] += start[a];
        }
        long[] keyed = new long[n];
        int[] next = start.clone();
        for (int i = 0; i < n; i++) {
            keyed[next[level[i]]++] = (long) secondCodes[rows[i]] << 32 | i;
        }
        int[] order = new int[n];
        for (int a = 0; a < levels; a++) {
            Arrays.sort(keyed, start[a], start[a + 1]);
        }
        for (int k = 0; k < n; k++) {
            order[k] = (int) keyed[k];
        }
        return order;
    }

    /**
     * Each A level's weighted mean of {@code x} over the rows (written into {@code mean}), corrected by a second
     * pass (Chan, Golub &amp; LeVeque 1983, The American Statistician 37(3)).
     */
    private static void levelMeans(double[] x, int[] rows, int[] level, double[] w, double[] levelWeight,
            double[] mean) {
        Arrays.fill(mean, 0);
        for (int i = 0; i < rows.length; i++) {
            mean[level[i]] += w[i] * x[rows[i]];
        }
        for (int a = 0; a < mean.length; a++) {
            mean[a] /= levelWeight[a];
        }
        double[] correction = new double[mean.length];
        for (int i = 0; i < rows.length; i++) {
            correction[level[i]] += w[i] * (x[rows[i]] - mean[level[i]]);
        }
        for (int a = 0; a < mean.length; a++) {
            mean[a] += correction[a] / levelWeight[a];
        }
    }

    /** {weight total, weighted mean, weighted sum of squares about it} of the rows, by the corrected two-pass formula. */
    private static double[] spread(double[] x, int[] rows, double[] w, double total) {
        if (rows.length == 0) {
            return new double[] {0, 0, 0};
        }
        double mean = 0;
        for (int i = 0; i < rows.length; i++) {
            mean += w[i] * x[rows[i]];
        }
        mean /= total;
        double c = 0;
        for (int i = 0; i < rows.length; i++) {
            c += w[i] * (x[rows[i]] - mean);
        }
        mean += c / total;
        double squares = 0;
        for (int i = 0; i < rows.length; i++) {
            double d = x[rows[i]] - mean;
            squares += w[i] * d * d;
        }
        return new double[] {total, mean, squares};
    }

    /** Two parts' sums as one ({@code a} modified and returned); an A level in both parts is refused. */
    static SchurSums add(SchurSums a, SchurSums b) {
        int[] both = new int[a.firstCodes.length + b.firstCodes.length];
        System.arraycopy(a.firstCodes, 0, both, 0, a.firstCodes.length);
        System.arraycopy(b.firstCodes, 0, both, a.firstCodes.length, b.firstCodes.length);
        Arrays.sort(both);
        for (int k = 1; k < both.length; k++) {
            if (both[k] == both[k - 1]) {
                throw new IllegalStateException("the rows of one level of the first absorbed column are in two parts "
                        + "(code " + both[k] + "); the parts must be cut by that column");
            }
        }
        a.firstCodes = both;
        a.rows += b.rows;
        a.weight += b.weight;
        for (int k = 0; k < a.schur.length; k++) {
            a.schur[k] += b.schur[k];
        }
        for (int j = 0; j < a.rhs.length; j++) {
            if (a.rhs[j] != null && b.rhs[j] != null) {
                for (int k = 0; k < a.rhs[j].length; k++) {
                    a.rhs[j][k] += b.rhs[j][k];
                }
            }
            a.spread[j] = mergeSpread(a.spread[j], b.spread[j]);
        }
        for (int c = 0; c < b.link.length; c++) {
            if (b.link[c] >= 0) {
                if (a.link[c] < 0) {
                    a.link[c] = c;
                }
                int root = find(b.link, c);
                if (a.link[root] < 0) {
                    a.link[root] = root;
                }
                union(a.link, root, c);
            }
        }
        return a;
    }

    /** Two spreads as one, by the pairwise update with weights (Chan, Golub &amp; LeVeque 1983, The American Statistician 37(3)). */
    private static double[] mergeSpread(double[] a, double[] b) {
        if (a == null || b == null) {
            return a == null ? b : a;
        }
        double w = a[0] + b[0];
        if (w == 0) {
            return a;
        }
        double delta = b[1] - a[1];
        return new double[] {w, a[1] + delta * b[0] / w, a[2] + b[2] + delta * delta * a[0] * b[0] / w};
    }

    private static int find(int[] link, int c) {
        int root = c;
        while (link[root] != root) {
            root = link[root];
        }
        while (link[c] != root) {
            int next = link[c];
            link[c] = root;
            c = next;
        }
        return root;
    }

    /** Joins the components of u and v; the smaller code becomes the root, so the roots do not depend on order. */
    private static void union(int[] link, int u, int v) {
        int ru = find(link, u);
        int rv = find(link, v);
        if (ru != rv) {
            link[Math.max(ru, rv)] = Math.min(ru, rv);
        }
    }

    /** What the driver solves from the summed {@link SchurSums}: B's effects, the rank and the spreads. */
    record Solved(Effects effects, int rank, boolean solved, double[] totalSquares, int rows, double weight) {
    }

    /**
     * Solves S b = t for every complete column, one B level per component fixed at 0 (its smallest code).
     *
     * @param first     the position of A among the absorbed columns
     * @param second    the position of B
     * @param leverages whether HC2 and HC3 are asked for: then S's inverse over its free levels too
     */
    static Solved solve(SchurSums sums, int first, int second, boolean leverages) {
        int nb = sums.link.length;
        int[] reduced = new int[nb];
        Arrays.fill(reduced, -1);
        int present = 0;
        int components = 0;
        int m = 0;
        for (int c = 0; c < nb; c++) {
            if (sums.link[c] < 0) {
                continue;
            }
            present++;
            if (find(sums.link, c) == c) {
                components++;
            } else {
                reduced[c] = m++;
            }
        }
        int rank = sums.firstCodes.length + present - components;
        int p = sums.rhs.length;
        double[] totalSquares = new double[p];
        for (int j = 0; j < p; j++) {
            totalSquares[j] = sums.spread[j] == null ? 0 : sums.spread[j][2];
        }
        double[][] effects = new double[p][];
        DecompositionSolver solver = null;
        boolean solved = true;
        double[] inverse = null;
        boolean illConditioned = false;
        if (m > 0 && leverages) {
            inverse = new double[m * m];
            for (int u = 0; u < nb; u++) {
                for (int v = 0; v < nb && reduced[u] >= 0; v++) {
                    if (reduced[v] >= 0) {
                        inverse[reduced[u] * m + reduced[v]] = sums.schur[u * nb + v];
                    }
                }
            }
            // one machine's inverse of the same matrix (block diagonal by component), relative pivots and all
            illConditioned = CrossedDummyLeverage.invert(inverse, m) == null;
        } else if (leverages) {
            inverse = new double[0];
        }
        if (m > 0) {
            double[][] s = new double[m][m];
            double largest = 0;
            for (int u = 0; u < nb; u++) {
                if (reduced[u] < 0) {
                    continue;
                }
                for (int v = 0; v < nb; v++) {
                    if (reduced[v] >= 0) {
                        s[reduced[u]][reduced[v]] = sums.schur[u * nb + v];
                    }
                }
                largest = Math.max(largest, s[reduced[u]][reduced[u]]);
            }
            try {
                solver = new CholeskyDecomposition(new Array2DRowRealMatrix(s, false),
                        CholeskyDecomposition.DEFAULT_RELATIVE_SYMMETRY_THRESHOLD, PIVOT_TOLERANCE * largest)
                        .getSolver();
            } catch (NonPositiveDefiniteMatrixException e) {
                solved = false;
            }
        }
        for (int j = 0; j < p && solved; j++) {
            if (sums.rhs[j] == null) {
                continue;
            }
            double[] b = new double[nb];
            if (solver != null) {
                double[] t = new double[m];
                for (int c = 0; c < nb; c++) {
                    if (reduced[c] >= 0) {
                        t[reduced[c]] = sums.rhs[j][c];
                    }
                }
                double[] x = solver.solve(new ArrayRealVector(t, false)).toArray();
                for (int c = 0; c < nb; c++) {
                    if (reduced[c] >= 0) {
                        b[c] = x[reduced[c]];
                    }
                }
            }
            effects[j] = b;
        }
        return new Solved(new Effects(first, second, effects, reduced, illConditioned ? null : inverse,
                illConditioned), rank, solved, totalSquares, sums.rows, sums.weight);
    }

    /**
     * The within values of the part's usable rows, per model column with an effect: x - b_B minus the row's A-level
     * (weighted) mean of x - b_B, over the part's rows (0 at rows not usable); null for the other columns.
     */
    static double[][] demeaned(CodedRows coded, Codes codes, long[] usableMasks, Effects e) {
        int[] rows = usableRows(coded, usableMasks);
        int n = rows.length;
        int[] level = new int[n];
        int la = localFirst(codes.first(), rows, level).length;
        double[] w = new double[n];
        double[] levelWeight = new double[la];
        for (int i = 0; i < n; i++) {
            w[i] = coded.weight == null ? 1 : coded.weight[rows[i]];
            levelWeight[level[i]] += w[i];
        }
        double[][] out = new double[coded.columns][];
        double[] r = new double[coded.rows];
        double[] mean = new double[la];
        for (int j = 0; j < coded.columns; j++) {
            double[] b = e.effects()[j];
            if (b == null) {
                continue;
            }
            double[] x = coded.shifted[j];
            for (int i = 0; i < n; i++) {
                r[rows[i]] = x[rows[i]] - b[codes.second()[rows[i]]];
            }
            levelMeans(r, rows, level, w, levelWeight, mean);
            double[] within = new double[coded.rows];
            for (int i = 0; i < n; i++) {
                within[rows[i]] = r[rows[i]] - mean[level[i]];
            }
            out[j] = within;
        }
        return out;
    }

    /**
     * What a set's second pass sums from the within values besides their cross-products, as the variant's
     * routes ask ({@link DataVariant#expect}): the fourth moments for HC0 and HC1, and per cluster key (a cluster
     * column, or an intersection's key) the clusters' cells for one-way CR1 meats, as one machine sums both from
     * a set's demeaned rows ({@link FourthMoments#ofWithinRows}, {@link ClusterMoments#ofWithinRows}).
     */
    record WithinPass(Effects effects, boolean fourthMoments, String[] clusterKeys) implements Serializable {
    }

    /** One part's answer to a {@link WithinPass}; parts' answers add ({@link #add}). */
    static final class WithinSums implements Serializable {
        private static final long serialVersionUID = 1L;
        /** sum w x~ x~', P x P row-major (0 for columns without an effect). */
        double[] cross;
        /** {@link FourthMoments#withinRowSums}; null when not asked for. */
        double[][] fourth;
        /** Per cluster key of the pass, in its order. */
        ClusterMoments.WithinCellSums[] cells;

        static WithinSums add(WithinSums a, WithinSums b) {
            VariantByParts.addSums(a.cross, b.cross);
            for (int k = 0; a.fourth != null && k < a.fourth.length; k++) {
                VariantByParts.addSums(a.fourth[k], b.fourth[k]);
            }
            for (int c = 0; c < a.cells.length; c++) {
                a.cells[c] = ClusterMoments.WithinCellSums.add(a.cells[c], b.cells[c]);
            }
            return a;
        }
    }

    /**
     * This part's share of the pass's sums over its within values: the cross-products sum w x~ x~', and as asked
     * the fourth moments and, per cluster key, the clusters' cells.
     *
     * @param keysOfRow per cluster key of the pass, the whole table's key of each of the part's rows (-1: none)
     */
    static WithinSums withinSums(CodedRows coded, Codes codes, long[] usableMasks, WithinPass pass,
            long[][] keysOfRow) {
        double[][] x = demeaned(coded, codes, usableMasks, pass.effects());
        int[] rows = usableRows(coded, usableMasks);
        int p = coded.columns;
        WithinSums out = new WithinSums();
        out.cross = new double[p * p];
        for (int a = 0; a < p; a++) {
            if (x[a] == null) {
                continue;
            }
            for (int b = a; b < p; b++) {
                if (x[b] == null) {
                    continue;
                }
                double s = 0;
                for (int r : rows) {
                    s += (coded.weight == null ? 1 : coded.weight[r]) * x[a][r] * x[b][r];
                }
                out.cross[a * p + b] = s;
                out.cross[b * p + a] = s;
            }
        }
        out.fourth = pass.fourthMoments() ? FourthMoments.withinRowSums(x, coded.weight, rows) : null;
        out.cells = new ClusterMoments.WithinCellSums[pass.clusterKeys().length];
        for (int c = 0; c < out.cells.length; c++) {
            out.cells[c] = ClusterMoments.WithinCellSums.of(x, coded.weight, rows, keysOfRow[c]);
        }
        return out;
    }

    /** The set's within transformation as the solvers read it, from the solve and the summed cross-products. */
    static SeveralEffectsWithin within(Solved s, double[] within, boolean weighted) {
        return SeveralEffectsWithin.fromParts(s.rows(), s.rank(), within, s.totalSquares(), s.solved(), s.weight(),
                weighted, s.effects(), null, Map.of());
    }

    /**
     * The same with the structures the pass summed ({@code sums}, of {@code pass}): the set's fourth moments and
     * its clusters' cells by cluster key.
     */
    static SeveralEffectsWithin within(Solved s, WithinPass pass, WithinSums sums, boolean weighted) {
        FourthMoments fourth = sums.fourth == null ? null : FourthMoments.ofWithinSums(sums.fourth, sums.cross,
                s.rows());
        Map<String, ClusterMoments.WithinCells> cells = new HashMap<>();
        for (int c = 0; c < pass.clusterKeys().length; c++) {
            cells.put(pass.clusterKeys()[c], sums.cells[c].cells());
        }
        return SeveralEffectsWithin.fromParts(s.rows(), s.rank(), sums.cross, s.totalSquares(), s.solved(),
                s.weight(), weighted, s.effects(), fourth, cells);
    }

    /** The missing masks of the groups in {@code usable}, ascending. */
    static long[] masks(DataVariant v, BitSet usable) {
        return usable.stream().mapToLong(g -> v.groupMissing[g]).sorted().toArray();
    }
}
