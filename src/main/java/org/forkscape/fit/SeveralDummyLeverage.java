package org.forkscape.fit;

import java.util.Arrays;

/**
 * The fixed-effect dummies' part of each row's leverage beside three or more crossed absorbed columns, for one set
 * of usable rows, exactly as R's {@code hatvalues} of {@code lm} with a {@code factor()} term per column: by the
 * Frisch-Waugh-Lovell theorem the hat matrix is P_D + P_{M_D X} (Davidson &amp; MacKinnon 2004, Econometric Theory
 * and Methods, sections 2.4 and 2.6), and this class gives w_i d_i'(D'WD)^- d_i, which is the same for every
 * generalised inverse since d_i lies in the row space of D.
 *
 * <p>The generalised inverse: with m the column with most levels, D'WD = [A C; C' B] (A = diag of m's level
 * weights W_a, C the weight of each level of m with each other level, B the other levels' cross-products), and
 * S = B - C'A^-1 C their Schur complement, the block form [A^-1 + A^-1 C S^- C'A^-1, -A^-1 C S^-; -S^- C'A^-1,
 * S^-] is a generalised inverse of D'WD for any generalised inverse S^- of S (as {@link CrossedDummyLeverage},
 * which does this for two columns). For S^-, the principal submatrix S_PP on the pivot levels P that
 * {@link ModularDummyRank} certified is nonsingular and of S's rank (the columns of [D_m, D_P] are independent,
 * whatever the positive weights), so S^- = S_PP^-1 padded with zeros is one. A row at level a of m and levels J
 * of the others then has d'(D'WD)^- d = 1/W_a + v'S_PP^-1 v with v = c_a/W_a - u_J on P (c_a row a of C, u_J the
 * indicator of J), expanded per level a as q_a - 2 sum over J of g_j + sum over J x J of (S_PP^-1)_jk, with
 * g = S_PP^-1 c_a / W_a and q_a = c_a'S_PP^-1 c_a / W_a^2. A level of m whose rows share one combination has
 * v = 0 exactly and the value 1/W_a (a singleton's leverage is then 1).
 *
 * <p>S_PP is scaled to unit diagonal, factored by Cholesky (Apache Commons Math) and inverted
 * ({@link CrossedDummyLeverage#invert}); a pivot below {@link CrossedDummyLeverage#MIN_PIVOT} (levels joined by
 * rows of almost no weight) makes the leverages unavailable, never guessed. Cost: the rank's (its complement,
 * elimination and certificate), the factorisation's r^3 for r pivot levels (at most
 * {@link org.forkscape.plan.AbsorbChoice#MAX_RANK_LEVELS}), and per level a of m the square of the levels it meets.
 */
final class SeveralDummyLeverage implements DummyLeverage {
    /** Per variant row: its combination's index, or -1 outside the set. */
    private final int[] comboOfRow;
    /** Per combination: d'(D'WD)^- d. */
    private final double[] comboValue;
    private final double[] weight;
    private final boolean illConditioned;

    private SeveralDummyLeverage(int[] comboOfRow, double[] comboValue, double[] weight, boolean illConditioned) {
        this.comboOfRow = comboOfRow;
        this.comboValue = comboValue;
        this.weight = weight;
        this.illConditioned = illConditioned;
    }

    /** The leverages of the usable rows of {@code mom}, a set of a variant that absorbs three or more columns. */
    static SeveralDummyLeverage of(Moments mom) {
        CodedRows coded = mom.variant.coded;
        int[] rows = mom.usableRows();
        int[][] dims = coded.dimensionCodes;
        int[][] codes = new int[dims.length][rows.length];
        int[] levels = new int[dims.length];
        for (int d = 0; d < dims.length; d++) {
            levels[d] = SeveralEffectsWithin.renumber(dims[d], coded.dimensionLevels[d], rows, codes[d]);
        }
        return of(codes, levels, rows, mom.variant.weight, mom.variant.rows);
    }

