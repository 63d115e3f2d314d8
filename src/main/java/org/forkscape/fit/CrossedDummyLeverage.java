package org.forkscape.fit;

import org.apache.commons.math3.linear.Array2DRowRealMatrix;
import org.apache.commons.math3.linear.CholeskyDecomposition;
import org.apache.commons.math3.linear.NonPositiveDefiniteMatrixException;
import org.apache.commons.math3.linear.RealMatrix;
import org.forkscape.plan.AbsorbChoice;

/**
 * The two sets of fixed-effect dummies' part of each row's leverage beside two crossed absorbed columns, for
 * one set of usable rows, exactly. By the Frisch-Waugh-Lovell theorem the hat matrix of the regression on the
 * dummies D = [D1 D2] and the other columns X is the sum of the dummies' hat matrix and that of the demeaned
 * columns, H = P_D + P_{M_D X} (Frisch &amp; Waugh 1933, Econometrica 1(4); Lovell 1963, JASA 58(304); Davidson
 * &amp; MacKinnon 2004, Econometric Theory and Methods, section 2.4 for the partitioned regression and 2.6 for
 * leverages), so h_ii = d_i'(D'D)^- d_i + x~_i'(X~'X~)^-1 x~_i, where d_i has a 1 at row i's level of each
 * column and (D'D)^- is any generalised inverse (d_i lies in the row space of D). This class gives the first
 * term; the row passes add the second.
 *
 * <p>With A = diag(the first column's level counts), B = diag(the second's) and C the table of counts of each
 * pair of levels, D'D = [A C; C' B], and a generalised inverse by its Schur complement S = B - C'A^-1 C
 * (the block form of a generalised inverse of a partitioned symmetric matrix; {@code CrossedDummyLeverageTest}
 * holds it against an SVD pseudo-inverse) gives, for a row at levels (a, b), d_i'(D'D)^- d_i = 1/n_a + u'S^- u
 * with u = e_b - c_a/n_a (c_a row a of C). S is a weighted Laplacian of the levels of the second column: u'S u is the within-level-a sum of
 * squares of u, so its null space is spanned by the indicators of the connected components of the two columns'
 * level graph ({@link FixedEffectRank}), and fixing one level per component (deleting its row and column, which
 * makes the rest positive definite) gives a generalised inverse. S is put on the column with fewer levels
 * present, is block diagonal by component, and each block is scaled to unit diagonal and factored once by
 * Cholesky (Apache Commons Math), then inverted. The value depends on the row's pair of levels only: per pair
 * present, 1/n_a + S^-_bb - 2 (S^- c_a)_b / n_a + c_a'S^- c_a / n_a^2, at a cost of O(levels of b met by a) per
 * pair, O(rows x levels of the smaller column) at most over the set, besides the factorisation's O(k^3) for k
 * levels of the smaller column ({@link AbsorbChoice#MAX_LEVERAGE_LEVELS} at most); a level a whose rows all share one level b
 * has u = 0 exactly and the value 1/n_a (a singleton's leverage is then 1: exactly, or w (1/w) when weighted).
 *
 * <p>With analytic weights everything is in the weighted inner product, as weighted least squares with the
 * dummies written out (R's {@code hatvalues} of {@code lm(weights = )}): the counts are weight sums and row i's
 * value is w_i d_i'(D'WD)^- d_i. Immutable once built; safe for concurrent reads.
 */
final class CrossedDummyLeverage implements DummyLeverage {
    /**
     * A Cholesky pivot of a unit-diagonal block below this means a condition number above about 1e8, where the
     * leverages could lose more than half their digits (two groups of levels joined by rows of almost no
     * weight); the leverages are then refused rather than guessed ({@link FitStatus#LEVERAGE_ILL_CONDITIONED}).
     */
    static final double MIN_PIVOT = 1e-8;

