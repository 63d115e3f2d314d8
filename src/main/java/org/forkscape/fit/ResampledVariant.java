package org.forkscape.fit;

import java.util.Arrays;
import java.util.BitSet;
import java.util.HashMap;
import java.util.IdentityHashMap;
import java.util.Map;
import org.forkscape.plan.ErrorType;

/**
 * One data variant as a null draw sees it: every row counted as many times as the draw's bootstrap
 * weights say, or, in a permutation draw, the key predictor's values moved between rows. The cells
 * (count, sums and cross-products per missing-pattern group and fixed-effect level, around the observed
 * shifts) are rebuilt in one pass over the variant's rows; each specification is then solved from its
 * sub-matrix by the engine's own Cholesky route and precision guard. Least squares with integer row
 * weights is least squares on the resample with each row repeated, so the numbers are those of the
 * resampled data set; where rows are needed (the QR guard, HC and cluster errors) they are materialised
 * with that repetition.
 *
 * <p>In a weighted variant a bootstrap draw multiplies each row's analytic weight by the number of times it
 * was drawn (each copy is a row with the row's weight, so the draw is the weighted fit of the resampled
 * data set); a permutation draw moves the key predictor's values and leaves every weight with its row, so
 * the outcome keeps its weight and only the predictor's assignment is random.
 *
 * <p>The observed sample rules, transforms and missing patterns stay as they are: a row carries its
 * coded values into the draw. A permutation moves the values of every key predictor alternative
 * together, and only between rows with the same missing pattern on those alternatives, so each
 * specification keeps its rows.
 *
 * <p>Beside two absorbed columns the cells cannot serve: a row's two-way within values depend on every other
 * row of its specification's sample. There the draw's rows are materialised as a data variant of their own (each
 * row as often as it was drawn, or once with the key predictor permuted) and every specification is fitted on
 * them as observed rows are, each usable set demeaned again ({@link #materialise}).
 *
 * <p>Not thread safe: one instance per worker thread and variant, reused for every draw (its buffers are
 * allocated once).
 */
public final class ResampledVariant implements FitData {
    private final DataVariant v;
    private final int p;
    private final boolean[] isPredictor;
    /** Model variable of each model column. */
    private final int[] variableOf;
    private final int[][] count;
    /** Per cell: the draw's weight total (counts times analytic weights); null when the variant is unweighted. */
    private final double[][] cellWeight;
    private final double[][][] sum;
    private final double[][][] cross;
    private final int[] weight;
    private final double[] row;
    private final double[] weightedRow;
    private final Map<Long, Moments> byVariables = new HashMap<>();
    private final Map<BitSet, Moments> byGroups = new HashMap<>();
    private final Estimator estimator = new ModelDispatch(false);
    private final DesignRows rows = new DesignRows();
    private final KeyCoefficientSandwich.RowView view = new KeyCoefficientSandwich.RowView();
    /** Per variant row: the row whose key predictor values it carries in this draw (permutation draws). */
    private int[] source;
    /** The draw's value of each model column per variant row: the stored columns, or permuted copies. */
    private final double[][] drawColumns;
    /** Permuted copies of the key predictor columns (allocated by the first permutation draw). */
    private double[][] permuted;
    /** Each usable row set's rows in this draw, each repeated as often as it was drawn. */
    private final Map<Moments, RepeatedRows> repeatedRows = new IdentityHashMap<>();
    /** The resampled unit of each table row in a cluster bootstrap; null when single rows are drawn. */
    private int[] tableUnits;
    /** Per cluster column: whether each of its clusters lies within one resampled unit. */
    private final Map<String, Boolean> nestedInUnits = new HashMap<>();
    /** Whether, for the rows last materialised or viewed, each drawn copy of a row starts new clusters. */
    private boolean copiesAreNewClusters;
    private int maxWeight;
    private PermutationBlocks blocks;
    /** Bit v set for the model variables of the key predictor alternatives. */
    private final long predictorBits;
    /**
     * Beside two absorbed columns: the draw's rows as a data variant of their own (each row as often as it was
     * drawn, nested clusters renewed per copy), fitted as the observed rows are; null otherwise or between draws.
     */
    private DataVariant drawnRows;
    /** The observed rows' reader pointed at {@link #drawnRows}, with its row buffers. */
    private final ObservedRows drawnReader = new ObservedRows();

