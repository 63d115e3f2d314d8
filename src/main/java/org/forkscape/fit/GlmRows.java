package org.forkscape.fit;

import java.util.Arrays;

/**
 * One specification's rows as a generalized linear model reads them: the columns in within coordinates
 * (each value minus its fixed-effect level's mean over the usable rows, or the overall mean), row by row,
 * so that one pass over the rows reads memory in order; the outcome as recorded; each row's level among
 * the levels present (the fixed effects enter as one coefficient per level, the intercept when nothing is
 * absorbed); the cluster codes; and, in a weighted variant, each row's prior weight (R's
 * {@code glm(weights = w)}: the weight multiplies the row's deviance, working weight and score). One
 * instance per worker thread; buffers grow and are reused.
 */
final class GlmRows {
    int n;
    int p;
    /** x[i * p + j]: row i, column j (controls first, key last). */
    double[] x = new double[0];
    double[] y = new double[0];
    /** Level of each row among the levels present, 0..levels-1. */
    int[] level = new int[0];
    int levels;
    /** The variant's level of each compact level, for carrying starts between specifications. */
    int[] variantLevel = new int[0];
    int[] cluster = new int[0];
    /**
     * The variant's cluster codes by component key (indexed by variant row, see {@link #source}), which a
     * multi-way error type reads once per component; null for resampled rows, which carry theirs in
     * {@link #drawClusters}.
     */
    java.util.Map<String, int[]> variantClusters;
    /**
     * A null draw's cluster codes by component key, indexed by row (a drawn copy of a row may be in a new
     * cluster of some components and not of others); null for the observed rows and one-way clustering.
     */
    java.util.Map<String, int[]> drawClusters;
    /** The variant row of each row. */
    int[] source = new int[0];
    /** The prior weight of each row; null when the variant is unweighted. */
    double[] prior;
    private double[] priorBuffer = new double[0];
    /** What the per-row arrays other than the columns were last filled from by the observed rows, or null. */
    private Moments filledRows;
    private double[] filledOutcome;
    private int[] filledClusters;
    /**
     * For rows held in parts ({@link #fillHeldInParts}): what every pass over them is told, and where the passes
     * are made; then the per-row arrays are empty and every pass over the rows is one of {@link #passes}.
     * Null for rows held here.
     */
    GlmPassRequest.Rows heldInParts;
    GlmPasses passes;
    /** The START pass's sums of rows held in parts, once asked ({@link #startSums}). */
    private double[] startSums;

    /** Where the passes over rows held in parts are made: every part's sums of one request, merged. */
    interface GlmPasses {
        double[] sums(GlmPassRequest request);
    }

    /**
     * Copies {@code rows} (the specification's rows in within coordinates), replacing their centred outcome
     * by the recorded one.
     *
     * @param rows            not scaled by the weights (the prior weights come from {@code rows.weight})
     * @param recordedOutcome the outcome column as recorded, indexed by variant row
     * @param variantLevels   the variant's number of fixed-effect levels
     */
    void fill(DesignRows rows, double[] recordedOutcome, int variantLevels) {
        filledRows = null;
        heldInParts = null;
        grow(rows.n, rows.p);
        variantClusters = null;
        drawClusters = null;
        prior = rows.weighted ? priorBuffer : null;
        for (int j = 0; j < p; j++) {
            double[] column = rows.x[j];
            for (int i = 0, at = j; i < n; i++, at += p) {
                x[at] = column[i];
            }
        }
        int[] compact = startLevels(variantLevels);
        for (int i = 0; i < n; i++) {
            level[i] = compactLevel(compact, rows.level[i]);
            source[i] = rows.source[i];
            y[i] = recordedOutcome[source[i]];
            cluster[i] = rows.cluster[i];
            if (prior != null) {
                prior[i] = rows.weight[i];
            }
        }
    }

    /**
     * The rows of {@code mom} (observed data: each variant row at most once), columns {@code cols} (key
     * last) in within coordinates, gathered straight from the variant's columns: the same values as
     * {@link DesignRows#fill} followed by {@link #fill(DesignRows, double[], int)}, in one pass.
     *
     * @param clusterCodes each variant row's cluster code, or null
     */
    void fill(Moments mom, int[] cols, double[] recordedOutcome, int[] clusterCodes) {
        DataVariant v = mom.variant;
        // the same rows, outcome and clusters as the last fill (a specification after its sibling): only the
        // columns are new
        boolean rowsAsBefore = mom == filledRows && recordedOutcome == filledOutcome && clusterCodes == filledClusters;
        heldInParts = null;
        grow(mom.n, cols.length);
        variantClusters = v.clusters;
        drawClusters = null;
        prior = v.weight == null ? null : priorBuffer;
        double[][] offsets = mom.levelMeanOffset;
        double[][] columns = new double[p][];
        for (int j = 0; j < p; j++) {
            columns[j] = v.shifted[cols[j]];
        }
        int[] used = mom.n == v.rows ? null : mom.usableRows();
        fillColumns(v, cols, offsets, columns, used);
        if (rowsAsBefore) {
            return;
        }
        filledRows = mom;
        filledOutcome = recordedOutcome;
        filledClusters = clusterCodes;
        int[] compact = startLevels(v.levels);
        for (int k = 0; k < n; k++) {
            int r = used == null ? k : used[k];
            int l = v.level[r];
            level[k] = compactLevel(compact, l);
            source[k] = r;
            y[k] = recordedOutcome[r];
            cluster[k] = clusterCodes == null ? 0 : clusterCodes[r];
            if (prior != null) {
                prior[k] = v.weight[r];
            }
        }
    }

