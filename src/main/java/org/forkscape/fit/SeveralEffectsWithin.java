package org.forkscape.fit;

import java.util.BitSet;

/**
 * The within transformation of a variant that absorbs two or more crossed fixed-effect columns, for one set of
 * usable rows: every model column complete on those rows, demeaned by {@link AlternatingProjections} over
 * exactly those rows, and the sufficient statistics a specification solves from (the demeaned columns'
 * cross-products, the total sums of squares about the overall mean, the rank of the dummies). Unlike one
 * absorbed column, whose per-level sums can be added over missing-pattern groups, the two-way within values of
 * a row depend on every other row of the set, so each distinct set of usable groups is demeaned on its own.
 *
 * <p>By the Frisch-Waugh-Lovell theorem (Frisch &amp; Waugh 1933, Econometrica 1(4); Lovell 1963, JASA
 * 58(304)) least squares on the demeaned columns gives the coefficients, residuals and hence every standard
 * error of the regression with both sets of dummies explicit; K counts the dummies by their rank
 * ({@link FixedEffectRank}). A level with one row (a singleton) is kept, as R's {@code lm} keeps it: its row's
 * within values are 0, it counts in N, and its dummy counts in K.
 */
final class SeveralEffectsWithin {
    /** Rows of the set. */
    final int n;
    /** Rank of the fixed-effect dummies over the set's rows (0 when {@link #rankCertified} is false). */
    final int rank;
    /** Whether the rank is exact: always with two columns, and when {@link ModularDummyRank} certified it. */
    final boolean rankCertified;
    /** Cross-products of the demeaned columns, P x P row-major (0 for columns not complete on the rows). */
    final double[] within;
    /** Sum of squares of each column about its mean over the set's rows. */
    final double[] totalSquares;
    /**
     * Per model column, over the variant's rows: its demeaned value at the set's rows and 0 elsewhere; null for
     * a column missing in some of the set's rows (no specification of the set uses it).
     */
    final double[][] columns;
    /** Whether every column's demeaning converged ({@link AlternatingProjections#TOLERANCE}). */
    final boolean converged;
    /** The weight total of the set's rows (their count when unweighted). */
    final double weightTotal;
    /** Whether the variant is weighted: the projections, cross-products and sums of squares are then weighted. */
    final boolean weighted;
    /**
     * For a variant held in parts ({@link CrossedEffectsByParts}): the second column's effects, with which each
     * part makes its rows' within values; null when the rows are here ({@link #columns}).
     */
    final CrossedEffectsByParts.Effects crossedEffects;
    /**
     * Held in parts: the set's fourth moments and its clusters' cells by cluster key, summed where the rows are
     * when the variant's routes asked for them ({@link CrossedEffectsByParts.WithinPass}); null and empty
     * otherwise (with the rows here they are built from {@link #columns} when first asked for).
     */
    final FourthMoments partsFourthMoments;
    final java.util.Map<String, ClusterMoments.WithinCells> partsClusterCells;

    private SeveralEffectsWithin(int n, java.util.OptionalInt rank, double[] within, double[] totalSquares,
            double[][] columns, boolean converged, double weightTotal, boolean weighted,
            CrossedEffectsByParts.Effects crossedEffects, FourthMoments partsFourthMoments,
            java.util.Map<String, ClusterMoments.WithinCells> partsClusterCells) {
        this.n = n;
        this.crossedEffects = crossedEffects;
        this.partsFourthMoments = partsFourthMoments;
        this.partsClusterCells = partsClusterCells;
        this.weightTotal = weightTotal;
        this.weighted = weighted;
        this.rank = rank.orElse(0);
        this.rankCertified = rank.isPresent();
        this.within = within;
        this.totalSquares = totalSquares;
        this.columns = columns;
        this.converged = converged;
    }