    /**
     * @param base                  the observed variant (read only; shared between threads)
     * @param predictorAlternatives number of key predictor alternatives in the plan
     */
    public ResampledVariant(DataVariant base, int predictorAlternatives) {
        this.v = base;
        this.p = base.columns;
        isPredictor = new boolean[p];
        variableOf = new int[p];
        for (int j = 0; j < p; j++) {
            variableOf[j] = base.layout.variableOf(j);
        }
        long bits = 0;
        for (int j = 0; j < predictorAlternatives; j++) {
            isPredictor[base.layout.predictorColumn(j)] = true;
            bits |= 1L << base.layout.predictorVariable(j);
        }
        predictorBits = bits;
        int groups = base.groupMissing.length;
        count = new int[groups][base.levels];
        cellWeight = base.weight == null ? null : new double[groups][base.levels];
        sum = new double[groups][base.levels][];
        cross = new double[groups][base.levels][];
        for (int g = 0; g < groups; g++) {
            for (int l = 0; l < base.levels; l++) {
                if (base.cellCount[g][l] > 0) {
                    sum[g][l] = new double[p];
                    cross[g][l] = new double[p * p];
                }
            }
        }
        drawColumns = base.shifted.clone();
        weight = new int[base.rows];
        row = new double[p];
        weightedRow = new double[p];
    }

    /**
     * A bootstrap draw: each variant row counts as often as its table row was drawn.
     *
     * <p>For cluster-robust errors, each drawn copy of a resampled unit is a new, independent unit, so
     * the clusters nested in it (the same column, or a finer one) are new clusters in every copy; a
     * cluster that spans several units keeps its identity, and its copies' rows stay in it, as they
     * would in the resampled data.
     *
     * @param tableWeights draws of each table row (not modified)
     * @param tableUnits   the resampled unit (cluster) of each table row when whole clusters were drawn,
     *                     or null when single rows were (not modified; the same array for every draw)
     */
    public void bootstrap(int[] tableWeights, int[] tableUnits) {
        if (tableUnits != this.tableUnits) {
            nestedInUnits.clear();
            this.tableUnits = tableUnits;
        }
        System.arraycopy(v.shifted, 0, drawColumns, 0, p);
        maxWeight = 0;
        for (int i = 0; i < v.rows; i++) {
            weight[i] = tableWeights[v.tableRows[i]];
            maxWeight = Math.max(maxWeight, weight[i]);
        }
        if (v.absorbsSeveral) {
            materialise();
        } else {
            accumulate();
        }
    }

    /**
     * A permutation draw: the table rows in a random order induce, inside each block of variant rows with
     * the same missing pattern on the key predictor alternatives, the permutation that gives the block's
     * k-th row (in that order) the predictor values of the block's k-th row in row order. Every variant
     * thus receives a uniformly random permutation of its own rows, and all variants of one draw are
     * derived from the same order.
     *
     * @param tableOrder a permutation of the table's row numbers (not modified)
     */
    public void permute(int[] tableOrder) {
        if (blocks == null) {
            blocks = new PermutationBlocks(v, predictorBits, tableOrder.length);
        }
        tableUnits = null;
        nestedInUnits.clear();
        Arrays.fill(weight, 1);
        maxWeight = 1;
        if (source == null) {
            source = new int[v.rows];
            permuted = new double[p][];
            for (int j = 0; j < p; j++) {
                if (isPredictor[j]) {
                    permuted[j] = new double[v.rows];
                }
            }
        }
        blocks.assign(tableOrder, source);
        for (int j = 0; j < p; j++) {
            if (!isPredictor[j]) {
                drawColumns[j] = v.shifted[j];
                continue;
            }
            // the source row's value, re-expressed around the receiving row's level shift
            double[] from = v.shifted[j];
            double[] to = permuted[j];
            long bit = 1L << variableOf[j];
            for (int i = 0; i < v.rows; i++) {
                int r = source[i];
                to[i] = (v.groupMissing[v.group[i]] & bit) != 0 ? 0
                        : from[r] + v.levelShift[v.level[r]][j] - v.levelShift[v.level[i]][j];
            }
            drawColumns[j] = to;
        }
        if (v.absorbsSeveral) {
            materialise();
        } else {
            accumulate();
        }
    }

