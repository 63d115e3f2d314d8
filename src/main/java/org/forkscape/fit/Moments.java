package org.forkscape.fit;

import java.util.BitSet;

/**
 * Sufficient statistics of one set of usable rows in a {@link DataVariant}: the count, each level's
 * count and column sums (around its shift), the within cross-product matrix of every model column
 * (centered on the mean, or on each fixed-effect level's mean when absorbing), and the diagonal of the
 * matrix centered on the overall mean (total sums of squares, for R-squared). In a weighted variant every
 * sum is weighted: the level means are weighted means, the within matrix is sum w (x - xbar_w)(x - xbar_w)'
 * per level, and the total sums of squares are about the weighted overall mean, as R's {@code summary.lm}
 * takes them for a weighted fit; {@code n} still counts rows.
 */
public final class Moments {
    final DataVariant variant;
    final BitSet usableGroups;
    final int n;
    final int[] levelCount;
    /** Per level: the weight total of the usable rows (the count as a double when unweighted). */
    final double[] levelWeight;
    /** Whether the sums are weighted (the variant's analytic weights, or a null draw's times them). */
    final boolean weighted;
    /** Per level: mean of each column over the usable rows, relative to the level's shift. */
    final double[][] levelMeanOffset;
    final int levelsPresent;
    /**
     * Whether {@link #levelsPresent} is exact: always but beside three or more absorbed columns whose dummies'
     * rank {@link ModularDummyRank} could not certify (then the specification is not fitted).
     */
    final boolean rankCertified;
    /** Within cross-products, P x P, row-major. */
    final double[] within;
    /** Sum of squares of each column about its overall mean (over the usable rows). */
    final double[] totalSquares;
    /**
     * Whether the within columns are exact to their tolerance: always with none or one absorbed column; with
     * several, whether the alternating projections converged ({@link AlternatingProjections}).
     */
    final boolean demeaned;
    /**
     * Beside two absorbed columns of a variant held in parts: the second column's effects, with which each part
     * makes these rows' within values for its passes ({@link CrossedEffectsByParts}); null otherwise.
     */
    final CrossedEffectsByParts.Effects crossedEffects;

    private volatile FourthMoments fourth;
    private final java.util.Map<String, ClusterMoments.Usable> clusterCells =
            new java.util.concurrent.ConcurrentHashMap<>();
    private final java.util.Map<String, ClusterMoments.WithinCells> withinClusterCells =
            new java.util.concurrent.ConcurrentHashMap<>();

    FourthMoments fourthMoments() {
        FourthMoments f = fourth;
        if (f == null) {
            synchronized (this) {
                f = fourth;
                if (f == null) {
                    f = variant.absorbsSeveral ? FourthMoments.ofWithinRows(this, variant.rowColumns(this))
                            : FourthMoments.of(this, variant.groupTensors());
                    fourth = f;
                }
            }
        }
        return f;
    }

    private volatile DummyLeverage dummyLeverage;

    /**
     * Beside two or more absorbed columns: the dummies' part of these rows' leverages (HC2, HC3), built on first
     * use ({@link CrossedDummyLeverage} for two, {@link SeveralDummyLeverage} for three or more).
     */
    DummyLeverage dummyLeverage() {
        DummyLeverage d = dummyLeverage;
        if (d == null) {
            synchronized (this) {
                d = dummyLeverage;
                if (d == null) {
                    d = variant.coded.dimensionCodes.length == 2 ? CrossedDummyLeverage.of(this)
                            : SeveralDummyLeverage.of(this);
                    dummyLeverage = d;
                }
            }
        }
        return d;
    }

    ClusterMoments.Usable clusterCells(String column) {
        return clusterCells.computeIfAbsent(column, c -> variant.clusterMoments(c).usable(this));
    }

    /** Beside two absorbed columns: the per-cluster cells of these rows' demeaned rows, built on first use. */
    ClusterMoments.WithinCells withinClusterCells(String column) {
        return withinClusterCells.computeIfAbsent(column,
                c -> ClusterMoments.ofWithinRows(this, variant.rowColumns(this), variant.clusters.get(c)));
    }

    Moments(DataVariant v, BitSet usable) {
        this(v, usable, v.cellCount, v.cellWeight, v.cellSum, v.cellCross);
    }