    /**
     * The within transformation of {@code v}'s rows in the missing-pattern groups {@code usable}. In a weighted
     * variant it is the weighted one, as weighted least squares with the dummies written out takes it: each
     * column centred on its weighted mean and projected off the dummies in the weighted inner product
     * (weighted level means), the cross-products and sums of squares weighted.
     */
    static SeveralEffectsWithin of(DataVariant v, BitSet usable) {
        CodedRows coded = v.coded;
        int p = v.columns;
        int[] rows = rowsOf(v, usable);
        int n = rows.length;
        int[][] dims = coded.dimensionCodes;
        int[][] codes = new int[dims.length][];
        int[] levels = new int[dims.length];
        for (int d = 0; d < dims.length; d++) {
            codes[d] = new int[n];
            levels[d] = renumber(dims[d], coded.dimensionLevels[d], rows, codes[d]);
        }
        java.util.OptionalInt rank = FixedEffectRank.of(codes, levels);
        double[][] columns = new double[p][];
        double[][] compact = new double[p][];
        double[] totalSquares = new double[p];
        boolean converged = true;
        double[] weight = null;
        double weightTotal = n;
        if (v.weight != null) {
            weight = new double[n];
            weightTotal = 0;
            for (int i = 0; i < n; i++) {
                weight[i] = v.weight[rows[i]];
                weightTotal += weight[i];
            }
        }
        AlternatingProjections projections = n == 0 ? null : new AlternatingProjections(codes, levels, weight);
        long missing = 0;
        for (int g = usable.nextSetBit(0); g >= 0; g = usable.nextSetBit(g + 1)) {
            missing |= coded.groupMissing[g];
        }
        for (int j = 0; j < p && n > 0; j++) {
            if ((missing & (1L << v.layout.variableOf(j))) != 0) {
                continue;
            }
            double[] x = new double[n];
            double[] shifted = coded.shifted[j];
            for (int i = 0; i < n; i++) {
                x[i] = shifted[rows[i]];
            }
            totalSquares[j] = centre(x, weight, weightTotal);
            // centred first, so that the stopping rule is relative to the column's spread about its mean
            converged &= projections.demean(x);
            compact[j] = weight == null ? x : scaled(x, weight);
            double[] full = new double[v.rows];
            for (int i = 0; i < n; i++) {
                full[rows[i]] = x[i];
            }
            columns[j] = full;
        }
        double[] within = new double[p * p];
        for (int a = 0; a < p; a++) {
            if (compact[a] == null) {
                continue;
            }
            for (int b = a; b < p; b++) {
                if (compact[b] != null) {
                    double c = Kernels.dot(compact[a], compact[b], n);
                    within[a * p + b] = c;
                    within[b * p + a] = c;
                }
            }
        }
        return new SeveralEffectsWithin(n, rank, within, totalSquares, columns, converged, weightTotal, weight != null,
                null, null, java.util.Map.of());
    }

    /**
     * The within transformation of a set whose rows are held in parts, solved exactly there
     * ({@link CrossedEffectsByParts}): no rows here, the second column's effects instead.
     */
    static SeveralEffectsWithin fromParts(int n, int rank, double[] within, double[] totalSquares, boolean solved,
            double weightTotal, boolean weighted, CrossedEffectsByParts.Effects effects, FourthMoments fourth,
            java.util.Map<String, ClusterMoments.WithinCells> clusterCells) {
        return new SeveralEffectsWithin(n, java.util.OptionalInt.of(rank), within, totalSquares, null, solved,
                weightTotal, weighted, effects, fourth, clusterCells);
    }

    /** The variant's rows in the usable groups, ascending. */
    private static int[] rowsOf(DataVariant v, BitSet usable) {
        int count = 0;
        for (int r = 0; r < v.rows; r++) {
            if (usable.get(v.group[r])) {
                count++;
            }
        }
        int[] rows = new int[count];
        int k = 0;
        for (int r = 0; r < v.rows; r++) {
            if (usable.get(v.group[r])) {
                rows[k++] = r;
            }
        }
        return rows;
    }

    /** Writes the levels at {@code rows} renumbered densely in first-seen order into {@code out}; returns the count. */
    static int renumber(int[] codes, int levels, int[] rows, int[] out) {
        int[] dense = new int[levels];
        java.util.Arrays.fill(dense, -1);
        int next = 0;
        for (int i = 0; i < rows.length; i++) {
            int c = codes[rows[i]];
            if (dense[c] < 0) {
                dense[c] = next++;
            }
            out[i] = dense[c];
        }
        return next;
    }

    /**
     * Subtracts the mean from {@code x} (modified) and returns the sum of squares about it, by the corrected
     * two-pass formula (Chan, Golub &amp; LeVeque 1983, The American Statistician 37(3)).
     */
    private static double centre(double[] x, double[] weight, double weightTotal) {
        int n = x.length;
        if (weight == null) {
            double mean = Kernels.sum(x, n) / n;
            double c = 0;
            for (double value : x) {
                c += value - mean;
            }
            mean += c / n;
            for (int i = 0; i < n; i++) {
                x[i] -= mean;
            }
            return Kernels.dot(x, x, n);
        }
        // the weighted mean, corrected by a second pass (Chan, Golub & LeVeque 1983, The American Statistician 37(3))
        double mean = 0;
        for (int i = 0; i < n; i++) {
            mean += weight[i] * x[i];
        }
        mean /= weightTotal;
        double c = 0;
        for (int i = 0; i < n; i++) {
            c += weight[i] * (x[i] - mean);
        }
        mean += c / weightTotal;
        double squares = 0;
        for (int i = 0; i < n; i++) {
            x[i] -= mean;
            squares += weight[i] * x[i] * x[i];
        }
        return squares;
    }

    /** The column times the square root of each row's weight, whose plain cross-products are the weighted ones. */
    private static double[] scaled(double[] x, double[] weight) {
        double[] out = new double[x.length];
        for (int i = 0; i < x.length; i++) {
            out[i] = x[i] * Math.sqrt(weight[i]);
        }
        return out;
    }
}