    /**
     * Beside two absorbed columns, the draw's rows become a data variant of their own, fitted as observed rows
     * are: a row's two-way within values depend on every other row of its specification's sample, so each usable
     * set is demeaned again over the drawn rows ({@link SeveralEffectsWithin}, by {@link AlternatingProjections}),
     * with N, K (the levels and connected components of the drawn rows, {@link FixedEffectRank}), the HC
     * leverages ({@link CrossedDummyLeverage}) and the clusters all those of the resampled data set, since every
     * drawn copy is a row. Its routes are the row passes: a draw builds no fourth moments or cluster cells.
     */
    private void materialise() {
        int total = 0;
        for (int i = 0; i < v.rows; i++) {
            total += weight[i];
        }
        int[] from = new int[total];
        int[] copy = new int[total];
        int k = 0;
        for (int i = 0; i < v.rows; i++) {
            for (int c = 0; c < weight[i]; c++) {
                from[k] = i;
                copy[k++] = c;
            }
        }
        Map<String, int[]> codes = new HashMap<>();
        Map<String, Integer> counts = new HashMap<>();
        for (Map.Entry<String, int[]> e : v.clusters.entrySet()) {
            int[] base = e.getValue();
            int count = v.clusterCounts.get(e.getKey());
            boolean renew = nestedInUnits(e.getKey());
            int[] drawn = new int[total];
            for (int r = 0; r < total; r++) {
                int code = base[from[r]];
                drawn[r] = code < 0 || !renew ? code : code + copy[r] * count;
            }
            codes.put(e.getKey(), drawn);
            counts.put(e.getKey(), renew ? count * Math.max(1, maxWeight) : count);
        }
        CodedRows rows = new CodedRows(v.coded, drawColumns, from, codes, counts);
        drawnRows = new DataVariant(rows, new CellSums(rows, null));
        drawnReader.of(drawnRows);
    }

    /**
     * Lets go of the draw's rows where they were materialised (beside two absorbed columns), once every
     * specification of this variant is fitted in the draw, so that a worker holds one such copy at a time.
     */
    public void finishDraw() {
        drawnRows = null;
        drawnReader.of(null);
    }

    /** Whether the last draw's rows were materialised and demeaned again (beside two absorbed columns). */
    public boolean demeansEachDraw() {
        return drawnRows != null;
    }

    private void accumulate() {
        byVariables.clear();
        byGroups.clear();
        repeatedRows.clear();
        for (int g = 0; g < count.length; g++) {
            Arrays.fill(count[g], 0);
            if (cellWeight != null) {
                Arrays.fill(cellWeight[g], 0);
            }
            for (int l = 0; l < v.levels; l++) {
                if (sum[g][l] != null) {
                    Arrays.fill(sum[g][l], 0);
                    Arrays.fill(cross[g][l], 0);
                }
            }
        }
        double[] analytic = v.weight;
        for (int i = 0; i < v.rows; i++) {
            int drawn = weight[i];
            if (drawn == 0) {
                continue;
            }
            int g = v.group[i];
            int l = v.level[i];
            count[g][l] += drawn;
            double w = drawn;
            if (analytic != null) {
                w = drawn * analytic[i];
                cellWeight[g][l] += w;
            }
            double[] s = sum[g][l];
            double[] c = cross[g][l];
            for (int j = 0; j < p; j++) {
                row[j] = drawColumns[j][i];
                weightedRow[j] = w * row[j];
                s[j] += weightedRow[j];
            }
            for (int a = 0; a < p; a++) {
                double wa = weightedRow[a];
                int base = a * p;
                for (int b = a; b < p; b++) {
                    c[base + b] += wa * row[b];
                }
            }
        }
        for (double[][] byLevel : cross) {
            for (double[] c : byLevel) {
                if (c != null) {
                    for (int a = 0; a < p; a++) {
                        for (int b = a + 1; b < p; b++) {
                            c[b * p + a] = c[a * p + b];
                        }
                    }
                }
            }
        }
    }

