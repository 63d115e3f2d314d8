package org.forkscape.fit;

import java.util.Map;
import java.util.Set;
import java.util.concurrent.ConcurrentHashMap;

/**
 * One data variant: its coded rows (the rows kept by its sample alternatives, its coded outcome, predictor
 * and control columns, its absorbed fixed-effect levels; {@link CodedRows}) and the sufficient statistics
 * summed from them once ({@link VariantStatistics}). Built by {@link VariantBuilder}.
 *
 * <p>Rows are grouped by their pattern of missing model variables, and within a group by fixed-effect
 * level; each (group, level) cell keeps its count, column sums and cross-product matrix around the
 * level's column means. A specification's matrix is then the sum over the groups complete on its
 * variables (exactly its own listwise sample), and absorbing the fixed effects subtracts, per level,
 * (sum x)(sum x)'/n: the within matrix, identical to including the dummies (Frisch &amp; Waugh 1933,
 * Econometrica 1(4); Lovell 1963, JASA 58(304)). Accumulating around level means instead of raw values
 * keeps the normal equations' cancellation small. Read-only after construction, except for the
 * statistics' caches, which are safe for concurrent use and deterministic.
 *
 * <p>The fields below name the arrays of the coded rows and of the cells as the fitting routes read them.
 */
public final class DataVariant {
    final CodedRows coded;
    final VariantStatistics statistics;

