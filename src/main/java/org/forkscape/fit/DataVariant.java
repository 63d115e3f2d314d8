package org.forkscape.fit;

import java.util.BitSet;
import java.util.HashMap;
import java.util.LinkedHashMap;
import java.util.Map;
import java.util.concurrent.ConcurrentHashMap;
import org.forkscape.data.CategoricalColumn;
import org.forkscape.data.Column;
import org.forkscape.data.NumericColumn;
import org.forkscape.data.Table;

/**
 * One data variant: the rows kept by its sample alternatives, its coded outcome and predictor columns,
 * its absorbed fixed-effect levels, and the cross-products of every model column, accumulated once.
 *
 * <p>Rows are grouped by their pattern of missing model variables, and within a group by fixed-effect
 * level; each (group, level) cell keeps its count, column sums and cross-product matrix around the
 * level's column means. A specification's matrix is then the sum over the groups complete on its
 * variables (exactly its own listwise sample), and absorbing the fixed effects subtracts, per level,
 * (sum x)(sum x)'/n: the within matrix, identical to including the dummies (Frisch &amp; Waugh 1933,
 * Econometrica 1(4); Lovell 1963, JASA 58(304)). Accumulating around level means instead of raw values
 * keeps the normal equations' cancellation small. Read-only after construction, except for the
 * {@link Moments} cache, which is safe for concurrent use and deterministic.
 */
public final class DataVariant {
    /** Rows per block of the cross-product sums. */
    static final int BLOCK_ROWS = 8192;
    /** Beyond this many doubles of partial sums (many fixed-effect levels), rows are summed in one block. */
    static final long MAX_BLOCK_DOUBLES = 1L << 24;

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
    final String absorbColumn;
    /** Per level and column: the shift (mean over the level's non-missing rows). */
    final double[][] levelShift;
    /** Missing-pattern group of each row. */
    final int[] group;
    /** Per group: bit v set when variable v is missing in the group's rows. */
    final long[] groupMissing;
    /** Per group and level: count, sums (P) and cross-products (P x P, full). */
    final int[][] cellCount;
    final double[][][] cellSum;
    final double[][][] cellCross;
    /** Cluster codes per cluster column name, over the variant's rows (-1 where missing). */
    final Map<String, int[]> clusters = new HashMap<>();
    final Map<String, Integer> clusterCounts = new HashMap<>();
    private final Map<BitSet, Moments> momentsByGroups = new ConcurrentHashMap<>();
    private final Map<String, ClusterMoments> clusterMoments = new ConcurrentHashMap<>();
    private volatile double[][][] groupTensors;
    /** Whether the row-free sandwich routes pay for themselves in this variant (set by the runner). */
    volatile boolean useFourthMoments;
    private final java.util.Set<String> useClusterMoments = ConcurrentHashMap.newKeySet();
    private final Map<Long, Moments> momentsByVariables = new ConcurrentHashMap<>();
    /** Variables missing in at least one row: only these can change a specification's usable rows. */
    private final long everMissing;

