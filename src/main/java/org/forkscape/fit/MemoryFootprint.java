package org.forkscape.fit;

/**
 * The bytes the engine's structures hold, from their sizes alone, so that a run's memory can be estimated
 * before anything is built. Each figure counts the arrays the named class allocates (8 bytes a double or
 * long, 4 an int, 16 an array header); small objects and maps are left out. The route choices are
 * {@link SandwichRoute}'s own, so an estimate counts the row-free sandwich structures exactly when a run
 * would build them.
 */
public final class MemoryFootprint {
    private static final long DOUBLE = 8;
    private static final long INT = 4;
    private static final long ARRAY = 16;

    private MemoryFootprint() {
    }

    /**
     * A {@link DataVariant} once built: its columns shifted to level means (P doubles per row), each row's
     * table row, level and group, cluster codes per cluster column, and per (group, level) cell the count,
     * column sums and full cross-product matrix.
     *
     * @param cells  (missing-pattern group, fixed-effect level) cells that hold rows
     * @param levels absorbed fixed-effect levels (1 without absorption)
     */
    public static long variant(int rows, int columns, long cells, int levels, int clusterColumns) {
        return (long) rows * (DOUBLE * columns + INT * (3 + clusterColumns)) + ARRAY * columns
                + cells * (DOUBLE * (columns + (long) columns * columns) + INT + 2 * ARRAY)
                + DOUBLE * levels * columns;
    }

    /**
     * What building a variant holds on top of it for a while: each row's missing-pattern mask and sample
     * flags, the per-block partial sums of the cross-products, and each worker's copy of a block's rows.
     */
    public static long variantBuild(int rows, int columns, long cells, int threads) {
        long blocks = Math.max(1, (rows + CellSums.BLOCK_ROWS - 1L) / CellSums.BLOCK_ROWS);
        long partial = blocks * cells * (columns + 1L) * columns;
        long partialBytes = blocks > 1 && partial <= CellSums.MAX_BLOCK_DOUBLES ? DOUBLE * partial : 0;
        long blockRows = Math.min(rows, CellSums.BLOCK_ROWS);
        long copies = Math.min(threads, blocks) * (DOUBLE * columns * blockRows + INT * blockRows);
        return (long) rows * (DOUBLE + INT + 1) + partialBytes + copies;
    }

    /**
     * One cached {@link Moments}: the within matrix, each level's mean offsets and count, the total sums
     * of squares, and the list of its rows when a row pass reads them.
     *
     * @param rowPassRows the rows a row-pass sandwich lists for it, 0 when no row pass uses it
     */
    public static long moments(int columns, int levels, int rowPassRows) {
        return DOUBLE * ((long) columns * columns + (levels + 1L) * columns) + INT * (levels + (long) rowPassRows)
                + ARRAY * (levels + 4L);
    }

    /**
     * The demeaned rows of a variant that absorbs several columns: the {@link DemeanedCache} holds the usable
     * sets' full-length columns up to its bound (and the latest set whatever its size), and each worker building
     * one holds the set's compact columns, row list, codes and projection workspace for a while
     * ({@link SeveralEffectsWithin}, {@link AlternatingProjections}).
     */
    public static long demeanedRows(int rows, int columns, long usableSets, int threads) {
        long set = DOUBLE * rows * (long) columns + ARRAY * columns;
        long cached = Math.max(set, Math.min(usableSets * set, DOUBLE * DemeanedCache.MAX_DOUBLES + set));
        long build = DOUBLE * rows * (columns + 3L) + INT * 3L * rows;
        return cached + Math.min(threads, usableSets) * build;
    }