    /** The code of the column with more levels present (A's side) of each row, indexed as the given arrays. */
    private final int[] bigCodes;
    private final int[] smallCodes;
    /** Per level of A's side: its first pair in {@link #pairSmall}; one more entry at the end. */
    private final int[] pairStart;
    /** Per pair present: the level of the smaller side, ascending within each level of A's side. */
    private final int[] pairSmall;
    /** Per pair present: d'(D'WD)^- d for a row at that pair. */
    private final double[] pairValue;
    private final double[] weight;
    /** Whether a block was too poorly conditioned to factor: no leverages then. */
    final boolean illConditioned;

    private CrossedDummyLeverage(int[] bigCodes, int[] smallCodes, int[] pairStart, int[] pairSmall,
            double[] pairValue, double[] weight, boolean illConditioned) {
        this.bigCodes = bigCodes;
        this.smallCodes = smallCodes;
        this.pairStart = pairStart;
        this.pairSmall = pairSmall;
        this.pairValue = pairValue;
        this.weight = weight;
        this.illConditioned = illConditioned;
    }

    /** The leverages of the usable rows of {@code mom}, a set of a variant that absorbs two columns. */
    static CrossedDummyLeverage of(Moments mom) {
        CodedRows coded = mom.variant.coded;
        return of(coded.dimensionCodes[0], coded.dimensionLevels[0], coded.dimensionCodes[1],
                coded.dimensionLevels[1], mom.variant.weight, mom.usableRows());
    }