    /** Builds the variant of {@code key}; see {@link SpecificationModels#variant(VariantKey)}. */
    DataVariant(CompiledPlan plan, VariantKey key, java.util.concurrent.ExecutorService pool) {
        this.layout = plan.layout;
        this.columns = layout.size();
        Table table = plan.table;
        int n = table.rowCount();
        boolean[] keep = new boolean[n];
        java.util.Arrays.fill(keep, true);
        if (plan.commonMissing) {
            for (Column c : plan.rawVariables) {
                for (int r = 0; r < n; r++) {
                    if (c.isMissing(r)) {
                        keep[r] = false;
                    }
                }
            }
        }
        RowSelection.apply(plan, key.sampleChoices(), keep);
        int[] sampled = indicesOf(keep);
        String rowsDescription = plan.describeRows(key.sampleChoices());

        double[][] raw = new double[columns][];
        for (CompiledPlan.CodedVariable v : plan.outcomes) {
            raw[v.modelColumn()] = Transforms.apply(v.column(), v.transform(), sampled, v.transformPath(),
                    rowsDescription);
        }
        for (CompiledPlan.CodedVariable v : plan.predictors) {
            raw[v.modelColumn()] = Transforms.apply(v.column(), v.transform(), sampled, v.transformPath(),
                    rowsDescription);
        }

        // absorbed fixed effects: rows missing the column cannot be in any specification of this variant
        Column absorbed = key.absorbChoice() < 0 ? null : plan.absorbColumns[key.absorbChoice()];
        absorbColumn = absorbed == null ? null : absorbed.name();
        absorbs = absorbColumn != null;
        int[] levelCodes = new int[sampled.length];
        int levelCount = 1;
        int[] kept = sampled;
        if (absorbs) {
            int[] codes = LevelCodes.of(absorbed);
            int m = 0;
            for (int i = 0; i < sampled.length; i++) {
                if (codes[sampled[i]] >= 0) {
                    m++;
                }
            }
            int[] keepIdx = new int[m];
            m = 0;
            for (int i = 0; i < sampled.length; i++) {
                if (codes[sampled[i]] >= 0) {
                    keepIdx[m++] = i;
                }
            }
            kept = new int[keepIdx.length];
            for (int i = 0; i < keepIdx.length; i++) {
                kept[i] = sampled[keepIdx[i]];
            }
            for (int j = 0; j < columns; j++) {
                if (raw[j] != null) {
                    double[] compact = new double[keepIdx.length];
                    for (int i = 0; i < keepIdx.length; i++) {
                        compact[i] = raw[j][keepIdx[i]];
                    }
                    raw[j] = compact;
                }
            }
            int[] dense = new int[keepIdx.length];
            Map<Integer, Integer> remap = new java.util.TreeMap<>();
            for (int r : kept) {
                remap.put(codes[r], 0);
            }
            int next = 0;
            for (Map.Entry<Integer, Integer> e : remap.entrySet()) {
                e.setValue(next++);
            }
            for (int i = 0; i < kept.length; i++) {
                dense[i] = remap.get(codes[kept[i]]);
            }
            levelCodes = dense;
            levelCount = Math.max(1, next);
        }
        this.rows = kept.length;
        this.tableRows = kept;
        this.level = levelCodes;
        this.levels = levelCount;

        fillControls(plan, kept, raw);

        // missing patterns over model variables, numbered in order of first appearance
        long[] rowMissing = new long[rows];
        for (int j = 0; j < columns; j++) {
            long bit = 1L << layout.variableOf(j);
            double[] x = raw[j];
            for (int i = 0; i < rows; i++) {
                if (Double.isNaN(x[i])) {
                    rowMissing[i] |= bit;
                }
            }
        }
        for (CompiledPlan.ClusterColumn cluster : plan.clusterColumns) {
            int[] all = LevelCodes.of(cluster.column());
            int[] codes = new int[rows];
            long bit = cluster.bit();
            int max = -1;
            for (int i = 0; i < rows; i++) {
                codes[i] = all[kept[i]];
                max = Math.max(max, codes[i]);
                if (codes[i] < 0) {
                    rowMissing[i] |= bit;
                }
            }
            clusters.put(cluster.column().name(), codes);
            clusterCounts.put(cluster.column().name(), max + 1);
        }
        Map<Long, Integer> patterns = new LinkedHashMap<>();
        group = new int[rows];
        long lastMask = 0;
        int lastGroup = -1;
        for (int i = 0; i < rows; i++) {
            // consecutive rows usually share a pattern: skip the map (and its boxing) for them
            if (lastGroup < 0 || rowMissing[i] != lastMask) {
                lastMask = rowMissing[i];
                lastGroup = patterns.computeIfAbsent(lastMask, p -> patterns.size());
            }
            group[i] = lastGroup;
        }
        groupMissing = new long[patterns.size()];
        patterns.forEach((mask, g) -> groupMissing[g] = mask);
        long any = 0;
        for (long mask : groupMissing) {
            any |= mask;
        }
        everMissing = any;

        levelShift = new double[levels][columns];
        shifted = new double[columns][];
        double[] levelSum = new double[levels];
        int[] levelN = new int[levels];
        for (int j = 0; j < columns; j++) {
            double[] x = raw[j];
            java.util.Arrays.fill(levelSum, 0);
            java.util.Arrays.fill(levelN, 0);
            if (levels == 1) {
                double sum = 0;
                int count = 0;
                for (int i = 0; i < rows; i++) {
                    double v = x[i];
                    if (v == v) {
                        sum += v;
                        count++;
                    }
                }
                levelSum[0] = sum;
                levelN[0] = count;
            } else {
                for (int i = 0; i < rows; i++) {
                    double v = x[i];
                    if (v == v) {
                        levelSum[level[i]] += v;
                        levelN[level[i]]++;
                    }
                }
            }
            for (int l = 0; l < levels; l++) {
                levelShift[l][j] = levelN[l] == 0 ? 0 : levelSum[l] / levelN[l];
            }
            correctShifts(x, j, levelN);
            // the raw column is not needed after this: shift it in place
            double shift0 = levelShift[0][j];
            for (int i = 0; i < rows; i++) {
                double v = x[i];
                x[i] = v != v ? 0 : v - (levels == 1 ? shift0 : levelShift[level[i]][j]);
            }
            shifted[j] = x;
        }
        int groups = groupMissing.length;
        cellCount = new int[groups][levels];
        cellSum = new double[groups][levels][];
        cellCross = new double[groups][levels][];
        accumulate(pool);
    }

