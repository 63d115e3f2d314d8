package org.forkscape.fit;

import java.util.ArrayList;
import java.util.BitSet;
import java.util.HashMap;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.concurrent.ConcurrentHashMap;
import org.forkscape.data.CategoricalColumn;
import org.forkscape.data.Column;
import org.forkscape.data.NumericColumn;
import org.forkscape.data.Table;
import org.forkscape.plan.Decision;
import org.forkscape.plan.ErrorType;
import org.forkscape.plan.MissingRows;
import org.forkscape.plan.Plan;
import org.forkscape.plan.VariableChoice;

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
    final ModelColumns layout;
    final int rows;
    final int columns;
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
    private final Map<Long, Moments> momentsByVariables = new ConcurrentHashMap<>();

    /**
     * Builds the variant. Plan errors that only the data reveal (a log of a non-positive value, a trim
     * on a constant column) are thrown here as {@link org.forkscape.plan.PlanException}.
     */
    public DataVariant(Plan plan, Table table, ModelColumns layout, VariantKey key) {
        this.layout = layout;
        this.columns = layout.size();
        int n = table.rowCount();
        boolean[] keep = new boolean[n];
        java.util.Arrays.fill(keep, true);
        if (plan.missing() == MissingRows.COMMON) {
            for (String name : rawVariables(plan)) {
                Column c = table.column(name);
                for (int r = 0; r < n; r++) {
                    if (c.isMissing(r)) {
                        keep[r] = false;
                    }
                }
            }
        }
        int[] sampleIndex = decisionIndices(plan, Decision.Sample.class);
        RowSelection.apply(plan, table, sampleIndex, key.sampleChoices(), keep);
        int[] sampled = indicesOf(keep);
        String rowsDescription = describeRows(plan, key);

        double[][] raw = new double[columns][];
        int outcomeDecision = decisionIndices(plan, Decision.Outcome.class)[0];
        int predictorDecision = decisionIndices(plan, Decision.Predictor.class)[0];
        List<VariableChoice> outcomes = plan.outcome().alternatives();
        for (int j = 0; j < outcomes.size(); j++) {
            VariableChoice v = outcomes.get(j);
            raw[layout.outcomeColumn(j)] = Transforms.apply(table.column(v.column()), v.transform(), sampled,
                    "decisions[" + outcomeDecision + "].alternatives[" + j + "].transform", rowsDescription);
        }
        List<VariableChoice> predictors = plan.predictor().alternatives();
        for (int j = 0; j < predictors.size(); j++) {
            VariableChoice v = predictors.get(j);
            raw[layout.predictorColumn(j)] = Transforms.apply(table.column(v.column()), v.transform(), sampled,
                    "decisions[" + predictorDecision + "].alternatives[" + j + "].transform", rowsDescription);
        }

        // absorbed fixed effects: rows missing the column cannot be in any specification of this variant
        absorbColumn = key.absorbChoice() < 0 ? null
                : plan.all(Decision.Absorb.class).get(0).alternatives().get(key.absorbChoice()).columns().stream()
                        .findFirst().orElse(null);
        absorbs = absorbColumn != null;
        int[] levelCodes = new int[sampled.length];
        int levelCount = 1;
        int[] kept = sampled;
        if (absorbs) {
            int[] codes = LevelCodes.of(table.column(absorbColumn));
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
        this.level = levelCodes;
        this.levels = levelCount;

        fillControls(plan, table, kept, raw);

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
        for (Decision.Errors e : plan.all(Decision.Errors.class)) {
            for (ErrorType t : e.alternatives()) {
                if (t.kind() == ErrorType.Kind.CLUSTER && !clusters.containsKey(t.clusterColumn())) {
                    int[] all = LevelCodes.of(table.column(t.clusterColumn()));
                    int[] codes = new int[rows];
                    long bit = 1L << layout.variable(t.clusterColumn(), true);
                    int max = -1;
                    for (int i = 0; i < rows; i++) {
                        codes[i] = all[kept[i]];
                        max = Math.max(max, codes[i]);
                        if (codes[i] < 0) {
                            rowMissing[i] |= bit;
                        }
                    }
                    clusters.put(t.clusterColumn(), codes);
                    clusterCounts.put(t.clusterColumn(), max + 1);
                }
            }
        }
        Map<Long, Integer> patterns = new LinkedHashMap<>();
        group = new int[rows];
        for (int i = 0; i < rows; i++) {
            group[i] = patterns.computeIfAbsent(rowMissing[i], p -> patterns.size());
        }
        groupMissing = new long[patterns.size()];
        patterns.forEach((mask, g) -> groupMissing[g] = mask);

        levelShift = new double[levels][columns];
        int[][] shiftCount = new int[levels][columns];
        for (int j = 0; j < columns; j++) {
            double[] x = raw[j];
            for (int i = 0; i < rows; i++) {
                if (!Double.isNaN(x[i])) {
                    levelShift[level[i]][j] += x[i];
                    shiftCount[level[i]][j]++;
                }
            }
            for (int l = 0; l < levels; l++) {
                levelShift[l][j] = shiftCount[l][j] == 0 ? 0 : levelShift[l][j] / shiftCount[l][j];
            }
        }
        shifted = new double[columns][rows];
        for (int j = 0; j < columns; j++) {
            double[] x = raw[j];
            double[] z = shifted[j];
            for (int i = 0; i < rows; i++) {
                z[i] = Double.isNaN(x[i]) ? 0 : x[i] - levelShift[level[i]][j];
            }
        }
        int groups = groupMissing.length;
        cellCount = new int[groups][levels];
        cellSum = new double[groups][levels][];
        cellCross = new double[groups][levels][];
        accumulate();
    }

    private void accumulate() {
        double[] row = new double[columns];
        int p = columns;
        for (int i = 0; i < rows; i++) {
            int g = group[i];
            int l = level[i];
            if (cellSum[g][l] == null) {
                cellSum[g][l] = new double[p];
                cellCross[g][l] = new double[p * p];
            }
            cellCount[g][l]++;
            double[] s = cellSum[g][l];
            double[] cross = cellCross[g][l];
            for (int j = 0; j < p; j++) {
                row[j] = shifted[j][i];
                s[j] += row[j];
            }
            for (int a = 0; a < p; a++) {
                double xa = row[a];
                int base = a * p;
                for (int b = a; b < p; b++) {
                    cross[base + b] += xa * row[b];
                }
            }
        }
        for (double[][] byLevel : cellCross) {
            for (double[] cross : byLevel) {
                if (cross != null) {
                    for (int a = 0; a < p; a++) {
                        for (int b = a + 1; b < p; b++) {
                            cross[b * p + a] = cross[a * p + b];
                        }
                    }
                }
            }
        }
    }

    private void fillControls(Plan plan, Table table, int[] kept, double[][] raw) {
        for (Decision.Controls c : plan.all(Decision.Controls.class)) {
            List<String> names = new ArrayList<>(c.required());
            names.addAll(c.optional());
            if (c.sets() != null) {
                c.sets().values().forEach(names::addAll);
            }
            for (String name : names) {
                int[] cols = layout.controlColumns(name);
                if (cols.length == 0 || raw[cols[0]] != null) {
                    continue;
                }
                Column column = table.column(name);
                if (column instanceof CategoricalColumn cat) {
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
                    double[] x = ((NumericColumn) column).values();
                    double[] d = new double[kept.length];
                    for (int i = 0; i < kept.length; i++) {
                        d[i] = x[kept[i]];
                    }
                    raw[cols[0]] = d;
                }
            }
        }
    }

    /** Every raw column the plan names as a model variable (outcome, predictor, controls, clusters, fixed effects). */
    static List<String> rawVariables(Plan plan) {
        List<String> out = new ArrayList<>();
        plan.outcome().alternatives().forEach(v -> out.add(v.column()));
        plan.predictor().alternatives().forEach(v -> out.add(v.column()));
        for (Decision.Controls c : plan.all(Decision.Controls.class)) {
            out.addAll(c.required());
            out.addAll(c.optional());
            if (c.sets() != null) {
                c.sets().values().forEach(out::addAll);
            }
        }
        for (Decision.Errors e : plan.all(Decision.Errors.class)) {
            e.alternatives().stream().filter(t -> t.kind() == ErrorType.Kind.CLUSTER)
                    .forEach(t -> out.add(t.clusterColumn()));
        }
        for (Decision.Absorb a : plan.all(Decision.Absorb.class)) {
            a.alternatives().forEach(choice -> out.addAll(choice.columns()));
        }
        return out.stream().distinct().toList();
    }

    static int[] decisionIndices(Plan plan, Class<? extends Decision> kind) {
        List<Decision> ds = plan.decisions();
        return java.util.stream.IntStream.range(0, ds.size()).filter(i -> kind.isInstance(ds.get(i))).toArray();
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

    private static String describeRows(Plan plan, VariantKey key) {
        List<Decision.Sample> samples = plan.all(Decision.Sample.class);
        if (samples.isEmpty()) {
            return "over all rows";
        }
        StringBuilder b = new StringBuilder("in the rows kept by ");
        for (int s = 0; s < samples.size(); s++) {
            if (s > 0) {
                b.append(", ");
            }
            b.append(samples.get(s).name()).append(" = ").append(samples.get(s).label(key.sampleChoices()[s]));
        }
        return b.toString();
    }

    public int rowCount() {
        return rows;
    }

    public ModelColumns layout() {
        return layout;
    }

    /**
     * The moments of the rows complete on the variables in {@code variableMask} (bit v = model variable
     * v). Cached: specifications with the same usable rows share one.
     */
    public Moments moments(long variableMask) {
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