    final ModelColumns layout;
    final int rows;
    final int columns;
    /** The table row of each variant row (null draws reweight and permute rows by their table row). */
    final int[] tableRows;
    /** Model column values at the variant's rows, minus the row's level shift; 0 where missing. */
    final double[][] shifted;
    /** Fixed-effect level of each row, 0..levels-1 (all 0 without absorption). */
    final int[] level;
    final int levels;
    final boolean absorbs;
    /** Whether several fixed-effect columns are absorbed: each set of usable rows is demeaned on its own. */
    final boolean absorbsSeveral;
    final String absorbColumn;
    /** Per level and column: the shift (mean over the level's non-missing rows). */
    final double[][] levelShift;
    /** Missing-pattern group of each row. */
    final int[] group;
    /** Per group: bit v set when variable v is missing in the group's rows. */
    final long[] groupMissing;
    /** Per group and level: count, sums (P) and cross-products (P x P, full). */
    final int[][] cellCount;
    /** Per group and level: the weight total; null when unweighted. */
    final double[][] cellWeight;
    /** The analytic weight of each row, null when unweighted or held elsewhere ({@link CodedRows#weight}). */
    final double[] weight;
    /** Whether the variant is weighted, its rows held here or not ({@link CodedRows#weighted}). */
    final boolean weighted;
    final double[][][] cellSum;
    final double[][][] cellCross;
    /** Cluster codes per cluster column name, over the variant's rows (-1 where missing). */
    final Map<String, int[]> clusters;
    final Map<String, Integer> clusterCounts;
    /**
     * For a variant built from parts: per intersection of cluster columns, the whole table's key of each of its
     * cluster codes ({@link VariantByParts#intersectionKeys}, ascending, so code = the key's rank), with which a
     * part numbers its own clusters of the intersection as the variant does ({@link GlmPassRequest}); empty
     * otherwise.
     */
    Map<String, long[]> intersectionClusterKeys = Map.of();
    /**
     * For a bootstrap draw of a variant held in parts ({@link BootstrapByParts}): the observed variant, whose
     * fits start the draw's generalized linear fits, as one machine's draws start ({@link GlmStarts}); null
     * for an observed variant.
     */
    volatile DataVariant drawOf;
    /** Where each generalized linear fit of this variant starts, and the fits already made. */
    final GlmStarts glmStarts = new GlmStarts();
    /**
     * For a variant without rows: how its rows are reduced for a QR refit where they are held (set by
     * {@link VariantByParts#build}); null when no refit can be made.
     */
    volatile RefitReduction refitReduction;
    /**
     * For a variant without rows: how a batch of specifications' sandwich meats is summed where the rows are
     * held (set by {@link VariantByParts#build}; {@link RowPassesByParts}); null when no such pass can be made.
     */
    volatile RowPassReduction rowPassReduction;
    /**
     * For a variant without rows: how one specification's cluster scores are summed where the rows are held
     * (set by {@link VariantByParts#build}; {@link ClusterScoresByParts}); null when no such pass can be made.
     */
    volatile ClusterScoreReduction clusterScoreReduction;
    /** The passes over the parts' rows made for cluster scores of this variant's specifications. */
    final java.util.concurrent.atomic.AtomicLong clusterScorePasses = new java.util.concurrent.atomic.AtomicLong();
    /**
     * For a variant built from parts: the passes of generalized linear fits over the parts' rows, a batch
     * of {@link GlmPassRequest}s in one pass ({@link GlmFitsByParts}); null for a variant that holds its rows.
     */
    volatile GlmPassReduction glmPassReduction;
    /** The rounds of passes {@link GlmFitsByParts} made over the parts for this variant, the passes they held, the fits. */
    final java.util.concurrent.atomic.AtomicLong glmRounds = new java.util.concurrent.atomic.AtomicLong();
    final java.util.concurrent.atomic.AtomicLong glmPasses = new java.util.concurrent.atomic.AtomicLong();
    final java.util.concurrent.atomic.AtomicLong glmFitsServed = new java.util.concurrent.atomic.AtomicLong();
    final java.util.concurrent.atomic.AtomicLong glmOrthogonalPasses = new java.util.concurrent.atomic.AtomicLong();
    /** The passes over the parts' rows {@link RowPassesByParts} made for this variant, and the specifications they served. */
    final java.util.concurrent.atomic.AtomicLong rowPassBatches = new java.util.concurrent.atomic.AtomicLong();
    final java.util.concurrent.atomic.AtomicLong rowPassesServed = new java.util.concurrent.atomic.AtomicLong();
    /** Of those, the one-way cluster errors beside two absorbed columns, their scores summed in the batch. */
    final java.util.concurrent.atomic.AtomicLong clusterScoresBatched = new java.util.concurrent.atomic.AtomicLong();
    /**
     * For a variant built from parts: the facts of the whole its parts were coded with (set by
     * {@link VariantByParts#build}), with which a bootstrap draw codes its copies; null otherwise.
     */
    volatile WholeRows partsFacts;
    /**
     * Beside two absorbed columns held in parts: per cluster column, its clusters over the whole table, whose
     * codes every part shares, so that one-way cluster scores go to the parts in batches
     * ({@link RowPassRequest#ofClusters}); null otherwise.
     */
    volatile Map<String, Integer> wholeClusterCounts;
    /**
     * Beside two absorbed columns held in parts: the clusters over the whole table of each intersection of
     * cluster columns whose clusters lie in one part each, and those of them with one row per cluster
     * ({@link VariantByParts#build}).
     */
    final Map<String, Integer> wholeIntersectionClusters = new ConcurrentHashMap<>();
    final Set<String> intersectionClustersAreRows = ConcurrentHashMap.newKeySet();
    /** Whether the row-free sandwich routes pay for themselves in this variant (set by the runner). */
    volatile boolean useFourthMoments;
    private final Set<String> useClusterMoments = ConcurrentHashMap.newKeySet();
    /** Cluster columns with one row per cluster, beside two absorbed columns (see {@link #expect}). */
    private final Set<String> clustersAreRows = ConcurrentHashMap.newKeySet();

    DataVariant(CodedRows coded, CellSums cells) {
        this(coded, cells, null, Map.of());
    }