    /**
     * HC2 and HC3 beside two absorbed columns: each usable set's {@link CrossedDummyLeverage} (per level of the
     * column with more levels its first pair, per pair of levels present its level and value; at most one pair
     * per row), and each worker building one: its rows sorted by level, the pairs' weight sums, and the dense
     * Schur complement over the smaller column's levels with the copies its Cholesky factorisation and
     * inverse make (five matrices of that order at once).
     *
     * @param leverageSets usable sets with HC2 or HC3 specifications
     */
    public static long crossedLeverages(int rows, int largerLevels, int smallerLevels, long leverageSets,
            int threads) {
        long held = CrossedDummyLeverage.bytes(largerLevels, rows) + 2 * ARRAY;
        long build = 5 * DOUBLE * smallerLevels * (long) smallerLevels + (2 * INT + DOUBLE) * (long) rows
                + (3 * INT + DOUBLE) * (long) (largerLevels + smallerLevels);
        return leverageSets * held + Math.min(threads, leverageSets) * build;
    }

    /**
     * Beside three or more absorbed columns, what building one usable set's exact rank holds for a while
     * ({@link ModularDummyRank}): the dense complement over the levels outside the largest column (8 bytes an
     * entry) and the rows' distinct combinations of levels (at most one per row: its array of levels, its count and
     * its hash entry, about 96 bytes).
     *
     * @param outsideLargest levels outside the absorbed column with most levels
     */
    public static long exactRank(int rows, int outsideLargest) {
        return DOUBLE * outsideLargest * (long) outsideLargest + 96L * rows;
    }

    /**
     * HC2 and HC3 beside three or more absorbed columns: each usable set's {@link SeveralDummyLeverage} (per variant
     * row its combination, per combination its value), and each worker building one: the exact rank's workspace
     * ({@link #exactRank}) and the complement on the pivot levels with the copies its Cholesky factorisation and
     * inverse make (five matrices of that order at once).
     *
     * @param leverageSets usable sets with HC2 or HC3 specifications
     */
    public static long severalLeverages(int rows, int outsideLargest, long leverageSets, int threads) {
        long held = (INT + DOUBLE) * (long) rows + 2 * ARRAY;
        long build = exactRank(rows, outsideLargest) + 5 * DOUBLE * outsideLargest * (long) outsideLargest;
        return leverageSets * held + Math.min(threads, leverageSets) * build;
    }

    /** What building one {@link Moments} holds for a while: each level's sums and cross-products. */
    public static long momentsBuild(int columns, int levels) {
        return DOUBLE * levels * (columns + (long) columns * columns) + ARRAY * 2L * levels;
    }

    /** Whether the run would build the fourth-moment route for a variant without absorbed fixed effects. */
    public static boolean fourthMomentsPay(int rows, int columns, int groups, long hcSpecifications,
            double meanColumns) {
        return SandwichRoute.fourthMomentsPay(rows, columns, groups, hcSpecifications, meanColumns);
    }

    /**
     * The per-group third- and fourth-order sums of a variant (C(P+3,4) + C(P+2,3) doubles a group), and,
     * while they are summed, one partial sum per block of rows and each worker's copy of a block.
     */
    public static long fourthMomentTensors(int rows, int columns, int groups, int threads, boolean weighted) {
        // a weighted variant's blocks also keep the w^2-weighted second and first orders and the sum of w^2
        long perGroup = FourthMoments.distinctFourth(columns) + FourthMoments.distinctThird(columns)
                + (weighted ? (long) columns * columns + columns + 1 : 0);
        long blocks = (rows + FourthMoments.BLOCK_ROWS - 1L) / FourthMoments.BLOCK_ROWS + groups;
        long block = Math.min(rows, FourthMoments.BLOCK_ROWS);
        return DOUBLE * perGroup * (groups + blocks) + INT * rows
                + threads * DOUBLE * (columns + 2L) * block;
    }

    /** One usable row set's {@link FourthMoments}: a symmetric matrix over column pairs and the lower orders. */
    public static long fourthMoments(int columns) {
        long pairs = (long) columns * (columns + 1) / 2;
        return DOUBLE * (pairs * pairs + pairs * columns + (long) columns * columns + columns)
                + INT * (long) columns * columns + 5 * ARRAY;
    }

