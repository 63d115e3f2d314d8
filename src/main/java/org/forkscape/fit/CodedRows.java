package org.forkscape.fit;

import java.util.Map;

/**
 * A variant's coded rows: which table rows it holds, their absorbed fixed-effect levels and missing-pattern
 * groups, every model column shifted by its level's mean, and the cluster codes. What the passes over rows
 * read (the QR refit, the sandwich row pass, resampling), and what the sufficient statistics are summed from.
 */
final class CodedRows {
    final ModelColumns layout;
    final int rows;
    final int columns;
    /** The table row of each variant row (null draws reweight and permute rows by their table row). */
    final int[] tableRows;
    /** Model column values at the variant's rows, minus the row's level shift; 0 where missing. */
    final double[][] shifted;
    /**
     * The analytic weight of each row, all positive (rows with a missing or zero weight are not in the
     * variant); null when the variant is unweighted or its rows are held elsewhere. The cell sums, the level
     * means and every pass over rows take it (see {@link AnalyticWeights}).
     */
    final double[] weight;
    /**
     * Whether the variant is weighted: {@link #weight} is given, or for a variant without rows, its cells were
     * summed with weights ({@link PartialStatistics}).
     */
    final boolean weighted;
    /** Fixed-effect level of each row, 0..levels-1 (all 0 without absorption). */
    final int[] level;
    final int levels;
    /** The absorbed fixed-effect column (several joined by ", "), null when nothing is absorbed. */
    final String absorbColumn;
    /**
     * With several absorbed columns: per column, the dense level of each row (the cells then hold one level
     * and {@link SeveralEffectsWithin} demeans); null otherwise.
     */
    final int[][] dimensionCodes;
    final int[] dimensionLevels;
    /** Per level and column: the shift (mean over the level's non-missing rows). */
    final double[][] levelShift;
    /** Missing-pattern group of each row. */
    final int[] group;
    /** Per group: bit v set when variable v is missing in the group's rows. */
    final long[] groupMissing;
    /** Variables missing in at least one row: only these can change a specification's usable rows. */
    final long everMissing;
    /** Cluster codes per cluster column name, over the variant's rows (-1 where missing). */
    final Map<String, int[]> clusters;
    final Map<String, Integer> clusterCounts;
    /**
     * The outcome and predictor columns as coded, before the shifts (NaN where missing), by model column;
     * null when the plan fits least squares alone (which reads only the shifted columns).
     */
    final double[][] recorded;

    CodedRows(ModelColumns layout, FixedEffectLevels levels, double[] weight, LevelShifts shifts, MissingPatterns patterns,
            ClusterCodes clusters, double[][] recorded) {
        this.layout = layout;
        this.columns = layout.size();
        this.rows = levels.tableRows.length;
        this.tableRows = levels.tableRows;
        this.weight = weight;
        this.weighted = weight != null;
        this.level = levels.level;
        this.levels = levels.levels;
        this.absorbColumn = levels.column;
        this.dimensionCodes = levels.dimensionCodes;
        this.dimensionLevels = levels.dimensionLevels;
        this.shifted = shifts.shifted;
        this.levelShift = shifts.levelShift;
        this.group = patterns.group;
        this.groupMissing = patterns.groupMissing;
        this.everMissing = patterns.everMissing;
        this.clusters = clusters.codes;
        this.clusterCounts = clusters.counts;
        this.recorded = recorded;
    }

    /**
     * A variant's shape without its rows, for statistics summed elsewhere (by the parts of a table held on
     * a cluster, {@link PartialStatistics}): the row arrays are null, and a pass over rows is refused
     * ({@link #held}). Beside two absorbed columns its one level holds every row, and the dimensions' codes
     * stay with the parts ({@link CrossedEffectsByParts}).
     *
     * @param dimensions the absorbed columns when two or more (their codes then null), else 0
     * @param weighted   whether its cells hold weighted sums and weight totals
     */
    CodedRows(ModelColumns layout, int rows, int levels, String absorbColumn, double[][] levelShift,
            long[] groupMissing, Map<String, Integer> clusterCounts, boolean weighted, int dimensions) {
        this.layout = layout;
        this.columns = layout.size();
        this.rows = rows;
        this.tableRows = null;
        this.weight = null;
        this.weighted = weighted;
        this.level = null;
        this.levels = levels;
        this.absorbColumn = absorbColumn;
        this.dimensionCodes = dimensions > 1 ? new int[dimensions][] : null;
        this.dimensionLevels = null;
        this.shifted = null;
        this.levelShift = levelShift;
        this.group = null;
        this.groupMissing = groupMissing;
        long any = 0;
        for (long mask : groupMissing) {
            any |= mask;
        }
        this.everMissing = any;
        this.clusters = Map.of();
        this.clusterCounts = Map.copyOf(clusterCounts);
        this.recorded = null;
    }

    /**
     * A null draw's rows as a data set of their own: row {@code k} is {@code base}'s row {@code from[k]} (a row
     * drawn several times appears as often), with its coded values, weight, levels and missing pattern, and
     * the cluster codes given (a drawn copy of a resampled cluster relabelled as a new cluster where its
     * clusters are nested in the resampled units). The shifts stay the base's: they only centre the columns.
     * Only least squares reads it (the plan checker refuses generalized linear models beside two absorbed
     * columns, the one use of this copy), so the columns as recorded are not kept.
     *
     * @param columnValues  the model columns over the base's rows, as shifted: the base's own, or a permutation
     *                      draw's with the key predictor moved (not modified)
     * @param clusters      per cluster key, one code per new row (not copied)
     * @param clusterCounts per cluster key, one more than the largest code
     */
    CodedRows(CodedRows base, double[][] columnValues, int[] from, Map<String, int[]> clusters,
            Map<String, Integer> clusterCounts) {
        this.layout = base.layout;
        this.columns = base.columns;
        this.rows = from.length;
        this.tableRows = gather(base.tableRows, from);
        this.weight = base.weight == null ? null : gather(base.weight, from);
        this.weighted = base.weighted;
        this.level = gather(base.level, from);
        this.levels = base.levels;
        this.absorbColumn = base.absorbColumn;
        if (base.dimensionCodes == null) {
            this.dimensionCodes = null;
        } else {
            this.dimensionCodes = new int[base.dimensionCodes.length][];
            for (int d = 0; d < dimensionCodes.length; d++) {
                dimensionCodes[d] = gather(base.dimensionCodes[d], from);
            }
        }
        this.dimensionLevels = base.dimensionLevels;
        this.shifted = gatherColumns(columnValues, from);
        this.levelShift = base.levelShift;
        this.group = gather(base.group, from);
        this.groupMissing = base.groupMissing;
        this.everMissing = base.everMissing;
        this.clusters = clusters;
        this.clusterCounts = clusterCounts;
        this.recorded = null;
    }

    private static int[] gather(int[] values, int[] from) {
        int[] out = new int[from.length];
        for (int k = 0; k < from.length; k++) {
            out[k] = values[from[k]];
        }
        return out;
    }

    private static double[] gather(double[] values, int[] from) {
        double[] out = new double[from.length];
        for (int k = 0; k < from.length; k++) {
            out[k] = values[from[k]];
        }
        return out;
    }

    private static double[][] gatherColumns(double[][] columns, int[] from) {
        double[][] out = new double[columns.length][];
        for (int j = 0; j < columns.length; j++) {
            out[j] = columns[j] == null ? null : gather(columns[j], from);
        }
        return out;
    }

    /** Whether the rows themselves are held here (false for a variant built from statistics alone). */
    boolean held() {
        return shifted != null;
    }
}