    /**
     * @param first   each row's level of the first column (0..firstLevels-1), not modified and kept
     * @param second  each row's level of the second column, not modified and kept
     * @param weight  each row's positive analytic weight, or null when unweighted; not modified and kept
     * @param rows    the rows of the set, ascending (indices into the arrays above), not modified
     * @throws IllegalStateException when the smaller column has more than
     *                               {@link AbsorbChoice#MAX_LEVERAGE_LEVELS} levels in the set (the plan check
     *                               refuses such a plan before fitting)
     */
    static CrossedDummyLeverage of(int[] first, int firstLevels, int[] second, int secondLevels, double[] weight,
            int[] rows) {
        int presentFirst = present(first, firstLevels, rows);
        int presentSecond = present(second, secondLevels, rows);
        // S on the column with fewer levels present; a tie puts it on the second
        boolean firstIsBig = presentFirst >= presentSecond;
        int[] big = firstIsBig ? first : second;
        int[] small = firstIsBig ? second : first;
        int bigLevels = firstIsBig ? firstLevels : secondLevels;
        int smallLevels = firstIsBig ? secondLevels : firstLevels;
        int smallerLevels = Math.min(presentFirst, presentSecond);
        if (smallerLevels > AbsorbChoice.MAX_LEVERAGE_LEVELS) {
            throw new IllegalStateException(smallerLevels + " levels on the smaller absorbed column; the plan check "
                    + "refuses HC2/HC3 above " + AbsorbChoice.MAX_LEVERAGE_LEVELS);
        }

        // the rows by their level of A's side, in row order within a level (a stable counting sort)
        int n = rows.length;
        int[] start = new int[bigLevels + 1];
        for (int r : rows) {
            start[big[r] + 1]++;
        }
        for (int a = 0; a < bigLevels; a++) {
            start[a + 1] += start[a];
        }
        int[] order = new int[n];
        int[] next = java.util.Arrays.copyOf(start, bigLevels);
        for (int r : rows) {
            order[next[big[r]]++] = r;
        }

        // the pairs present, per level of A's side in ascending order of the smaller side's level, with their
        // weight sums (the table C); rows added in row order
        int[] pairStart = new int[bigLevels + 1];
        int[] pairSmall = new int[n];
        double[] pairWeight = new double[n];
        int[] seenAt = new int[smallLevels];
        java.util.Arrays.fill(seenAt, -1);
        int[] slot = new int[smallLevels];
        int[] met = new int[smallLevels];
        boolean[] smallPresent = new boolean[smallLevels];
        int pairs = 0;
        for (int a = 0; a < bigLevels; a++) {
            pairStart[a] = pairs;
            int count = 0;
            for (int i = start[a]; i < start[a + 1]; i++) {
                int b = small[order[i]];
                if (seenAt[b] != a) {
                    seenAt[b] = a;
                    met[count++] = b;
                }
            }
            java.util.Arrays.sort(met, 0, count);
            for (int c = 0; c < count; c++) {
                smallPresent[met[c]] = true;
                slot[met[c]] = pairs;
                pairSmall[pairs++] = met[c];
            }
            for (int i = start[a]; i < start[a + 1]; i++) {
                int r = order[i];
                pairWeight[slot[small[r]]] += weight == null ? 1 : weight[r];
            }
        }
        pairStart[bigLevels] = pairs;

        // n_a and m_b, the diagonals A and B, summed over the pairs in their order
        double[] bigWeight = new double[bigLevels];
        double[] smallWeight = new double[smallLevels];
        for (int a = 0; a < bigLevels; a++) {
            for (int c = pairStart[a]; c < pairStart[a + 1]; c++) {
                bigWeight[a] += pairWeight[c];
                smallWeight[pairSmall[c]] += pairWeight[c];
            }
        }

        // components of the smaller side's levels (a level of A's side joins the levels it meets), each rooted
        // at its lowest level, which is the one fixed; the others numbered within their component's block
        int[] parent = new int[smallLevels];
        for (int b = 0; b < smallLevels; b++) {
            parent[b] = b;
        }
        for (int a = 0; a < bigLevels; a++) {
            for (int c = pairStart[a] + 1; c < pairStart[a + 1]; c++) {
                int r0 = FixedEffectRank.root(parent, pairSmall[pairStart[a]]);
                int r1 = FixedEffectRank.root(parent, pairSmall[c]);
                if (r0 != r1) {
                    parent[Math.max(r0, r1)] = Math.min(r0, r1);
                }
            }
        }
        int[] block = new int[smallLevels];
        int[] local = new int[smallLevels];
        int[] blockOfRoot = new int[smallLevels];
        java.util.Arrays.fill(blockOfRoot, -1);
        int blocks = 0;
        int[] blockSize = new int[smallLevels];
        for (int b = 0; b < smallLevels; b++) {
            local[b] = -1;
            block[b] = -1;
            if (!smallPresent[b]) {
                continue;
            }
            int root = FixedEffectRank.root(parent, b);
            if (blockOfRoot[root] < 0) {
                blockOfRoot[root] = blocks++;
            }
            block[b] = blockOfRoot[root];
            if (root != b) {
                local[b] = blockSize[block[b]]++;
            }
        }

        // each block of S = B - C'A^-1 C over its free levels, scaled to unit diagonal, factored and inverted
        double[][] s = new double[blocks][];
        for (int k = 0; k < blocks; k++) {
            s[k] = new double[blockSize[k] * blockSize[k]];
        }
        for (int b = 0; b < smallLevels; b++) {
            if (local[b] >= 0) {
                s[block[b]][local[b] * blockSize[block[b]] + local[b]] = smallWeight[b];
            }
        }
        for (int a = 0; a < bigLevels; a++) {
            for (int c = pairStart[a]; c < pairStart[a + 1]; c++) {
                int b = pairSmall[c];
                if (local[b] < 0) {
                    continue;
                }
                double[] sk = s[block[b]];
                int size = blockSize[block[b]];
                for (int c2 = pairStart[a]; c2 < pairStart[a + 1]; c2++) {
                    int b2 = pairSmall[c2];
                    if (local[b2] >= 0) {
                        // the same product in either order, so that the block is exactly symmetric
                        sk[local[b] * size + local[b2]] -= pairWeight[c] * pairWeight[c2] / bigWeight[a];
                    }
                }
            }
        }
        for (int k = 0; k < blocks; k++) {
            if (invert(s[k], blockSize[k]) == null) {
                return new CrossedDummyLeverage(big, small, pairStart, pairSmall, null, weight, true);
            }
        }

        // per pair: 1/n_a + u'S^-u with u = e_b - c_a/n_a, expanded over the levels a meets
        double[] pairValue = new double[pairs];
        double[] cross = new double[smallLevels];
        for (int a = 0; a < bigLevels; a++) {
            int from = pairStart[a];
            int to = pairStart[a + 1];
            if (to - from == 1) {
                // every row of a at one level b: u = 0
                pairValue[from] = 1 / bigWeight[a];
                continue;
            }
            double na = bigWeight[a];
            double[] sk = s[block[pairSmall[from]]];
            int size = blockSize[block[pairSmall[from]]];
            // (S^- c_a)_b for each level b that a meets (0 at the fixed level), then c_a'S^-c_a
            double quadratic = 0;
            for (int c = from; c < to; c++) {
                int lb = local[pairSmall[c]];
                double sum = 0;
                if (lb >= 0) {
                    for (int c2 = from; c2 < to; c2++) {
                        int lb2 = local[pairSmall[c2]];
                        if (lb2 >= 0) {
                            sum += sk[lb * size + lb2] * pairWeight[c2];
                        }
                    }
                }
                cross[c - from] = sum;
                quadratic += pairWeight[c] * sum;
            }
            quadratic /= na * na;
            for (int c = from; c < to; c++) {
                int lb = local[pairSmall[c]];
                double value = 1 / na + quadratic;
                if (lb >= 0) {
                    value += sk[lb * size + lb] - 2 * cross[c - from] / na;
                }
                pairValue[c] = value;
            }
        }
        return new CrossedDummyLeverage(big, small, pairStart, java.util.Arrays.copyOf(pairSmall, pairs), pairValue,
                weight, false);
    }