    /** Whether the run would build the fourth moments of each usable set's demeaned rows (two absorbed columns). */
    public static boolean withinFourthMomentsPay(int rows, int columns, long specifications, double meanColumns) {
        return SandwichRoute.withinFourthMomentsPay(rows, columns, specifications, meanColumns);
    }

    /**
     * The fourth moments of the demeaned rows of each usable set beside two absorbed columns
     * ({@link FourthMoments#ofWithinRows}), and while one is summed, a block of scaled rows, its products
     * and the distinct sums, per worker building one.
     */
    public static long withinFourthMoments(int rows, int columns, long usableSets, int threads) {
        long distinct = FourthMoments.distinctFourth(columns) + FourthMoments.distinctThird(columns);
        long block = Math.min(rows, FourthMoments.BLOCK_ROWS);
        return usableSets * fourthMoments(columns)
                + Math.min(threads, usableSets) * DOUBLE * ((columns + 2L) * block + 3 * distinct);
    }

    /** Whether the run would build per-cluster cells of each usable set's demeaned rows (two absorbed columns). */
    public static boolean withinClusterMomentsPay(int rows, int columns, long specifications, double meanColumns,
            int clusters) {
        return SandwichRoute.withinClusterMomentsPay(rows, columns, specifications, meanColumns, clusters);
    }

    /**
     * The per-cluster cells of each usable set's demeaned rows beside two absorbed columns
     * ({@link ClusterMoments#ofWithinRows}: a stream over the clusters per column pair, and each cluster's
     * rows), and while one set's are formed, each row's cell, the cluster index and the rows' square roots
     * of the weight, per worker building one.
     */
    public static long withinClusterCells(int rows, int columns, int clusters, long usableSets, int threads) {
        long pairs = (long) columns * (columns + 1) / 2;
        return usableSets * (DOUBLE * pairs * clusters + INT * (long) clusters + ARRAY * (pairs + 2) + INT * columns * (long) columns)
                + Math.min(threads, usableSets) * (INT * ((long) rows + clusters) + DOUBLE * rows);
    }

    /** Whether the run would build the per-cluster route for a cluster column. */
    public static boolean clusterMomentsPay(int rows, int columns, int levels, long clusterSpecifications,
            double meanColumns, int clusters) {
        return SandwichRoute.clusterMomentsPay(rows, columns, levels, clusterSpecifications, meanColumns, clusters);
    }

    /**
     * A variant's {@link ClusterMoments} for one cluster column: sums and cross-products per (group,
     * cluster, level) cell, and the cell and order of each row while they are formed.
     *
     * @param cells (group, cluster, level) cells that hold rows
     */
    public static long clusterCells(int rows, int columns, long cells) {
        return cells * (DOUBLE * (columns + (long) columns * columns) + 2 * ARRAY + 32) + 2 * INT * rows;
    }

    /**
     * One usable row set's cells of a cluster column, summed over its groups.
     *
     * @param cells (cluster, level) cells that hold rows
     */
    public static long usableClusterCells(int columns, long cells) {
        return cells * (DOUBLE * (columns + (long) columns * columns) + 2 * ARRAY + 3 * INT);
    }

    /**
     * A worker's fitter once it has refitted a specification by QR: the design rows and the
     * factorisation's working columns, each as many doubles per row as the specification has columns
     * (with the outcome), and each row's level and cluster.
     *
     * @param specificationColumns the most columns a specification has, outcome included
     */
    public static long fitterRows(int rows, int specificationColumns) {
        return (long) rows * (2 * DOUBLE * specificationColumns + 2 * INT);
    }

    /**
     * A null draw's copy of a variant ({@link ResampledVariant}) in one worker: reweighted cells, row
     * weights, and, for permutation draws, the permuted key predictor columns.
     *
     * @param cells            (missing-pattern group, fixed-effect level) cells that hold rows
     * @param predictorColumns key predictor alternatives (0 for bootstrap draws)
     */
    public static long resampledVariant(int rows, int columns, long cells, int levels, int predictorColumns) {
        long permuted = predictorColumns == 0 ? 0 : (long) rows * (DOUBLE * predictorColumns + INT);
        return cells * (DOUBLE * (columns + (long) columns * columns) + 2 * ARRAY) + INT * rows
                + 4 * DOUBLE * levels * columns + permuted;
    }