    @Override
    public DataVariant variant() {
        return drawnRows != null ? drawnRows : v;
    }

    @Override
    public Moments moments(long variableMask) {
        if (drawnRows != null) {
            return drawnRows.moments(variableMask);
        }
        Moments m = byVariables.get(variableMask);
        if (m == null) {
            BitSet usable = UsableRows.groups(v, variableMask);
            m = byGroups.computeIfAbsent(usable, u -> new Moments(v, u, count, cellWeight, sum, cross));
            byVariables.put(variableMask, m);
        }
        return m;
    }

    /**
     * Refits one specification of this variant in the current draw by the engine's estimator, with the
     * same route, precision guard and standard error type (the routes without rows are not built for a
     * draw's cells).
     *
     * @return the key estimate, its standard error and df; {@code null} when the specification cannot be
     *         fitted in this draw (too few rows, a key predictor that is constant or collinear, leverage 1)
     */
    public DrawFit fit(SpecificationModel spec) {
        KeyFit fit = estimator.fit(spec, this);
        return fit.ok() ? new DrawFit(fit.estimate(), fit.stdError(), fit.df()) : null;
    }

    @Override
    public DesignRows refitRows(Moments mom, int[] cols, int y, ErrorType errors) {
        if (drawnRows != null) {
            return drawnReader.refitRows(mom, cols, y, errors);
        }
        prepareClusters(errors);
        fillRows(mom, cols, y, clusterCodes(errors), clusterCount(errors), true);
        return rows;
    }

    /** The draw's rows unscaled, the prior weights beside them (a GLM weighs rows itself). */
    @Override
    public void glmRows(Moments mom, int[] cols, int y, ErrorType errors, GlmRows into) {
        if (drawnRows != null) {
            throw new IllegalStateException("generalized linear models are not fitted beside two absorbed columns");
        }
        prepareClusters(errors);
        fillRows(mom, cols, y, clusterCodes(errors), clusterCount(errors), false);
        into.fill(rows, v.coded.recorded[y], v.levels);
        if (errors.multiway()) {
            into.drawClusters = componentClusters(mom, errors);
        }
    }

    /** Each component's cluster of every drawn row of {@code mom}, a copy renewed where it is nested. */
    private Map<String, int[]> componentClusters(Moments mom, ErrorType errors) {
        RepeatedRows repeat = repeated(mom);
        int[] list = repeat.rows();
        Map<String, int[]> out = new HashMap<>();
        for (ClusterComponents.Component c : ClusterComponents.of(errors)) {
            ErrorType one = c.oneWay();
            prepareClusters(one);
            int[] codes = clusterCodes(one);
            int count = clusterCount(one);
            int[] drawn = new int[mom.n];
            for (int k = 0; k < drawn.length; k++) {
                drawn[k] = codes[list[k]] + (copiesAreNewClusters ? repeat.copy()[k] * count : 0);
            }
            out.put(c.key(), drawn);
        }
        return out;
    }

    @Override
    public KeyCoefficientSandwich.RowView sandwichRows(Moments mom, KeySolution s, int[] positions, int y,
            ErrorType errors, boolean refit) {
        if (drawnRows != null) {
            return drawnReader.sandwichRows(mom, s, positions, y, errors, refit);
        }
        prepareClusters(errors);
        int[] clusterCodes = clusterCodes(errors);
        int clusterCount = clusterCount(errors);
        if (refit) {
            if (clusterCodes != null) {
                labelClusters(mom, clusterCodes, clusterCount);
            }
            return rowView(s, positions, mom, clusterCodes == null ? 0 : codeCount(clusterCount));
        }
        if (clusterCodes != null && copiesAreNewClusters) {
            fillRows(mom, s.kept, y, clusterCodes, clusterCount, true);
            return rowView(s, positions, mom, codeCount(clusterCount));
        }
        return variantView(mom, s, y, clusterCodes, clusterCount);
    }