    /**
     * The dummies' part of the leverage of {@code row} (an index into the arrays this was built over, a row of
     * the set): w_r d_r'(D'WD)^- d_r, or d_r'(D'D)^- d_r when unweighted.
     */
    @Override
    public double at(int row) {
        int a = bigCodes[row];
        int at = java.util.Arrays.binarySearch(pairSmall, pairStart[a], pairStart[a + 1], smallCodes[row]);
        double value = pairValue[at];
        return weight == null ? value : weight[row] * value;
    }

    @Override
    public boolean illConditioned() {
        return illConditioned;
    }

    /** Bytes this holds beyond the arrays it shares with the variant (for {@link MemoryFootprint}). */
    static long bytes(long bigLevels, long pairs) {
        return 4 * (bigLevels + 1) + 12 * pairs;
    }

    /**
     * Inverts the symmetric positive definite {@code size} x {@code size} matrix {@code s} (row-major) in place and
     * returns it, by Cholesky on its unit-diagonal scaling D s D, D = diag(s)^-1/2, whose pivots are relative to
     * the diagonal: s^-1 = D (D s D)^-1 D. Null (and {@code s} unchanged) when a pivot is below {@link #MIN_PIVOT}.
     */
    static double[] invert(double[] s, int size) {
        if (size == 0) {
            return new double[0];
        }
        double[] scale = new double[size];
        for (int i = 0; i < size; i++) {
            scale[i] = 1 / Math.sqrt(s[i * size + i]);
        }
        RealMatrix scaled = new Array2DRowRealMatrix(size, size);
        for (int i = 0; i < size; i++) {
            for (int j = 0; j < size; j++) {
                scaled.setEntry(i, j, s[i * size + j] * (scale[i] * scale[j]));
            }
        }
        RealMatrix inverse;
        try {
            // built exactly symmetric (the same products in either order)
            inverse = new CholeskyDecomposition(scaled, 0, MIN_PIVOT).getSolver().getInverse();
        } catch (NonPositiveDefiniteMatrixException e) {
            return null;
        }
        for (int i = 0; i < size; i++) {
            for (int j = 0; j < size; j++) {
                s[i * size + j] = inverse.getEntry(i, j) * (scale[i] * scale[j]);
            }
        }
        return s;
    }

    /** Levels of {@code codes} present at {@code rows}. */
    private static int present(int[] codes, int levels, int[] rows) {
        boolean[] seen = new boolean[levels];
        int count = 0;
        for (int r : rows) {
            if (!seen[codes[r]]) {
                seen[codes[r]] = true;
                count++;
            }
        }
        return count;
    }
}