    /**
     * Sums each (group, level) cell's column sums and cross-products. Rows are taken in fixed blocks
     * whose partial sums are added in block order, so the result is the same whatever the number of
     * threads, and blocked (pairwise-like) summation also bounds the rounding error's growth (Higham,
     * Accuracy and Stability of Numerical Algorithms, 2nd ed., section 4.2).
     */
    private void accumulate(java.util.concurrent.ExecutorService pool) {
        int p = columns;
        int groups = groupMissing.length;
        int cells = groups * levels;
        int blocks = Math.max(1, (rows + BLOCK_ROWS - 1) / BLOCK_ROWS);
        if ((long) blocks * cells * (p + 1L) * p > MAX_BLOCK_DOUBLES) {
            blocks = 1;
        }
        int blockRows = blocks == 1 ? rows : BLOCK_ROWS;
        double[][][] partialSum = new double[blocks][][];
        double[][][] partialCross = new double[blocks][][];
        int[][] partialCount = new int[blocks][];
        java.util.function.IntConsumer block = b -> {
            double[][] sum = new double[cells][];
            double[][] cross = new double[cells][];
            int[] count = new int[cells];
            int from = b * blockRows;
            int to = Math.min(rows, from + blockRows);
            // rows of one cell contiguous: a counting sort of the block by cell
            int[] start = new int[cells + 1];
            for (int i = from; i < to; i++) {
                start[group[i] * levels + level[i] + 1]++;
            }
            for (int c = 0; c < cells; c++) {
                start[c + 1] += start[c];
            }
            int[] order = new int[to - from];
            int[] fill = start.clone();
            for (int i = from; i < to; i++) {
                order[fill[group[i] * levels + level[i]]++] = i;
            }
            // cells is 0 when no row survives the sample rules: then there is nothing to sum
            boolean oneCell = cells <= 1 || start[cells] == start[1];
            double[][] z = new double[p][];
            for (int cell = 0; cell < cells; cell++) {
                int m = start[cell + 1] - start[cell];
                if (m == 0) {
                    continue;
                }
                for (int j = 0; j < p; j++) {
                    if (oneCell && m == to - from) {
                        z[j] = java.util.Arrays.copyOfRange(shifted[j], from, to);
                    } else {
                        double[] col = shifted[j];
                        double[] zj = new double[m];
                        for (int k = 0; k < m; k++) {
                            zj[k] = col[order[start[cell] + k]];
                        }
                        z[j] = zj;
                    }
                }
                count[cell] = m;
                double[] s = new double[p];
                double[] c = new double[p * p];
                for (int a = 0; a < p; a++) {
                    s[a] = Kernels.sum(z[a], m);
                    for (int k = a; k < p; k++) {
                        c[a * p + k] = Kernels.dot(z[a], z[k], m);
                    }
                }
                sum[cell] = s;
                cross[cell] = c;
            }
            partialSum[b] = sum;
            partialCross[b] = cross;
            partialCount[b] = count;
        };
        if (pool == null || blocks == 1) {
            for (int b = 0; b < blocks; b++) {
                block.accept(b);
            }
        } else {
            java.util.List<java.util.concurrent.Future<?>> futures = new java.util.ArrayList<>();
            for (int b = 0; b < blocks; b++) {
                int index = b;
                futures.add(pool.submit(() -> block.accept(index)));
            }
            for (java.util.concurrent.Future<?> f : futures) {
                try {
                    f.get();
                } catch (InterruptedException e) {
                    Thread.currentThread().interrupt();
                    throw new IllegalStateException("interrupted while summing cross-products", e);
                } catch (java.util.concurrent.ExecutionException e) {
                    throw new IllegalStateException(e.getCause());
                }
            }
        }
        for (int cell = 0; cell < cells; cell++) {
            int g = cell / levels;
            int l = cell % levels;
            for (int b = 0; b < blocks; b++) {
                double[] s = partialSum[b][cell];
                if (s == null) {
                    continue;
                }
                cellCount[g][l] += partialCount[b][cell];
                if (cellSum[g][l] == null) {
                    cellSum[g][l] = s;
                    cellCross[g][l] = partialCross[b][cell];
                } else {
                    double[] ts = cellSum[g][l];
                    double[] tc = cellCross[g][l];
                    double[] c = partialCross[b][cell];
                    for (int j = 0; j < p; j++) {
                        ts[j] += s[j];
                    }
                    for (int k = 0; k < tc.length; k++) {
                        tc[k] += c[k];
                    }
                }
            }
            double[] c = cellCross[g][l];
            if (c != null) {
                for (int a = 0; a < p; a++) {
                    for (int k = a + 1; k < p; k++) {
                        c[k * p + a] = c[a * p + k];
                    }
                }
            }
        }
    }