    @Override
    public boolean observed() {
        return false;
    }

    @Override
    public boolean momentRoutes() {
        return false;
    }

    /**
     * One-way clustering on a column or on one component of a multi-way error type (an intersection's codes
     * are kept under its component key): a drawn copy starts new clusters when the clustering's clusters
     * lie within the resampled units. A multi-way error type itself has no codes; its components are read
     * one at a time ({@link LeastSquares}).
     */
    private void prepareClusters(ErrorType errors) {
        copiesAreNewClusters = errors.clusterColumn() != null && nestedInUnits(errors.clusterColumn());
    }

    private int[] clusterCodes(ErrorType errors) {
        return errors.clusterColumn() != null ? v.clusters.get(errors.clusterColumn()) : null;
    }

    private int clusterCount(ErrorType errors) {
        return errors.clusterColumn() != null ? v.clusterCounts.get(errors.clusterColumn()) : 0;
    }

    /** The refit rows' clusters of one clustering (a multi-way error type reads them once per component). */
    private void labelClusters(Moments mom, int[] clusterCodes, int clusterCount) {
        RepeatedRows repeat = repeated(mom);
        int[] list = repeat.rows();
        for (int k = 0; k < rows.n; k++) {
            rows.cluster[k] = clusterCodes[list[k]] + (copiesAreNewClusters ? repeat.copy()[k] * clusterCount : 0);
        }
    }

    /** Whether every cluster of the column lies within one resampled unit (false for single rows). */
    private boolean nestedInUnits(String column) {
        if (tableUnits == null) {
            return false;
        }
        return nestedInUnits.computeIfAbsent(column, c -> {
            int[] codes = v.clusters.get(c);
            int[] unitOfCluster = new int[v.clusterCounts.get(c)];
            Arrays.fill(unitOfCluster, -1);
            for (int i = 0; i < v.rows; i++) {
                int code = codes[i];
                if (code < 0) {
                    continue;
                }
                int unit = tableUnits[v.tableRows[i]];
                if (unitOfCluster[code] < 0) {
                    unitOfCluster[code] = unit;
                } else if (unitOfCluster[code] != unit) {
                    return false;
                }
            }
            return true;
        });
    }

    /** Cluster codes in use: with new clusters per copy, code + copy * clusterCount. */
    private int codeCount(int clusterCount) {
        return copiesAreNewClusters ? clusterCount * Math.max(1, maxWeight) : clusterCount;
    }

    /** The usable rows of {@code mom} in this draw, each as often as it was drawn, with its copy number. */
    private RepeatedRows repeated(Moments mom) {
        RepeatedRows cached = repeatedRows.get(mom);
        if (cached != null) {
            return cached;
        }
        int[] list = new int[mom.n];
        int[] copy = new int[mom.n];
        int k = 0;
        for (int i = 0; i < v.rows; i++) {
            int w = weight[i];
            if (w == 0 || !mom.uses(i)) {
                continue;
            }
            for (int c = 0; c < w; c++) {
                list[k] = i;
                copy[k++] = c;
            }
        }
        RepeatedRows r = new RepeatedRows(list, copy);
        repeatedRows.put(mom, r);
        return r;
    }

    private record RepeatedRows(int[] rows, int[] copy) {
    }