    /**
     * A variant from statistics summed elsewhere ({@link PartialStatistics#variant}): {@code coded} holds its
     * shape without rows, and the row-free routes are taken wherever their structures were given.
     */
    DataVariant(CodedRows coded, CellSums cells, double[][][] groupTensors, Map<String, ClusterMoments> clusterMoments) {
        this.coded = coded;
        this.layout = coded.layout;
        this.rows = coded.rows;
        this.columns = coded.columns;
        this.tableRows = coded.tableRows;
        this.shifted = coded.shifted;
        this.level = coded.level;
        this.levels = coded.levels;
        this.absorbColumn = coded.absorbColumn;
        this.absorbs = absorbColumn != null;
        this.absorbsSeveral = coded.dimensionCodes != null;
        this.levelShift = coded.levelShift;
        this.group = coded.group;
        this.groupMissing = coded.groupMissing;
        this.clusters = coded.clusters;
        this.clusterCounts = coded.clusterCounts;
        this.statistics = coded.held() ? new VariantStatistics(this, cells)
                : new VariantStatistics(this, cells, groupTensors, clusterMoments);
        if (!coded.held()) {
            useFourthMoments = groupTensors != null;
            useClusterMoments.addAll(clusterMoments.keySet());
        }
        this.cellCount = statistics.cells.cellCount;
        this.cellWeight = statistics.cells.cellWeight;
        this.weight = coded.weight;
        this.weighted = coded.weighted;
        this.cellSum = statistics.cells.cellSum;
        this.cellCross = statistics.cells.cellCross;
    }

    public int rowCount() {
        return rows;
    }

    /** A QR refit's rows reduced where the rows are held: the factor R of the usable rows' [X y]. */
    interface RefitReduction {
        DesignRows rows(Moments mom, int[] cols, int y);

        /** The factors of several refits, in order, from one pass over the rows where they are held. */
        double[][][] factors(java.util.List<RefitRequest> requests);
    }

    /**
     * For a variant without rows that absorbs two columns: the exact within transformation of one set of usable
     * rows, solved where the rows are held ({@link CrossedEffectsByParts}; set by {@link VariantByParts#build}).
     */
    volatile CrossedWithinReduction crossedWithin;

    /** The within transformation of the usable groups {@code usable}, from the parts. */
    interface CrossedWithinReduction {
        SeveralEffectsWithin within(java.util.BitSet usable);
    }

    /** The sets of usable rows whose two absorbed columns were solved by parts ({@link #crossedWithin}). */
    final java.util.concurrent.atomic.AtomicLong crossedSolves = new java.util.concurrent.atomic.AtomicLong();

    /** How many sets of usable rows of this variant had their two absorbed columns solved where the rows are. */
    public long crossedSolves() {
        return crossedSolves.get();
    }

    /**
     * Of those sets, how many had their fourth moments, and how many clusterings' cells in all, summed by the
     * parts from their within values ({@link CrossedEffectsByParts.WithinPass}).
     */
    final java.util.concurrent.atomic.AtomicLong partsFourthMoments = new java.util.concurrent.atomic.AtomicLong();
    final java.util.concurrent.atomic.AtomicLong partsClusterCells = new java.util.concurrent.atomic.AtomicLong();

    public long partsFourthMoments() {
        return partsFourthMoments.get();
    }

    public long partsClusterCells() {
        return partsClusterCells.get();
    }

    /** The refits' factors reduced in batches ahead of their fits (see {@link RefitPending}). */
    final java.util.Map<RefitRequest, double[][]> refitFactors = new java.util.concurrent.ConcurrentHashMap<>();
    /** Passes over the parts made for batches of refits (counted for the tests and the report). */
    public final java.util.concurrent.atomic.AtomicLong refitBatches = new java.util.concurrent.atomic.AtomicLong();

    /**
     * A batch of specifications' HC0 to HC3 meats summed over their usable rows where the rows are held, one
     * per request in order (NaN where a leverage is one).
     */
    interface RowPassReduction {
        double[] sums(RowPassRequest[] batch);
    }

    /**
     * One specification's score per cluster of one clustering (a cluster column, or an intersection's key),
     * summed over its usable rows where the rows are held, keyed by the cluster's key over the whole table.
     */
    interface ClusterScoreReduction {
        java.util.SortedMap<Long, Double> scores(RowPassRequest request, String clusterKey);
    }