    /**
     * @param codes       per dimension, the dense level of each of the set's rows (not modified)
     * @param levels      per dimension, its levels present
     * @param rows        the set's rows among the variant's (ascending; not modified)
     * @param weight      each variant row's positive weight, or null when unweighted (not modified, kept)
     * @param variantRows the variant's rows
     */
    static SeveralDummyLeverage of(int[][] codes, int[] levels, int[] rows, double[] weight, int variantRows) {
        int[] comboOfRow = new int[variantRows];
        Arrays.fill(comboOfRow, -1);
        if (rows.length == 0) {
            return new SeveralDummyLeverage(comboOfRow, new double[0], weight, false);
        }
        ModularDummyRank structure = new ModularDummyRank(codes, levels);
        int[] pivots = structure.rank().isPresent() ? structure.certifiedPivots() : null;
        if (pivots == null) {
            return new SeveralDummyLeverage(comboOfRow, null, weight, true);
        }
        int combos = structure.combinations();
        int[] rowCombo = structure.comboOfRow();
        double[] comboWeight = new double[combos];
        for (int i = 0; i < rows.length; i++) {
            comboOfRow[rows[i]] = rowCombo[i];
            comboWeight[rowCombo[i]] += weight == null ? 1 : weight[rows[i]];
        }
        int others = structure.others();
        int r = pivots.length;
        int[] pos = new int[others];
        Arrays.fill(pos, -1);
        for (int k = 0; k < r; k++) {
            pos[pivots[k]] = k;
        }

        // S_PP = B_PP - C_P'A^-1 C_P, summed in a fixed order (combinations, then levels of m)
        double[] s = new double[r * r];
        for (int c = 0; c < combos; c++) {
            for (int j : structure.otherLevels(c)) {
                if (pos[j] < 0) {
                    continue;
                }
                for (int k : structure.otherLevels(c)) {
                    if (pos[k] >= 0) {
                        s[pos[j] * r + pos[k]] += comboWeight[c];
                    }
                }
            }
        }
        int levelsOfM = structure.largestLevels();
        double[] levelWeight = new double[levelsOfM];
        double[] perLevel = new double[others];
        int[] touched = new int[others];
        int[][] touchedAt = new int[levelsOfM][];
        double[][] weightAt = new double[levelsOfM][];
        for (int a = 0; a < levelsOfM; a++) {
            int count = 0;
            for (int c : structure.combinationsAt(a)) {
                levelWeight[a] += comboWeight[c];
                for (int j : structure.otherLevels(c)) {
                    if (perLevel[j] == 0) {
                        touched[count++] = j;
                    }
                    perLevel[j] += comboWeight[c];
                }
            }
            touchedAt[a] = Arrays.copyOf(touched, count);
            weightAt[a] = new double[count];
            for (int x = 0; x < count; x++) {
                weightAt[a][x] = perLevel[touched[x]];
                perLevel[touched[x]] = 0;
            }
            for (int x = 0; x < count; x++) {
                int pj = pos[touchedAt[a][x]];
                if (pj < 0) {
                    continue;
                }
                for (int y = 0; y < count; y++) {
                    int pk = pos[touchedAt[a][y]];
                    if (pk >= 0) {
                        // the same product in either order, so that S_PP is exactly symmetric
                        s[pj * r + pk] -= weightAt[a][x] * weightAt[a][y] / levelWeight[a];
                    }
                }
            }
        }
        if (CrossedDummyLeverage.invert(s, r) == null) {
            return new SeveralDummyLeverage(comboOfRow, null, weight, true);
        }

        // per level a of m: g = S_PP^-1 c_a / W_a on P and q_a = c_a'g / W_a; per combination the expansion
        double[] comboValue = new double[combos];
        double[] g = new double[others];
        for (int a = 0; a < levelsOfM; a++) {
            int[] at = structure.combinationsAt(a);
            double wa = levelWeight[a];
            if (at.length == 1) {
                comboValue[at[0]] = 1 / wa;
                continue;
            }
            int[] t = touchedAt[a];
            double q = 0;
            for (int x = 0; x < t.length; x++) {
                int pj = pos[t[x]];
                if (pj < 0) {
                    continue;
                }
                double sum = 0;
                for (int y = 0; y < t.length; y++) {
                    int pk = pos[t[y]];
                    if (pk >= 0) {
                        sum += s[pj * r + pk] * weightAt[a][y];
                    }
                }
                g[t[x]] = sum / wa;
                q += weightAt[a][x] * sum;
            }
            q /= wa * wa;
            for (int c : at) {
                int[] j = structure.otherLevels(c);
                double value = 1 / wa + q;
                for (int x = 0; x < j.length; x++) {
                    int px = pos[j[x]];
                    if (px < 0) {
                        continue;
                    }
                    value -= 2 * g[j[x]];
                    for (int y = 0; y < j.length; y++) {
                        int py = pos[j[y]];
                        if (py >= 0) {
                            value += s[px * r + py];
                        }
                    }
                }
                comboValue[c] = value;
            }
            for (int x : t) {
                g[x] = 0;
            }
        }
        return new SeveralDummyLeverage(comboOfRow, comboValue, weight, false);
    }

    @Override
    public double at(int row) {
        double value = comboValue[comboOfRow[row]];
        return weight == null ? value : weight[row] * value;
    }

    @Override
    public boolean illConditioned() {
        return illConditioned;
    }
}