    /**
     * Materialises the draw's rows in within coordinates, each repeated as often as it was drawn (for the
     * QR route, and for cluster errors when each drawn copy of a cluster is a cluster of its own: codes
     * shifted by multiples of {@code clusterCount}).
     */
    private void fillRows(Moments mom, int[] cols, int yCol, int[] clusterCodes, int clusterCount, boolean scale) {
        RepeatedRows repeat = repeated(mom);
        int width = cols.length;
        int n = mom.n;
        if (rows.x.length < width) {
            rows.x = Arrays.copyOf(rows.x, width);
        }
        for (int j = 0; j < width; j++) {
            if (rows.x[j] == null || rows.x[j].length < n) {
                rows.x[j] = new double[n];
            }
        }
        if (rows.y.length < n) {
            rows.y = new double[n];
            rows.level = new int[n];
            rows.cluster = new int[n];
            rows.source = new int[n];
            rows.weight = new double[n];
        }
        int[] list = repeat.rows();
        double[] analytic = v.weight;
        rows.weighted = analytic != null;
        double[] scaleBy = scale ? analytic : null;
        double[][] offset = mom.levelMeanOffset;
        for (int j = 0; j <= width; j++) {
            int col = j < width ? cols[j] : yCol;
            double[] from = drawColumns[col];
            double[] to = j < width ? rows.x[j] : rows.y;
            for (int k = 0; k < n; k++) {
                int r = list[k];
                to[k] = scaleBy == null ? from[r] - offset[v.level[r]][col]
                        : (from[r] - offset[v.level[r]][col]) * Math.sqrt(scaleBy[r]);
            }
        }
        for (int k = 0; k < n; k++) {
            int r = list[k];
            rows.level[k] = v.level[r];
            rows.source[k] = r;
            if (analytic != null) {
                rows.weight[k] = analytic[r];
            }
            if (clusterCodes != null) {
                rows.cluster[k] = clusterCodes[r] + (copiesAreNewClusters ? repeat.copy()[k] * clusterCount : 0);
            }
        }
        rows.n = n;
        rows.p = width;
    }

    /** The draw's columns as stored, read through the repeated row list and the usable rows' level means. */
    private KeyCoefficientSandwich.RowView variantView(Moments mom, KeySolution s, int y, int[] clusterCodes,
            int clusterCount) {
        return view.over(drawColumns, s.kept, s.p, y, mom, repeated(mom).rows(), clusterCodes, clusterCount);
    }

    /** The materialised rows (already in within coordinates) as the sandwich reads them. */
    private KeyCoefficientSandwich.RowView rowView(KeySolution s, int[] positions, Moments mom, int clusterCount) {
        return view.overRows(rows, positions, s.p, mom, clusterCount);
    }


    /** The variant's rows grouped by their missing pattern on the key predictor alternatives. */
    private static final class PermutationBlocks {
        private final int[] variantRowOfTable;
        private final int[] blockOf;
        private final int[][] blockRows;
        private final int[] next;

        PermutationBlocks(DataVariant v, long predictorBits, int tableRows) {
            variantRowOfTable = new int[tableRows];
            Arrays.fill(variantRowOfTable, -1);
            Map<Long, Integer> blockIds = new HashMap<>();
            blockOf = new int[v.rows];
            for (int i = 0; i < v.rows; i++) {
                variantRowOfTable[v.tableRows[i]] = i;
                long pattern = v.groupMissing[v.group[i]] & predictorBits;
                blockOf[i] = blockIds.computeIfAbsent(pattern, x -> blockIds.size());
            }
            int[] sizes = new int[blockIds.size()];
            for (int b : blockOf) {
                sizes[b]++;
            }
            blockRows = new int[sizes.length][];
            for (int b = 0; b < sizes.length; b++) {
                blockRows[b] = new int[sizes[b]];
            }
            next = new int[sizes.length];
            for (int i = 0; i < v.rows; i++) {
                blockRows[blockOf[i]][next[blockOf[i]]++] = i;
            }
        }

        void assign(int[] tableOrder, int[] source) {
            Arrays.fill(next, 0);
            for (int r : tableOrder) {
                int i = variantRowOfTable[r];
                if (i >= 0) {
                    int b = blockOf[i];
                    source[i] = blockRows[b][next[b]++];
                }
            }
        }
    }
}