    /** How many passes over the parts' rows made cluster scores for this variant ({@link ClusterScoresByParts}). */
    public long clusterScorePasses() {
        return clusterScorePasses.get();
    }

    /** Every part's sums of each pass of the batch, merged pass by pass in part order. */
    interface GlmPassReduction {
        double[][] sums(GlmPassRequest[] batch);
    }

    /** The rounds of passes over the parts made for this variant's generalized linear fits ({@link GlmFitsByParts}). */
    public long glmRounds() {
        return glmRounds.get();
    }

    /** The passes those rounds held (a round holds one pass of each fit under way). */
    public long glmPasses() {
        return glmPasses.get();
    }

    /** Of those passes, the ones that factored a weighted design by QR from the parts ({@link GlmPassRequest#stacked}). */
    public long glmOrthogonalPasses() {
        return glmOrthogonalPasses.get();
    }

    /** The specifications of this variant fitted by those passes. */
    public long glmFitsServed() {
        return glmFitsServed.get();
    }

    /** How many passes over the parts' rows served this variant's sandwiches ({@link RowPassesByParts}). */
    public long rowPassBatches() {
        return rowPassBatches.get();
    }

    /** How many specifications those passes served. */
    /** One-way cluster errors beside two absorbed columns whose scores a row-pass batch summed. */
    public long clusterScoresBatched() {
        return clusterScoresBatched.get();
    }

    public long rowPassesServed() {
        return rowPassesServed.get();
    }

    /** Number of missing-value patterns among the variant's rows. */
    public int groupCount() {
        return groupMissing.length;
    }

    /** Whether this variant holds its rows (false when it was built from statistics summed elsewhere). */
    public boolean holdsRows() {
        return coded.held();
    }

    /**
     * Tells the variant how many specifications of each sandwich type it will fit, so that it builds
     * the row-free structures only where they pay (see {@link SandwichRoute}).
     *
     * @param hcSpecifications      specifications with HC0 or HC1 errors
     * @param clusterSpecifications specifications per cluster column
     * @param meanColumns           mean number of coefficients besides the intercept or levels
     * @param pool                  where to sum row blocks (the result does not depend on it), or null
     */
    public void expect(long hcSpecifications, Map<String, Long> clusterSpecifications, double meanColumns,
            java.util.concurrent.ExecutorService pool) {
        if (!coded.held()) {
            // built from statistics alone: the row-free routes are those whose structures were summed, or beside
            // two absorbed columns those the parts will sum with each set's within cross-products
            if (crossedWithin != null && wholeClusterCounts != null) {
                expectWithinParts(hcSpecifications, clusterSpecifications, meanColumns);
            }
            return;
        }
        if (absorbsSeveral) {
            expectWithinRows(hcSpecifications, clusterSpecifications, meanColumns);
            return;
        }
        useFourthMoments = SandwichRoute.fourthMomentsPay(this, hcSpecifications, meanColumns);
        if (useFourthMoments) {
            statistics.buildGroupTensors(pool);
        }
        clusterSpecifications.forEach((column, count) -> {
            Integer g = clusterCounts.get(column);
            if (g != null && SandwichRoute.clusterMomentsPay(this, count, meanColumns, g)) {
                useClusterMoments.add(column);
            }
        });
    }