    /**
     * Beside two absorbed columns, one null draw's rows materialised as a variant of their own
     * ({@link ResampledVariant}): the variant's arrays, each row's two dimension codes, source row and copy
     * number (and weight when weighted), and the demeaned rows of its usable sets, which one worker builds.
     *
     * @param rows the draw's rows, copies counted (as many as the table's for a bootstrap of rows)
     */
    public static long drawnRows(int rows, int columns, long cells, int clusterColumns, long usableSets,
            boolean weighted) {
        return variant(rows, columns, cells, 1, clusterColumns) + (long) rows * (4 * INT + (weighted ? DOUBLE : 0))
                + demeanedRows(rows, columns, usableSets, 1);
    }

    /** A null draw's list of one usable row set's rows, each repeated as often as it was drawn. */
    public static long repeatedRows(int rows) {
        return 2 * INT * (long) rows;
    }

    /**
     * A worker's estimator of generalized linear models: the specification's rows row by row (columns,
     * recorded outcome, level, cluster, source row) and the iterations' per-row state (linear predictor, mean,
     * weight, score and the trial step's two); the design rows it transposes them from are the worker's
     * {@link #fitterRows}.
     *
     * @param specificationColumns the most columns a specification has, outcome included
     * @param levels               fixed-effect levels (1 without), each with a row of weighted means
     * @param clusterParts         the most component clusterings of one cluster error type (0 without
     *                             cluster errors, 1 one-way, 3 two-way): each a code per row and, at most a
     *                             cluster per row, the cluster sums of the key and its marginal effect
     */
    public static long glmFitter(int rows, int specificationColumns, int levels, int clusterParts) {
        return (long) rows * (DOUBLE * (specificationColumns + 7L) + 3 * INT)
                + (long) levels * DOUBLE * (specificationColumns + 6)
                + (long) rows * clusterParts * (INT + 2 * DOUBLE + 1);
    }

    /**
     * What a worker's estimator of generalized linear models adds beside two or more absorbed columns
     * ({@link SeveralEffectsGlm}): for its fit and its null model's, the iterations' per-row state (linear
     * predictor, mean, weight, score, their trial values, the step, the working residual and a column: 11
     * doubles) and the projections' (the weights and three conjugate-gradient vectors), the fit's projected
     * columns, the null model's rows, each row's level of every absorbed column, and the covariance's per-row
     * parts (the marginal effect's gradient, the two combinations' fixed-effect parts, a projected copy).
     *
     * @param specificationColumns the most columns a specification has, outcome included
     * @param dimensions           the absorbed columns
     */
    public static long severalEffectsGlmFitter(int rows, int specificationColumns, int dimensions) {
        return (long) rows * (DOUBLE * (specificationColumns + 2L * (11 + 4) + 2 + 2 + 1 + 2)
                + INT * (dimensions + 1L + 3));
    }

    /**
     * One fit's start kept for its children ({@link GlmStarts}): a coefficient per column and two per level,
     * the key, and the information at the estimate when it is small enough to keep
     * ({@link GlmStarts#KEPT_INFORMATION}).
     */
    public static long glmStart(int specificationColumns, int levels) {
        long information = Irls.Information.doubles(specificationColumns, levels);
        return DOUBLE * ((long) specificationColumns + 2L * levels) + 4L * INT * specificationColumns + 10 * ARRAY
                + (information <= GlmStarts.KEPT_INFORMATION ? DOUBLE * information : 0);
    }

    /** The outcome and predictor alternatives as recorded, kept beside the shifted columns for these models. */
    public static long recordedColumns(int rows, int alternatives) {
        return (long) rows * DOUBLE * alternatives;
    }
}