    /**
     * The moments of the usable groups of a variant that absorbs several columns, from their within
     * transformation: one level holding every row, with offsets 0, since the rows that passes read are the
     * demeaned ones ({@link DataVariant#rowColumns}); the levels counted are the dummies' rank.
     */
    Moments(DataVariant v, BitSet usable, SeveralEffectsWithin w) {
        this.variant = v;
        this.usableGroups = usable;
        n = w.n;
        levelCount = new int[] {w.n};
        levelWeight = new double[] {w.weightTotal};
        weighted = w.weighted;
        levelMeanOffset = new double[1][v.columns];
        levelsPresent = w.rank;
        rankCertified = w.rankCertified;
        within = w.within;
        totalSquares = w.totalSquares;
        demeaned = w.converged;
        crossedEffects = w.crossedEffects;
        fourth = w.partsFourthMoments;
        withinClusterCells.putAll(w.partsClusterCells);
    }

    /**
     * The moments of the usable groups from cells laid out like the variant's own (per group and level:
     * count, sums and full cross-products around the level's shift), such as a null draw's reweighted
     * cells. Cells with a zero count are skipped.
     *
     * @param cellWeight per cell, the weight total the sums were weighted with; null when they are plain sums
     */
    Moments(DataVariant v, BitSet usable, int[][] cellCount, double[][] cellWeight, double[][][] cellSum,
            double[][][] cellCross) {
        this.variant = v;
        this.usableGroups = usable;
        int p = v.columns;
        int levels = v.levels;
        levelCount = new int[levels];
        levelWeight = new double[levels];
        weighted = cellWeight != null;
        double[][] sums = new double[levels][p];
        double[][] cross = new double[levels][];
        for (int g = usable.nextSetBit(0); g >= 0; g = usable.nextSetBit(g + 1)) {
            for (int l = 0; l < levels; l++) {
                if (cellCount[g][l] == 0) {
                    continue;
                }
                levelCount[l] += cellCount[g][l];
                levelWeight[l] += weighted ? cellWeight[g][l] : cellCount[g][l];
                double[] s = cellSum[g][l];
                double[] c = cellCross[g][l];
                double[] sl = sums[l];
                for (int j = 0; j < p; j++) {
                    sl[j] += s[j];
                }
                if (cross[l] == null) {
                    cross[l] = c.clone();
                } else {
                    double[] t = cross[l];
                    for (int k = 0; k < t.length; k++) {
                        t[k] += c[k];
                    }
                }
            }
        }
        int total = 0;
        double totalWeight = 0;
        int present = 0;
        within = new double[p * p];
        levelMeanOffset = new double[levels][p];
        for (int l = 0; l < levels; l++) {
            if (levelCount[l] == 0) {
                continue;
            }
            double nl = levelWeight[l];
            total += levelCount[l];
            totalWeight += nl;
            present++;
            double[] sl = sums[l];
            double[] c = cross[l];
            for (int a = 0; a < p; a++) {
                levelMeanOffset[l][a] = sl[a] / nl;
                for (int b = 0; b < p; b++) {
                    within[a * p + b] += c[a * p + b] - sl[a] * sl[b] / nl;
                }
            }
        }
        n = total;
        levelsPresent = present;
        rankCertified = true;
        demeaned = true;
        crossedEffects = null;
        totalSquares = new double[p];
        if (n == 0) {
            return;
        }
        // overall sums of squares from the per-level moments: between-level part plus within part
        for (int j = 0; j < p; j++) {
            double mean = 0;
            for (int l = 0; l < levels; l++) {
                if (levelCount[l] > 0) {
                    mean += levelWeight[l] * (v.levelShift[l][j] + levelMeanOffset[l][j]);
                }
            }
            mean /= totalWeight;
            double between = 0;
            for (int l = 0; l < levels; l++) {
                if (levelCount[l] > 0) {
                    double d = v.levelShift[l][j] + levelMeanOffset[l][j] - mean;
                    between += levelWeight[l] * d * d;
                }
            }
            totalSquares[j] = within[j * p + j] + between;
        }
    }

    public int rowCount() {
        return n;
    }

    private volatile int[] usableRows;

    /** The variant's rows among these usable rows, in order (cached). */
    int[] usableRows() {
        int[] rows = usableRows;
        if (rows == null) {
            rows = new int[n];
            int k = 0;
            for (int r = 0; r < variant.rows; r++) {
                if (uses(r)) {
                    rows[k++] = r;
                }
            }
            usableRows = rows;
        }
        return rows;
    }

    /** Whether a row of the variant is among these usable rows. */
    boolean uses(int row) {
        return usableGroups.get(variant.group[row]);
    }
}