    /**
     * The same choice beside two absorbed columns, whose structures are summed per usable set from its
     * demeaned rows (weighted or not; {@link FourthMoments#ofWithinRows}, {@link ClusterMoments#ofWithinRows}).
     * A cluster column with one row per cluster (no two rows share a code, such as a unit x period intersection
     * of a panel) has the HC0 meat as its CR1 meat, and every usable row is a cluster (the column is among the
     * specification's variables, so its rows have codes), so its specifications count towards the fourth
     * moments and are served by them.
     */
    private void expectWithinRows(long hcSpecifications, Map<String, Long> clusterSpecifications,
            double meanColumns) {
        long fourth = hcSpecifications;
        for (Map.Entry<String, Long> e : clusterSpecifications.entrySet()) {
            int[] codes = clusters.get(e.getKey());
            if (codes != null && oneRowPerCluster(codes)) {
                fourth += e.getValue();
                clustersAreRows.add(e.getKey());
            }
        }
        useFourthMoments = SandwichRoute.withinFourthMomentsPay(rows, columns, fourth, meanColumns);
        clusterSpecifications.forEach((column, count) -> {
            Integer g = clusterCounts.get(column);
            if (g != null && !clustersAreRows.contains(column)
                    && SandwichRoute.withinClusterMomentsPay(rows, columns, count, meanColumns, g)) {
                useClusterMoments.add(column);
            }
        });
    }

    /**
     * The same choice beside two absorbed columns held in parts: the parts sum each set's fourth moments and
     * clusters' cells from their within values in the pass that sums its within cross-products
     * ({@link CrossedEffectsByParts.WithinPass}). The clusters are counted over the whole table (an
     * intersection by the parts when the variant is built, up to the clusters whose cells fit; beyond, the
     * product of its columns' counts, at most the rows, stands in); an intersection with one row per cluster
     * takes the fourth moments as one machine's does, while with no rows here a cluster column with one row per
     * cluster is not told apart, and its specifications take the clusters' cells.
     */
    private void expectWithinParts(long hcSpecifications, Map<String, Long> clusterSpecifications,
            double meanColumns) {
        long fourth = hcSpecifications;
        for (Map.Entry<String, Long> e : clusterSpecifications.entrySet()) {
            if (intersectionClustersAreRows.contains(e.getKey())) {
                fourth += e.getValue();
                clustersAreRows.add(e.getKey());
            }
        }
        useFourthMoments = SandwichRoute.withinFourthMomentsPay(rows, columns, fourth, meanColumns);
        expectedClusterKeys.addAll(clusterSpecifications.keySet());
        clusterSpecifications.forEach((key, count) -> {
            if (clustersAreRows.contains(key)) {
                return;
            }
            Integer counted = wholeIntersectionClusters.get(key);
            long g = counted != null ? counted : clustersAtMost(key);
            if (g >= 0 && SandwichRoute.withinClusterMomentsPay(rows, columns, count, meanColumns, (int) g)) {
                useClusterMoments.add(key);
            }
        });
    }

    /**
     * The clusters of {@code key} (a cluster column, or an intersection not counted) at most: the product of its
     * columns' clusters over the whole table, at most the rows; -1 when a column's are not known.
     */
    private long clustersAtMost(String key) {
        long g = 1;
        for (String column : key.split(java.util.regex.Pattern.quote(ClusterComponents.JOIN))) {
            Integer c = wholeClusterCounts.get(column);
            if (c == null) {
                return -1;
            }
            g = Math.min(rows, g * c);
        }
        return g;
    }

    /** Beside two absorbed columns held in parts: the cluster keys of the specifications {@link #expect} was told of. */
    private final Set<String> expectedClusterKeys = ConcurrentHashMap.newKeySet();

    /**
     * A bootstrap draw's routes beside two absorbed columns held in parts, from the observed variant's: the
     * fourth moments where the observed fits take them, and the clusters' cells of every clustering (a draw's
     * sets are summed again over its parts, and the clusters' scores are not, so a cluster error has no other
     * route there), with each drawn copy of a renewed cluster ({@code renewed}) a cluster of its own (its key is
     * its code plus the copy times the clusters, {@link VariantByParts#inDraw}); an intersection with one row per
     * cluster that the draw renews keeps one row per cluster, and takes the fourth moments.
     */
    void expectAsDrawOf(DataVariant observed, Set<String> renewed) {
        useFourthMoments = observed.useFourthMoments;
        for (String key : observed.expectedClusterKeys) {
            if (observed.intersectionClustersAreRows.contains(key) && renewed.contains(key)) {
                // one row per cluster, and every drawn copy a cluster of its own: still one row per cluster
                clustersAreRows.add(key);
                useFourthMoments = true;
            } else {
                useClusterMoments.add(key);
            }
        }
    }