    private static void fillControls(CompiledPlan plan, int[] kept, double[][] raw) {
        for (CompiledPlan.CodedControl control : plan.codedControls) {
            int[] cols = control.modelColumns();
            if (cols.length == 0) {
                continue;
            }
            if (control.column() instanceof CategoricalColumn cat) {
                int[] codes = cat.codes();
                for (int k = 0; k < cols.length; k++) {
                    double[] d = new double[kept.length];
                    for (int i = 0; i < kept.length; i++) {
                        int code = codes[kept[i]];
                        d[i] = code < 0 ? Double.NaN : code == k + 1 ? 1 : 0;
                    }
                    raw[cols[k]] = d;
                }
            } else {
                double[] x = ((NumericColumn) control.column()).values();
                double[] d = new double[kept.length];
                for (int i = 0; i < kept.length; i++) {
                    d[i] = x[kept[i]];
                }
                raw[cols[0]] = d;
            }
        }
    }

    private static int[] indicesOf(boolean[] keep) {
        int m = 0;
        for (boolean k : keep) {
            if (k) {
                m++;
            }
        }
        int[] out = new int[m];
        m = 0;
        for (int r = 0; r < keep.length; r++) {
            if (keep[r]) {
                out[m++] = r;
            }
        }
        return out;
    }

    /**
     * Adds to each level's shift of column {@code j} the mean of the values minus the shift: the
     * corrected two-pass mean (Chan, Golub &amp; LeVeque 1983, "Algorithms for computing the sample
     * variance: analysis and recommendations", The American Statistician 37(3)). A one-pass mean of
     * values far from zero can miss by more than their spread (the sum's rounding grows with the offset
     * and the row count); every cross-product is then formed around a shift that is off, and the
     * offsets that undo it cancel. Corrected, the shift is within a few units of roundoff of the mean.
     */
    private void correctShifts(double[] x, int j, int[] levelN) {
        double[] residualSum = new double[levels];
        for (int i = 0; i < rows; i++) {
            double v = x[i];
            if (v == v) {
                int l = levels == 1 ? 0 : level[i];
                residualSum[l] += v - levelShift[l][j];
            }
        }
        for (int l = 0; l < levels; l++) {
            if (levelN[l] > 0) {
                levelShift[l][j] += residualSum[l] / levelN[l];
            }
        }
    }

    public int rowCount() {
        return rows;
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
        useFourthMoments = SandwichRoute.fourthMomentsPay(this, hcSpecifications, meanColumns);
        if (useFourthMoments) {
            groupTensors = FourthMoments.groupTensors(this, pool);
        }
        clusterSpecifications.forEach((column, count) -> {
            Integer g = clusterCounts.get(column);
            if (g != null && SandwichRoute.clusterMomentsPay(this, count, meanColumns, g)) {
                useClusterMoments.add(column);
            }
        });
    }

    boolean usesClusterMoments(String column) {
        return useClusterMoments.contains(column);
    }

    /** The per-group third and fourth moments, built on first use. */
    double[][][] groupTensors() {
        double[][][] t = groupTensors;
        if (t == null) {
            synchronized (this) {
                t = groupTensors;
                if (t == null) {
                    t = FourthMoments.groupTensors(this, null);
                    groupTensors = t;
                }
            }
        }
        return t;
    }

    ClusterMoments clusterMoments(String column) {
        return clusterMoments.computeIfAbsent(column, c -> ClusterMoments.build(this, clusters.get(c)));
    }

    public ModelColumns layout() {
        return layout;
    }

    /**
     * The moments of the rows complete on the variables in {@code variableMask} (bit v = model variable
     * v). Cached: specifications with the same usable rows share one.
     */
    public Moments moments(long variables) {
        long variableMask = variables & everMissing;
        Moments cached = momentsByVariables.get(variableMask);
        if (cached != null) {
            return cached;
        }
        BitSet usable = new BitSet(groupMissing.length);
        for (int g = 0; g < groupMissing.length; g++) {
            if ((groupMissing[g] & variableMask) == 0) {
                usable.set(g);
            }
        }
        Moments m = momentsByGroups.computeIfAbsent(usable, u -> new Moments(this, u));
        momentsByVariables.putIfAbsent(variableMask, m);
        return m;
    }
}