    /**
     * The rows of {@code mom} (a variant held in parts, its statistics summed on the driver) as the driver
     * sees them: their count, columns {@code cols} (key last) and levels, each level of the variant that the
     * rows hold numbered in ascending order, and what a part needs to gather its share of them; no per-row
     * arrays. Every pass over them is then made by {@code passes}.
     *
     * @param components the cluster error type's components ({@link ClusterComponents#of}), empty for other errors
     */
    void fillHeldInParts(Moments mom, int[] cols, int y, java.util.List<ClusterComponents.Component> components,
            GlmPasses passes) {
        DataVariant v = mom.variant;
        filledRows = null;
        variantClusters = null;
        drawClusters = null;
        prior = null;
        startSums = null;
        n = mom.n;
        p = cols.length;
        int[] compact = startLevels(v.levels);
        for (int l = 0; l < v.levels; l++) {
            if (mom.levelCount[l] > 0) {
                compactLevel(compact, l);
            }
        }
        double[][] offsets = new double[v.levels][p];
        for (int l = 0; l < v.levels; l++) {
            for (int j = 0; j < p; j++) {
                offsets[l][j] = mom.levelMeanOffset[l][cols[j]];
            }
        }
        long[] masks = mom.usableGroups.stream().mapToLong(g -> v.groupMissing[g]).sorted().toArray();
        String[] keys = new String[components.size()];
        int[] clusters = new int[keys.length];
        long[][] intersectionKeys = new long[keys.length][];
        for (int c = 0; c < keys.length; c++) {
            keys[c] = components.get(c).key();
            clusters[c] = v.clusterCounts.get(keys[c]);
            intersectionKeys[c] = v.intersectionClusterKeys.get(keys[c]);
        }
        heldInParts = new GlmPassRequest.Rows(masks, cols.clone(), y, offsets, compact, levels, keys, clusters,
                intersectionKeys);
        this.passes = passes;
    }

    /**
     * One part's share of the rows of {@code r} ({@link #fillHeldInParts} on the driver): its rows among
     * the usable missing patterns, in part order, the columns in within coordinates by the driver's level
     * offsets, each row's level numbered as the driver numbers it, by the same expressions as
     * {@link #fill(Moments, int[], double[], int[])}.
     */
    void fillPart(CodedRows coded, GlmPassRequest.Rows r) {
        filledRows = null;
        heldInParts = null;
        variantClusters = null;
        drawClusters = null;
        int count = 0;
        int[] usable = new int[coded.rows];
        for (int row = 0; row < coded.rows; row++) {
            if (Arrays.binarySearch(r.usableMasks(), coded.groupMissing[coded.group[row]]) >= 0) {
                usable[count++] = row;
            }
        }
        int[] cols = r.columns();
        grow(count, cols.length);
        prior = coded.weight == null ? null : priorBuffer;
        levels = r.levels();
        double[] recordedOutcome = coded.recorded[r.outcome()];
        double[][] offsets = r.offsets();
        for (int k = 0; k < n; k++) {
            int row = usable[k];
            int l = coded.level[row];
            double[] off = offsets[l];
            for (int j = 0, at = k * p; j < p; j++) {
                x[at + j] = coded.shifted[cols[j]][row] - off[j];
            }
            level[k] = r.compactLevel()[l];
            source[k] = row;
            y[k] = recordedOutcome[row];
            if (prior != null) {
                prior[k] = coded.weight[row];
            }
        }
    }

    /** The START pass's sums of rows held in parts ({@link GlmPassRequest.Kind#START}), made once per fill. */
    double[] startSums(GlmFamily family) {
        if (startSums == null) {
            startSums = passes.sums(GlmPassRequest.start(heldInParts, family));
        }
        return startSums;
    }

    /** The columns of {@link #fill(Moments, int[], double[], int[])}, row by row in within coordinates. */
    private void fillColumns(DataVariant v, int[] cols, double[][] offsets, double[][] columns, int[] used) {
        double[] off = new double[p];
        int lastLevel = -1;
        for (int k = 0; k < n; k++) {
            int r = used == null ? k : used[k];
            int l = v.level[r];
            if (l != lastLevel) {
                for (int j = 0; j < p; j++) {
                    off[j] = offsets[l][cols[j]];
                }
                lastLevel = l;
            }
            for (int j = 0, at = k * p; j < p; j++) {
                x[at + j] = columns[j][r] - off[j];
            }
        }
    }

    /**
     * The rows of {@code other} with no columns: the outcome, prior weights and variant rows (for the null model
     * beside two or more absorbed columns, whose level codes are not read).
     */
    void fillWithoutColumns(GlmRows other) {
        filledRows = null;
        grow(other.n, 0);
        variantClusters = null;
        drawClusters = null;
        System.arraycopy(other.y, 0, y, 0, n);
        System.arraycopy(other.source, 0, source, 0, n);
        prior = other.prior == null ? null : priorBuffer;
        if (prior != null) {
            System.arraycopy(other.prior, 0, prior, 0, n);
        }
        levels = 0;
    }

    private void grow(int rows, int columns) {
        n = rows;
        p = columns;
        if (x.length < n * p) {
            x = new double[n * p];
        }
        if (y.length < n) {
            y = new double[n];
            level = new int[n];
            cluster = new int[n];
            source = new int[n];
            priorBuffer = new double[n];
        }
    }

    private int[] startLevels(int variantLevels) {
        int[] compact = new int[variantLevels];
        Arrays.fill(compact, -1);
        if (variantLevel.length < variantLevels) {
            variantLevel = new int[variantLevels];
        }
        levels = 0;
        return compact;
    }

    /** The compact level of variant level {@code l}, numbered in order of first appearance. */
    private int compactLevel(int[] compact, int l) {
        if (compact[l] < 0) {
            compact[l] = levels;
            variantLevel[levels++] = l;
        }
        return compact[l];
    }
}