    /**
     * Beside two absorbed columns held in parts, why a bootstrap draw could not compute the CR1 meat of the
     * clustering {@code key} (a cluster column, or the intersection of {@code columns}; {@link #expectAsDrawOf}),
     * or null when it can: from the fourth moments when it is an intersection each of whose clusters has one
     * row and the draws resample whole clusters of one of its columns ({@code resampledColumn}; null when single
     * rows are drawn), so that each drawn copy is a cluster of its own; otherwise from its clusters' cells, which
     * must stay within the engine's memory bound for them ({@link SandwichRoute#MAX_TENSOR_DOUBLES}; a column's
     * clusters are counted over the whole table, an intersection's by the parts when the variant is built).
     */
    public String drawClustersProblem(String key, java.util.List<String> columns, String resampledColumn) {
        if (intersectionClustersAreRows.contains(key) && resampledColumn != null && columns.contains(resampledColumn)) {
            return null;
        }
        Integer g = columns.size() == 1 ? wholeClusterCounts.get(key) : wholeIntersectionClusters.get(key);
        int most = VariantByParts.countedKeysAtMost(this.columns);
        if (g == null || g > most) {
            String what = columns.size() == 1 ? "\"" + key + "\"" : "the intersection of " + String.join(" and ",
                    columns);
            return String.format(java.util.Locale.ROOT, "%s has %s clusters, whose cells in a draw would be above "
                    + "the engine's memory bound for them (%,d doubles: at most %,d clusters of %d model columns)",
                    what, g == null ? "more than " + String.format(java.util.Locale.ROOT, "%,d", most)
                    : String.format(java.util.Locale.ROOT, "%,d", g), SandwichRoute.MAX_TENSOR_DOUBLES, most,
                    this.columns);
        }
        return null;
    }

    /** Whether the variant absorbs two columns and is held in parts. */
    public boolean crossedInParts() {
        return crossedWithin != null;
    }

    /** The cluster keys whose specifications take the clusters' cells, in their natural order. */
    java.util.List<String> clusterMomentKeys() {
        return useClusterMoments.stream().sorted().toList();
    }

    /** Whether no two of the variant's rows share a cluster code (rows missing the column have none). */
    private static boolean oneRowPerCluster(int[] codes) {
        java.util.BitSet seen = new java.util.BitSet();
        for (int c : codes) {
            if (c >= 0) {
                if (seen.get(c)) {
                    return false;
                }
                seen.set(c);
            }
        }
        return true;
    }

    boolean usesClusterMoments(String column) {
        return useClusterMoments.contains(column);
    }

    /**
     * Whether the specifications clustered on {@code column} take their CR1 meat from the fourth moments:
     * beside two absorbed columns, a column with one row per cluster when the fourth moments are built.
     */
    boolean clustersServedByFourthMoments(String column) {
        return useFourthMoments && clustersAreRows.contains(column);
    }

    /** The per-group third and fourth moments, built on first use. */
    double[][][] groupTensors() {
        return statistics.groupTensors();
    }

    ClusterMoments clusterMoments(String column) {
        return statistics.clusterMoments(column);
    }

    /**
     * The columns the passes over rows read for the usable rows of {@code mom}, indexed by model column and
     * variant row, to which {@code mom}'s level offsets turn them into within values: the stored level-shifted
     * columns, or with several absorbed columns the rows demeaned for exactly that set (offsets 0).
     */
    double[][] rowColumns(Moments mom) {
        return absorbsSeveral ? statistics.demeanedColumns(mom) : shifted;
    }

    public ModelColumns layout() {
        return layout;
    }

    /**
     * The moments of the rows complete on the variables in {@code variableMask} (bit v = model variable
     * v). Cached: specifications with the same usable rows share one.
     */
    public Moments moments(long variables) {
        return statistics.moments(variables);
    }
}
