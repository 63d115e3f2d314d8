package org.forkscape.fit;

import java.util.ArrayList;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import org.forkscape.data.CategoricalColumn;
import org.forkscape.data.Column;
import org.forkscape.plan.Decision;
import org.forkscape.plan.ErrorType;
import org.forkscape.plan.Plan;
import org.forkscape.plan.SampleRule;
import org.forkscape.plan.Transform;
import org.forkscape.data.Table;

/**
 * A data variant built from parts of its table (the partitions of a table held on a cluster) by the same
 * coding steps as {@link VariantBuilder}: each part reports what the whole must decide ({@code *Facts},
 * summed or merged across parts), the whole's decisions are handed back to every part as
 * {@link WholeRows}, in the order the steps need them (each trim rule, then the transforms and the fixed
 * effect's levels, then the level shifts), and each part finally sums its cells
 * ({@link PartialStatistics}), which add up to the variant's statistics ({@link #variant}). A part's
 * instance is built over the part's rows; the instance that decides is built over a table with the same
 * columns and levels and no rows. The rows never leave their part.
 */
public final class VariantByParts {
    private final CompiledPlan plan;
    private final Plan source;
    /** Each row's identity for the Poisson bootstrap ({@link PoissonCounts#rowKey}); null when not given. */
    private final long[] rowKeys;
    /** In a draw's copy of a part ({@link #inDraw}): which copy of its row each row is, 0, 1, ...; else null. */
    private final int[] copyOfRow;
    /** In a draw's copy: the cluster columns whose clusters each drawn copy makes new clusters of; else null. */
    private final String[] renewedClusters;
    /** The resampled unit of each row under {@link #unitsOf}, kept for the next draw of the same design. */
    private long[] unitKeys;
    private BootstrapDesign unitsOf;

    /** @param table one part's rows, or (to decide and to build the variant) the columns with no rows */
    public VariantByParts(Plan plan, Table table) {
        this(plan, table, null);
    }

    /**
     * A part whose rows can be resampled by the Poisson bootstrap ({@link #inDraw}).
     *
     * @param rowKeys each row's identity, which must not depend on how the table was cut into parts
     *                ({@link PoissonCounts#rowKey}); not modified
     */
    public VariantByParts(Plan plan, Table table, long[] rowKeys) {
        this(plan, table, rowKeys, null, null);
    }

    private VariantByParts(Plan plan, Table table, long[] rowKeys, int[] copyOfRow, String[] renewedClusters) {
        this.plan = new CompiledPlan(plan, table);
        this.source = plan;
        this.rowKeys = rowKeys;
        this.copyOfRow = copyOfRow;
        this.renewedClusters = renewedClusters;
    }

    // ---- what a part reports

    /** {count, mean, sum of squared deviations} of sample decision {@code sample}'s trim column over the rows kept before it. */
    public double[] trimFacts(VariantKey key, int sample, WholeRows whole) {
        boolean[] keep = RowSelection.kept(plan, key, sample, whole);
        SampleRule.TrimRows t = (SampleRule.TrimRows) rule(key, sample);
        return RowSelection.trimMoments(plan.table.column(t.column()), keep);
    }

    /**
     * Per model column, for each outcome and predictor alternative whose transform depends on the data, its
     * facts over the variant's rows ({@link Transforms#facts}); null entries elsewhere.
     */
    public double[][] transformFacts(VariantKey key, WholeRows whole) {
        int[] sampled = RowSelection.of(plan, key, whole);
        double[][] facts = new double[plan.layout.size()][];
        for (CompiledPlan.CodedVariable v : alternatives()) {
            facts[v.modelColumn()] = Transforms.facts(v.column(), v.transform(), sampled);
        }
        return facts;
    }

    /** The absorbed column's codes present in the variant's rows, ascending (empty when it absorbs nothing). */
    public int[] absorbCodes(VariantKey key, WholeRows whole) {
        Column absorbed = oneAbsorbed(key);
        return absorbed == null ? new int[0] : FixedEffectLevels.presentCodes(absorbed, RowSelection.of(plan, key,
                whole), whole);
    }

    /** The non-missing values of the winsorized alternative at {@code modelColumn} in the variant's rows. */
    public double[] winsorizeValues(VariantKey key, int modelColumn, WholeRows whole) {
        int[] sampled = RowSelection.of(plan, key, whole);
        CompiledPlan.CodedVariable v = alternative(modelColumn);
        double[] x = Transforms.apply(v.column(), Transform.NONE, sampled, v.transformPath(), "");
        return java.util.Arrays.stream(x).filter(d -> !Double.isNaN(d)).toArray();
    }

    /** Per level and model column: {count of non-missing values, their mean} in this part's rows of the variant. */
    public double[][][] shiftFacts(VariantKey key, WholeRows whole) {
        LevelShifts shifts = VariantBuilder.code(plan, key, whole.withLevelShift(null)).shifts();
        double[][][] facts = new double[shifts.levelShift.length][shifts.levelShift[0].length][];
        for (int l = 0; l < facts.length; l++) {
            for (int j = 0; j < facts[l].length; j++) {
                facts[l][j] = new double[] {shifts.nonMissing[l][j], shifts.levelShift[l][j]};
            }
        }
        return facts;
    }

    /** Two parts' facts of a trim or transform as one (either may be null); see {@link Transforms#mergeFacts}. */
    public static double[] mergeFacts(double[] a, double[] b) {
        return Transforms.mergeFacts(a, b);
    }

    /** Two parts' shift facts as one (either may be null): counts add, means by the pairwise update. */
    public static double[][][] mergeShiftFacts(double[][][] a, double[][][] b) {
        if (a == null || b == null) {
            return a == null ? b : a;
        }
        double[][][] out = new double[a.length][a[0].length][];
        for (int l = 0; l < a.length; l++) {
            for (int j = 0; j < a[l].length; j++) {
                double n = a[l][j][0] + b[l][j][0];
                double mean = n == 0 ? 0 : a[l][j][1] + (b[l][j][1] - a[l][j][1]) * b[l][j][0] / n;
                out[l][j] = new double[] {n, mean};
            }
        }
        return out;
    }

    /** This part's cell sums, and as {@code withTensors} asks its fourth moments, with every part's facts in {@code whole}. */
    public PartialStatistics statistics(VariantKey key, WholeRows whole, boolean withTensors) {
        Map<String, long[]> intersections = new HashMap<>();
        // beside two absorbed columns the clusters' cells would be of rows not yet demeaned: their errors come
        // from the clusters' scores over the parts' within values instead (clusterScores)
        boolean cells = !crossed(key);
        CodedRows coded = codedWithClusters(key, whole, cells ? intersections : null);
        DataVariant part = new DataVariant(coded, new CellSums(coded, null));
        List<String> clusters = new ArrayList<>();
        if (cells) {
            for (CompiledPlan.ClusterColumn c : plan.clusterColumns) {
                clusters.add(c.column().name());
            }
        }
        return PartialStatistics.of(part, withTensors, clusters, intersections);
    }

    /**
     * This part coded for the variant, with its clusters as a pass sums them: in a draw's copy the clusters
     * of {@link #renewedClusters} renewed per copy; and into {@code intersections} (modified) the whole
     * table's key of each of the part's clusters of every intersection of cluster columns, renewed alike.
     * With {@code intersections} null (no cluster cells are summed), the coding alone.
     */
    private CodedRows codedWithClusters(VariantKey key, WholeRows whole, Map<String, long[]> intersections) {
        CodedRows coded = VariantBuilder.code(plan, key, whole).coded(plan);
        if (intersections == null) {
            return coded;
        }
        for (ClusterComponents.Component c : plan.clusterIntersections) {
            intersections.put(c.key(), intersectionKeys(coded, whole, c));
        }
        if (renewedClusters != null) {
            for (String column : renewedClusters) {
                long[] keys = intersections.get(column);
                if (keys == null) {
                    renewCopies(coded, whole, column);
                } else {
                    intersections.put(column, renewIntersectionCopies(coded, column, keys));
                }
            }
        }
        return coded;
    }

    /**
     * Per cluster code of the intersection {@code c} in this part (numbered in the part's own order), the key of
     * that cluster over the whole table: its columns' codes, each among the column's clusters over the whole
     * table (its levels, or its distinct values), in mixed radix, so that every part keys a combination alike.
     */
    private long[] intersectionKeys(CodedRows coded, WholeRows whole, ClusterComponents.Component c) {
        int[] local = coded.clusters.get(c.key());
        long[] out = new long[coded.clusterCounts.get(c.key())];
        for (int r = 0; r < local.length; r++) {
            if (local[r] < 0) {
                continue;
            }
            long key = 0;
            for (String column : c.columns()) {
                key = Math.addExact(Math.multiplyExact(key, wholeClusterCount(column, whole)),
                        coded.clusters.get(column)[r]);
            }
            out[local[r]] = key;
        }
        return out;
    }

    /** The clusters of {@code column} over the whole table: its levels, or its distinct values. */
    private int wholeClusterCount(String column, WholeRows whole) {
        Column c = plan.table.column(column);
        return c instanceof CategoricalColumn cat ? cat.levels().size() : whole.groupingValues(column).length;
    }

    // ---- a Poisson bootstrap draw of this part

    /**
     * This part in bootstrap draw {@code draw}: each row repeated as often as its unit's Poisson count
     * ({@link BootstrapDesign}), in row order, copies together. The copy codes and sums exactly as the
     * resampled rows would: every fact the coding needs comes from the observed whole ({@link WholeRows}),
     * so each copy carries its row's observed coded values, as {@link ResampledVariant} has them on one
     * machine. Each drawn copy of a unit is a copy of the clusters nested in it, which become new clusters
     * (code + copy x clusters; Cameron, Gelbach &amp; Miller 2008, Review of Economics and Statistics 90(3)):
     * the clusters of {@code renewed}; the copies of other clusters' rows stay in them.
     *
     * @param renewed the error cluster columns nested in the resampled units ({@link ClusterNesting}); not modified
     */
    public VariantByParts inDraw(BootstrapDesign design, int draw, String[] renewed) {
        if (rowKeys == null) {
            throw new IllegalStateException("a part without row identities cannot be resampled");
        }
        if (unitKeys == null || !design.equals(unitsOf)) {
            unitKeys = design.unitKeys(plan.table, rowKeys);
            unitsOf = design;
        }
        int[] counts = design.counts(unitKeys, draw);
        int total = 0;
        for (int c : counts) {
            total += c;
        }
        int[] rowOf = new int[total];
        int[] copy = new int[total];
        int k = 0;
        for (int r = 0; r < counts.length; r++) {
            for (int c = 0; c < counts[r]; c++) {
                rowOf[k] = r;
                copy[k++] = c;
            }
        }
        return new VariantByParts(source, rowsAt(plan.table, rowOf), null, copy, renewed);
    }

    /** This part's clusters of {@code column} and the units {@code design} resamples them in. */
    public ClusterNesting nesting(String column, BootstrapDesign design) {
        return nesting(List.of(column), design);
    }

    /** This part's clusters of the intersection of {@code columns} and the units {@code design} resamples them in. */
    public ClusterNesting nesting(List<String> columns, BootstrapDesign design) {
        if (rowKeys == null) {
            throw new IllegalStateException("a part without row identities cannot be resampled");
        }
        return ClusterNesting.of(plan.table, rowKeys, columns, design);
    }

    /** The intersections of cluster columns the plan's multi-way error types need, in plan order. */
    List<ClusterComponents.Component> clusterIntersections() {
        return plan.clusterIntersections;
    }

    /** The one-way cluster columns the plan's error types name, in plan order. */
    List<String> clusterColumnNames() {
        List<String> out = new ArrayList<>();
        for (CompiledPlan.ClusterColumn c : plan.clusterColumns) {
            out.add(c.column().name());
        }
        return out;
    }

    /** Draws {@code from} to {@code to - 1}: this part's {@link #statistics} in each, in draw order. */
    public PartialStatistics[] bootstrapStatistics(VariantKey key, WholeRows whole, boolean withTensors,
            BootstrapDesign design, String[] renewed, int from, int to) {
        PartialStatistics[] out = new PartialStatistics[to - from];
        for (int d = from; d < to; d++) {
            out[d - from] = inDraw(design, d, renewed).statistics(key, whole, withTensors);
        }
        return out;
    }

    /** Two parts' statistics of the same draws as one, draw by draw ({@code a} modified and returned). */
    public static PartialStatistics[] addEach(PartialStatistics[] a, PartialStatistics[] b) {
        for (int i = 0; i < a.length; i++) {
            a[i].add(b[i]);
        }
        return a;
    }

    /**
     * Copy c of a cluster becomes cluster code + c G, G the renewed column's clusters over the whole table
     * (its levels, or its distinct values), so that every part numbers the same copy alike.
     */
    private void renewCopies(CodedRows coded, WholeRows whole, String column) {
        int[] codes = coded.clusters.get(column);
        int g = wholeClusterCount(column, whole);
        int copies = 1;
        for (int r = 0; r < codes.length; r++) {
            if (codes[r] >= 0) {
                int copy = copyOfRow[coded.tableRows[r]];
                codes[r] += copy * g;
                copies = Math.max(copies, copy + 1);
            }
        }
        coded.clusterCounts.put(column, Math.multiplyExact(g, copies));
    }

    /**
     * Copy c of an intersection's cluster becomes a cluster of its own: the part's codes are renumbered by
     * (code, copy), and the copy's key over the whole table is the cluster's key times the copies a draw can
     * make, plus c, so that every part keys the same copy alike (the driver numbers them densely,
     * {@link PartialStatistics}). One machine's rule for a nested clustering ({@link ResampledVariant}).
     *
     * @param keys the whole table's key of each of the part's codes ({@link #intersectionKeys})
     * @return the whole table's key of each new code
     */
    private long[] renewIntersectionCopies(CodedRows coded, String key, long[] keys) {
        int[] codes = coded.clusters.get(key);
        long copies = PoissonCounts.maxCount() + 1L;
        Map<Long, Integer> renumbered = new HashMap<>();
        List<Long> out = new ArrayList<>();
        for (int r = 0; r < codes.length; r++) {
            if (codes[r] < 0) {
                continue;
            }
            int copy = copyOfRow[coded.tableRows[r]];
            long whole = Math.addExact(Math.multiplyExact(keys[codes[r]], copies), copy);
            Integer code = renumbered.get(whole);
            if (code == null) {
                code = out.size();
                renumbered.put(whole, code);
                out.add(whole);
            }
            codes[r] = code;
        }
        coded.clusterCounts.put(key, out.size());
        return out.stream().mapToLong(Long::longValue).toArray();
    }

    /** The rows {@code rows} of {@code table} (repeats allowed), in that order. */
    private static Table rowsAt(Table table, int[] rows) {
        List<Column> columns = new ArrayList<>(table.columns().size());
        for (Column c : table.columns()) {
            if (c instanceof CategoricalColumn cat) {
                int[] from = cat.codes();
                int[] to = new int[rows.length];
                for (int i = 0; i < rows.length; i++) {
                    to[i] = from[rows[i]];
                }
                columns.add(new CategoricalColumn(c.name(), to, cat.levels(), cat.typed()));
            } else {
                double[] from = ((org.forkscape.data.NumericColumn) c).values();
                double[] to = new double[rows.length];
                for (int i = 0; i < rows.length; i++) {
                    to[i] = from[rows[i]];
                }
                columns.add(new org.forkscape.data.NumericColumn(c.name(), to));
            }
        }
        return new Table(table.source(), columns);
    }

    // ---- what the whole decides

    /**
     * Builds the variant {@code key} from {@code parts}, in the order its steps need the whole's facts: each
     * trim rule (its column's mean and spread over the rows kept before it), the transforms' statistics, each
     * winsorize's quantiles, the fixed effect's levels present, the level shifts, and last the sufficient
     * statistics. Plan errors that only the data reveal are thrown as on one machine.
     *
     * @param grouping the sorted values of the numeric grouping columns over the whole table
     */
    public DataVariant build(VariantKey key, WholeRows grouping, VariantParts parts) {
        WholeRows facts = grouping;
        for (int s : trimSamples(key)) {
            WholeRows given = facts;
            facts = withTrim(key, s, parts.reduce(part -> part.trimFacts(key, s, given), VariantByParts::mergeFacts),
                    facts);
        }
        WholeRows sampled = facts;
        // a pass over the parts only for what needs one: transforms with facts, an absorbed column's levels
        double[][] transformed = needsTransformFacts() ? parts.reduce(part -> part.transformFacts(key, sampled),
                VariantByParts::mergeAll) : new double[plan.layout.size()][];
        facts = withTransforms(key, transformed, facts);
        for (double[] w : winsorized()) {
            int column = (int) w[0];
            WholeRows given = facts;
            double[] q = parts.quantiles(part -> part.winsorizeValues(key, column, given), w[1], 1 - w[1]);
            facts = facts.withWinsorize(column, q[0], q[1]);
        }
        WholeRows coded = facts;
        int[] codes = oneAbsorbed(key) == null ? null
                : parts.reduce(part -> part.absorbCodes(key, coded), VariantByParts::union);
        facts = facts.withAbsorbCodes(codes == null ? new int[0] : codes);
        WholeRows levelled = facts;
        facts = withShifts(parts.reduce(part -> part.shiftFacts(key, levelled), VariantByParts::mergeShiftFacts),
                facts);
        WholeRows shifted = facts;
        boolean tensors = wantsTensors(key);
        PartialStatistics sum = parts.reduce(part -> part.statistics(key, shifted, tensors), PartialStatistics::add);
        DataVariant variant = variant(key, facts, sum);
        if (crossed(key)) {
            variant.crossedWithin = usable -> crossedWithin(key, shifted, variant, usable, parts);
            // the cluster columns' codes are the whole table's on every part: their one-way scores go in batches
            Map<String, Integer> counts = new HashMap<>();
            for (CompiledPlan.ClusterColumn c : plan.clusterColumns) {
                counts.put(c.column().name(), wholeClusterCount(c.column().name(), shifted));
            }
            variant.wholeClusterCounts = counts;
            countIntersections(key, shifted, variant, parts);
        }
        variant.refitReduction = refits(key, shifted, variant, parts);
        variant.rowPassReduction = batch -> parts.reduce(batch, (part, b) -> part.rowPassSums(key, shifted, b),
                VariantByParts::addSums);
        variant.clusterScoreReduction = (request, cluster) -> parts.reduce(part -> part.clusterScores(key, shifted,
                request, cluster), VariantByParts::addScores);
        variant.glmPassReduction = glmPasses(key, shifted, parts);
        variant.partsFacts = shifted;
        if (tensors && !tensorsFit(variant.groupCount())) {
            throw new org.forkscape.InputException("decisions", "the fourth moments that HC0 and HC1 need without "
                    + "the rows are above the engine's memory bound for them (" + variant.groupCount()
                    + " missing-value patterns of " + variant.layout().size() + " columns); run this plan on one "
                    + "machine (forkscape.jar run)");
        }
        return variant;
    }

    /**
     * The exact within transformation of the usable groups {@code usable} beside two absorbed columns: one pass
     * over the parts for the Schur complement's sums, the driver's solve, and one pass for the within
     * cross-products ({@link CrossedEffectsByParts}).
     */
    private SeveralEffectsWithin crossedWithin(VariantKey key, WholeRows whole, DataVariant variant,
            java.util.BitSet usable, VariantParts parts) {
        long[] masks = CrossedEffectsByParts.masks(variant, usable);
        int[] order = crossedOrder(key, whole);
        int secondLevels = wholeClusterCount(VariantBuilder.absorbedColumns(plan, key)[order[1]].name(), whole);
        CrossedEffectsByParts.SchurSums sums = parts.reduce(part -> part.crossedSchurSums(key, whole, masks),
                CrossedEffectsByParts::add);
        CrossedEffectsByParts.Solved solved = CrossedEffectsByParts.solve(sums == null ? emptySchur(variant,
                secondLevels) : sums, order[0], order[1], wantsLeverages());
        if (!solved.solved() || solved.rows() == 0) {
            return CrossedEffectsByParts.within(solved, new double[variant.columns * variant.columns],
                    variant.weighted);
        }
        // the structures of the row-free routes the variant takes (DataVariant#expect), summed in the same pass
        CrossedEffectsByParts.WithinPass pass = new CrossedEffectsByParts.WithinPass(solved.effects(),
                variant.useFourthMoments, variant.clusterMomentKeys().toArray(new String[0]));
        CrossedEffectsByParts.WithinSums within = parts.reduce(pass, (part, e) -> part.crossedWithinSums(key, whole,
                masks, e), CrossedEffectsByParts.WithinSums::add);
        variant.partsFourthMoments.addAndGet(pass.fourthMoments() ? 1 : 0);
        variant.partsClusterCells.addAndGet(pass.clusterKeys().length);
        return CrossedEffectsByParts.within(solved, pass, within, variant.weighted);
    }

    private static CrossedEffectsByParts.SchurSums emptySchur(DataVariant variant, int secondLevels) {
        CrossedEffectsByParts.SchurSums s = new CrossedEffectsByParts.SchurSums();
        s.firstCodes = new int[0];
        s.schur = new double[secondLevels * secondLevels];
        s.rhs = new double[variant.columns][];
        s.spread = new double[variant.columns][];
        s.link = new int[secondLevels];
        java.util.Arrays.fill(s.link, -1);
        return s;
    }

    /**
     * Beside two absorbed columns: the clusters over the whole table of each intersection of cluster columns, and
     * whether each of them has one row (a unit x period intersection of a panel), whose CR1 meat is then the HC0
     * meat, as one machine finds from its rows ({@link DataVariant#expect}). One pass over the parts' codes per
     * intersection: one that holds A, the column the parts are cut by, has each cluster in one part, so the
     * parts' counts add; another's clusters may span parts, so the parts send their clusters' keys, merged up to
     * {@link #countedKeysAtMost} of them (beyond, it keeps no count: its cells would not fit).
     */
    private void countIntersections(VariantKey key, WholeRows whole, DataVariant variant, VariantParts parts) {
        String first = VariantBuilder.absorbedColumns(plan, key)[crossedOrder(key, whole)[0]].name();
        int cap = countedKeysAtMost(variant.columns);
        for (ClusterComponents.Component c : plan.clusterIntersections) {
            String clusterKey = c.key();
            long clusters;
            long rows;
            if (c.columns().contains(first)) {
                long[] counted = parts.reduce(part -> part.intersectionCount(key, whole, clusterKey),
                        VariantByParts::addCounts);
                clusters = counted[0];
                rows = counted[1];
            } else {
                IntersectionKeys keys = parts.reduce(part -> part.intersectionKeys(key, whole, clusterKey, cap),
                        (a, b) -> IntersectionKeys.merge(a, b, cap));
                clusters = keys.keys == null ? -1 : keys.keys.length;
                rows = keys.rows;
            }
            if (clusters >= 0 && clusters <= Integer.MAX_VALUE) {
                variant.wholeIntersectionClusters.put(c.key(), (int) clusters);
            }
            if (clusters == rows) {
                variant.intersectionClustersAreRows.add(c.key());
            }
        }
    }

    /** The clusters whose cells of {@code columns} model columns fit the engine's memory bound for them. */
    static int countedKeysAtMost(int columns) {
        return (int) Math.min(Integer.MAX_VALUE, SandwichRoute.MAX_TENSOR_DOUBLES / ((long) columns * (columns + 1) / 2));
    }

    /** This part's clusters of the intersection {@code clusterKey} (each in this part alone) and its rows with one. */
    public long[] intersectionCount(VariantKey key, WholeRows whole, String clusterKey) {
        CodedRows coded = VariantBuilder.code(plan, key, whole).coded(plan);
        java.util.BitSet seen = new java.util.BitSet();
        long rows = 0;
        for (int code : coded.clusters.get(clusterKey)) {
            if (code >= 0) {
                seen.set(code);
                rows++;
            }
        }
        return new long[] {seen.cardinality(), rows};
    }

    private static long[] addCounts(long[] a, long[] b) {
        return new long[] {a[0] + b[0], a[1] + b[1]};
    }

    /** A part's (or merged parts') clusters of an intersection, by their keys over the whole table. */
    static final class IntersectionKeys implements java.io.Serializable {
        private static final long serialVersionUID = 1L;
        /** The rows that have a cluster of it. */
        long rows;
        /** The clusters' keys, ascending; null when more than the cap. */
        long[] keys;

        static IntersectionKeys merge(IntersectionKeys a, IntersectionKeys b, int cap) {
            IntersectionKeys out = new IntersectionKeys();
            out.rows = a.rows + b.rows;
            if (a.keys != null && b.keys != null) {
                long[] union = java.util.stream.LongStream.concat(java.util.Arrays.stream(a.keys),
                        java.util.Arrays.stream(b.keys)).sorted().distinct().toArray();
                out.keys = union.length > cap ? null : union;
            }
            return out;
        }
    }

    /** This part's clusters of the intersection {@code clusterKey} keyed over the whole table, at most {@code cap}. */
    public IntersectionKeys intersectionKeys(VariantKey key, WholeRows whole, String clusterKey, int cap) {
        CodedRows coded = VariantBuilder.code(plan, key, whole).coded(plan);
        ClusterComponents.Component c = plan.clusterIntersections.stream().filter(i -> i.key().equals(clusterKey))
                .findFirst().orElseThrow();
        long[] global = intersectionKeys(coded, whole, c);
        java.util.BitSet seen = new java.util.BitSet();
        IntersectionKeys out = new IntersectionKeys();
        for (int code : coded.clusters.get(c.key())) {
            if (code >= 0) {
                seen.set(code);
                out.rows++;
            }
        }
        long[] keys = seen.stream().mapToLong(code -> global[code]).sorted().distinct().toArray();
        out.keys = keys.length > cap ? null : keys;
        return out;
    }

    /** This part's sums of the Schur complement for the usable patterns {@code masks} ({@link CrossedEffectsByParts}). */
    public CrossedEffectsByParts.SchurSums crossedSchurSums(VariantKey key, WholeRows whole, long[] masks) {
        CodedRows coded = VariantBuilder.code(plan, key, whole).coded(plan);
        int[] order = crossedOrder(key, whole);
        int secondLevels = wholeClusterCount(VariantBuilder.absorbedColumns(plan, key)[order[1]].name(), whole);
        return CrossedEffectsByParts.schurSums(coded, crossedCodes(coded, key, whole, order[0], order[1]),
                secondLevels, masks);
    }

    /** This part's share of the within pass {@code pass} over the usable patterns {@code masks}. */
    public CrossedEffectsByParts.WithinSums crossedWithinSums(VariantKey key, WholeRows whole, long[] masks,
            CrossedEffectsByParts.WithinPass pass) {
        // coded with its clusters as a pass sums them: in a draw's copy, the renewed clusters' copies apart (the
        // intersections' keys and the renewal only when the pass sums clusters' cells)
        Map<String, long[]> intersections = pass.clusterKeys().length == 0 ? null : new HashMap<>();
        CodedRows coded = codedWithClusters(key, whole, intersections);
        long[][] keysOfRow = new long[pass.clusterKeys().length][];
        for (int c = 0; c < keysOfRow.length; c++) {
            keysOfRow[c] = wholeClusterKeys(coded, intersections, pass.clusterKeys()[c]);
        }
        return CrossedEffectsByParts.withinSums(coded, crossedCodes(coded, key, whole, pass.effects().first(),
                pass.effects().second()), masks, pass, keysOfRow);
    }

    /**
     * Beside two absorbed columns: each of the part's rows' cluster of {@code clusterKey} keyed over the whole
     * table (a cluster column's codes are the whole table's; an intersection's key is in {@code intersections},
     * per part code, from {@link #codedWithClusters}); -1 where it has none.
     */
    private static long[] wholeClusterKeys(CodedRows coded, Map<String, long[]> intersections, String clusterKey) {
        long[] global = intersections.get(clusterKey);
        int[] codes = coded.clusters.get(clusterKey);
        long[] out = new long[coded.rows];
        for (int r = 0; r < coded.rows; r++) {
            out[r] = codes[r] < 0 ? -1 : global == null ? codes[r] : global[codes[r]];
        }
        return out;
    }

    /** Whether some error type of the plan is HC2 or HC3 (beside two columns they need S's inverse). */
    private boolean wantsLeverages() {
        for (ErrorType e : plan.errorTypes) {
            if (e.kind() == ErrorType.Kind.HC2 || e.kind() == ErrorType.Kind.HC3) {
                return true;
            }
        }
        return false;
    }

    /** Whether the variant absorbs two columns (the runner by parts refuses more). */
    boolean crossed(VariantKey key) {
        return VariantBuilder.absorbedColumns(plan, key).length == 2;
    }

    /** The one column the variant absorbs, or null when none or two. */
    private Column oneAbsorbed(VariantKey key) {
        Column[] columns = VariantBuilder.absorbedColumns(plan, key);
        return columns.length == 1 ? columns[0] : null;
    }

    /**
     * The positions of A (the absorbed column with more levels over the whole table; the first on a tie), which
     * the parts are cut by, and of B, whose effects the driver solves for.
     */
    int[] crossedOrder(VariantKey key, WholeRows whole) {
        Column[] columns = VariantBuilder.absorbedColumns(plan, key);
        int first = wholeClusterCount(columns[0].name(), whole) >= wholeClusterCount(columns[1].name(), whole) ? 0 : 1;
        return new int[] {first, 1 - first};
    }

    /** The whole table's codes of A and B at this part's variant rows. */
    private CrossedEffectsByParts.Codes crossedCodes(CodedRows coded, VariantKey key, WholeRows whole, int first,
            int second) {
        Column[] columns = VariantBuilder.absorbedColumns(plan, key);
        return new CrossedEffectsByParts.Codes(codesAt(columns[first], coded, whole), codesAt(columns[second],
                coded, whole));
    }

    private static int[] codesAt(Column column, CodedRows coded, WholeRows whole) {
        int[] all = LevelCodes.of(column, whole.groupingValues(column.name()));
        int[] out = new int[coded.rows];
        for (int r = 0; r < coded.rows; r++) {
            out[r] = all[coded.tableRows[r]];
        }
        return out;
    }

    /**
     * The columns a pass over this part's rows reads: the level-shifted ones, or beside two absorbed columns
     * the within values of the usable patterns {@code masks} (level 0, offsets 0).
     */
    private double[][] passColumns(CodedRows coded, VariantKey key, WholeRows whole, long[] masks,
            CrossedEffectsByParts.Effects effects) {
        if (effects == null) {
            return coded.shifted;
        }
        return CrossedEffectsByParts.demeaned(coded, crossedCodes(coded, key, whole, effects.first(),
                effects.second()), masks, effects);
    }

    /**
     * The variant {@code key} in one bootstrap draw, from the draw's statistics summed over the parts, coded
     * with the observed variant's facts ({@code facts}); its QR refits, row passes and generalized linear
     * fits' passes reduce {@code drawParts}, the parts in that draw (each row repeated by its count).
     *
     * @param observed the observed variant, whose fits start the draw's generalized linear fits
     * @param renewed  the cluster keys whose drawn copies are clusters of their own ({@link BootstrapByParts#keptWhole})
     */
    DataVariant drawVariant(VariantKey key, WholeRows facts, PartialStatistics sum, VariantParts drawParts,
            DataVariant observed, java.util.Set<String> renewed) {
        DataVariant variant = variant(key, facts, sum);
        variant.drawOf = observed;
        if (crossed(key)) {
            // each set of usable rows solved again over the draw's rows (each part's copies keep their levels)
            variant.crossedWithin = usable -> crossedWithin(key, facts, variant, usable, drawParts);
            variant.expectAsDrawOf(observed, renewed);
        }
        variant.refitReduction = refits(key, facts, variant, drawParts);
        variant.rowPassReduction = batch -> drawParts.reduce(batch, (part, b) -> part.rowPassSums(key, facts, b),
                VariantByParts::addSums);
        variant.glmPassReduction = glmPasses(key, facts, drawParts);
        return variant;
    }

    /**
     * A QR refit's rows from the parts: each part reduces its usable rows' [X y] in within coordinates to
     * its triangular factor, and the factors are stacked and factored again, the tall-skinny QR of Demmel,
     * Grigori, Hoemmen &amp; Langou (2012), "Communication-optimal parallel and sequential QR and LU
     * factorizations", SIAM Journal on Scientific Computing 34(1). One pass over the parts' rows per refit.
     */
    private static DesignRows refitRows(VariantKey key, WholeRows whole, DataVariant variant, Moments mom,
            int[] cols, int y, VariantParts parts) {
        RefitPiece piece = RefitPiece.of(variant, new RefitRequest(mom, cols.clone(), y));
        double[][] factor = parts.reduce(part -> part.refitFactor(key, whole, piece), VariantByParts::stackedFactor);
        return DesignRows.ofFactor(factor == null ? new double[0][] : factor, cols.length);
    }

    /** A variant's QR refits from its parts: one at a time, or a batch in one pass. */
    private static DataVariant.RefitReduction refits(VariantKey key, WholeRows whole, DataVariant variant,
            VariantParts parts) {
        return new DataVariant.RefitReduction() {
            @Override
            public DesignRows rows(Moments mom, int[] cols, int y) {
                return refitRows(key, whole, variant, mom, cols, y, parts);
            }

            /**
             * Each part reduces its rows of every refit of the batch to their factors, merged refit by refit
             * in part order exactly as {@link #rows} merges one, so a factor has the same bits either way.
             */
            @Override
            public double[][][] factors(List<RefitRequest> requests) {
                RefitPiece[] pieces = requests.stream().map(r -> RefitPiece.of(variant, r)).toArray(RefitPiece[]::new);
                return parts.reduce(pieces, (part, p) -> part.refitFactors(key, whole, p),
                        VariantByParts::stackedFactors);
            }
        };
    }

    /** What a part needs of one refit: the usable missing patterns, the level offsets, columns and outcome. */
    record RefitPiece(long[] usableMasks, double[][] offsets, int[] columns, int outcome,
            CrossedEffectsByParts.Effects crossedEffects) implements java.io.Serializable {
        static RefitPiece of(DataVariant variant, RefitRequest r) {
            long[] usable = r.rows().usableGroups.stream().mapToLong(g -> variant.groupMissing[g]).sorted().toArray();
            return new RefitPiece(usable, r.rows().levelMeanOffset, r.columns(), r.outcome(),
                    r.rows().crossedEffects);
        }
    }

    /** This part's factors of a batch of refits ({@link #refitFactor}), coded once. */
    public double[][][] refitFactors(VariantKey key, WholeRows whole, RefitPiece[] pieces) {
        CodedRows coded = VariantBuilder.code(plan, key, whole).coded(plan);
        double[][][] out = new double[pieces.length][][];
        for (int i = 0; i < pieces.length; i++) {
            out[i] = refitFactor(coded, passColumns(coded, key, whole, pieces[i].usableMasks(),
                    pieces[i].crossedEffects()), pieces[i]);
        }
        return out;
    }

    private static double[][][] stackedFactors(double[][][] a, double[][][] b) {
        for (int i = 0; i < a.length; i++) {
            a[i] = stackedFactor(a[i], b[i]);
        }
        return a;
    }

    /** This part's factor of one refit ({@link #refitFactor(CodedRows, RefitPiece)}). */
    public double[][] refitFactor(VariantKey key, WholeRows whole, RefitPiece piece) {
        CodedRows coded = VariantBuilder.code(plan, key, whole).coded(plan);
        return refitFactor(coded, passColumns(coded, key, whole, piece.usableMasks(), piece.crossedEffects()), piece);
    }

    /**
     * This part's rows among the refit's usable missing patterns, its columns and outcome in within
     * coordinates (minus the usable rows' level means around the shifts), reduced to their triangular factor
     * (at most columns + 1 rows). In a weighted variant the level means are weighted and each row is scaled
     * by the square root of its weight after centring, as {@link DesignRows} scales it on one machine, so the
     * factor is that of weighted least squares.
     */
    private static double[][] refitFactor(CodedRows coded, double[][] values, RefitPiece piece) {
        long[] usableMasks = piece.usableMasks();
        double[][] offsets = piece.offsets();
        int[] cols = piece.columns();
        int y = piece.outcome();
        java.util.Set<Long> usable = new java.util.HashSet<>();
        for (long m : usableMasks) {
            usable.add(m);
        }
        List<double[]> rows = new ArrayList<>();
        for (int r = 0; r < coded.rows; r++) {
            if (!usable.contains(coded.groupMissing[coded.group[r]])) {
                continue;
            }
            double[] off = offsets[coded.level[r]];
            double root = coded.weight == null ? 1 : Math.sqrt(coded.weight[r]);
            double[] row = new double[cols.length + 1];
            for (int j = 0; j < cols.length; j++) {
                row[j] = (values[cols[j]][r] - off[cols[j]]) * root;
            }
            row[cols.length] = (values[y][r] - off[y]) * root;
            rows.add(row);
        }
        return triangular(rows.toArray(new double[0][]));
    }

    /**
     * This part's share of each requested specification's HC0 to HC3 meat: the engine's row pass
     * ({@link KeyCoefficientSandwich#partSum}) over this part's rows among the request's usable missing
     * patterns, in within coordinates by the request's level offsets, with its leverages from the whole
     * specification's level counts. One double per request (NaN where a row's leverage is one); what the
     * part holds besides its coding is one array of row numbers, reused from request to request.
     */
    public double[] rowPassSums(VariantKey key, WholeRows whole, RowPassRequest[] batch) {
        CodedRows coded = VariantBuilder.code(plan, key, whole).coded(plan);
        KeyCoefficientSandwich sandwich = new KeyCoefficientSandwich();
        KeyCoefficientSandwich.RowView view = new KeyCoefficientSandwich.RowView();
        int[] rows = new int[coded.rows];
        int n = 0;
        long[] rowsOf = null;
        int length = 0;
        for (RowPassRequest r : batch) {
            length += r.answerLength();
        }
        double[] out = new double[length];
        int at = 0;
        double[][] values = coded.shifted;
        CrossedEffectsByParts.Effects effectsOf = null;
        DummyLeverage dummies = null;
        for (int i = 0; i < batch.length; i++) {
            RowPassRequest r = batch[i];
            boolean leverage = r.kind == ErrorType.Kind.HC2 || r.kind == ErrorType.Kind.HC3;
            if (!java.util.Arrays.equals(r.usableMasks, rowsOf) || r.crossedEffects != effectsOf) {
                // one set's requests share its effects (one object in the broadcast batch): demeaned once for them
                values = passColumns(coded, key, whole, r.usableMasks, r.crossedEffects);
                effectsOf = r.crossedEffects;
                dummies = null;
                n = 0;
                for (int row = 0; row < coded.rows; row++) {
                    if (java.util.Arrays.binarySearch(r.usableMasks, coded.groupMissing[coded.group[row]]) >= 0) {
                        rows[n++] = row;
                    }
                }
                rowsOf = r.usableMasks;
            }
            view.overPart(values, coded.level, r.kept, r.y, rows, n, r.levelOffsets, r.levelCounts,
                    coded.weight, r.levelWeights);
            if (leverage && r.crossedEffects != null && dummies == null) {
                dummies = CrossedLeverageByParts.of(coded, crossedCodes(coded, key, whole,
                        r.crossedEffects.first(), r.crossedEffects.second()), r.usableMasks, r.crossedEffects);
            }
            // beside two absorbed columns the dummies' part of the leverages is the crossed one
            view.withDummyLeverage(r.crossedEffects == null ? null : dummies);
            if (r.clusterColumn == null) {
                out[at] = sandwich.partSum(view, r.kept.length, r.b, r.w, r.m, r.kind);
            } else {
                // the clusters' scores as clusterScores sums them, by the variant's code (the same on every part)
                KeyCoefficientSandwich.withClusters(view, coded.clusters.get(r.clusterColumn),
                        coded.clusterCounts.get(r.clusterColumn));
                double[] scores = sandwich.partClusterScores(view, r.kept.length, r.b, r.w);
                for (int g = 0; g < scores.length && g < r.clusters; g++) {
                    if (!Double.isNaN(scores[g])) {
                        out[at + g] = scores[g];
                        out[at + r.clusters + g] = 1;
                    }
                }
            }
            at += r.answerLength();
        }
        return out;
    }

    /**
     * This part's score of each cluster of {@code clusterKey} (a cluster column, or an intersection's key) for
     * one specification: the engine's row pass ({@link KeyCoefficientSandwich#partClusterScores}) over this
     * part's rows among the request's usable missing patterns, in within coordinates by the request's level
     * offsets, weighted as {@link #rowPassSums} weighs, keyed by the cluster's code over the whole table (an
     * intersection's key, {@link #intersectionKeys}), in key order.
     */
    public java.util.TreeMap<Long, Double> clusterScores(VariantKey key, WholeRows whole, RowPassRequest r,
            String clusterKey) {
        CodedRows coded = VariantBuilder.code(plan, key, whole).coded(plan);
        ClusterComponents.Component intersection = plan.clusterIntersections.stream()
                .filter(c -> c.key().equals(clusterKey)).findFirst().orElse(null);
        long[] global = intersection == null ? null : intersectionKeys(coded, whole, intersection);
        int[] rows = new int[coded.rows];
        int n = 0;
        for (int row = 0; row < coded.rows; row++) {
            if (java.util.Arrays.binarySearch(r.usableMasks, coded.groupMissing[coded.group[row]]) >= 0) {
                rows[n++] = row;
            }
        }
        KeyCoefficientSandwich.RowView view = new KeyCoefficientSandwich.RowView().overPart(passColumns(coded, key,
                whole, r.usableMasks, r.crossedEffects), coded.level, r.kept, r.y, rows, n, r.levelOffsets,
                r.levelCounts, coded.weight, r.levelWeights);
        KeyCoefficientSandwich.withClusters(view, coded.clusters.get(clusterKey), coded.clusterCounts.get(clusterKey));
        double[] scores = new KeyCoefficientSandwich().partClusterScores(view, r.kept.length, r.b, r.w);
        java.util.TreeMap<Long, Double> out = new java.util.TreeMap<>();
        for (int g = 0; g < scores.length; g++) {
            if (!Double.isNaN(scores[g])) {
                out.put(global == null ? g : global[g], scores[g]);
            }
        }
        return out;
    }

    /**
     * This part's sums of each pass of a generalized linear fit in the batch ({@link GlmPassRequest}): the
     * part's share of the specification's rows ({@link GlmRows#fillPart}), then the engine's own pass over
     * rows for that kind: {@link Irls#outcomeSums}, {@link GlmLikelihoods#nullSums} and
     * {@link MarginalEffect#otherThanZeroOrOne} at the start; {@link Irls#partSums} at a point;
     * {@link GeneralizedLinear#marginSums} and {@link GlmCovariance#partMeat} at the estimate; the triangular
     * factor of the weighted within design where the fit factors by QR. Each answer adds over parts, or
     * for the factor stacks ({@link #mergeEach}).
     */
    public double[][] glmPassSums(VariantKey key, WholeRows whole, GlmPassRequest[] batch) {
        Map<String, long[]> intersections = new HashMap<>();
        CodedRows coded = codedWithClusters(key, whole, intersections);
        GlmRows rows = new GlmRows();
        Irls irls = new Irls();
        double[][] out = new double[batch.length][];
        for (int i = 0; i < batch.length; i++) {
            GlmPassRequest r = batch[i];
            rows.fillPart(coded, r.rows);
            int levels = r.rows.levels();
            int p = r.rows.columns().length;
            out[i] = switch (r.kind) {
                case START -> {
                    double[] sums = new double[r.layout()];
                    double[] outcome = Irls.outcomeSums(rows, new double[2 * levels]);
                    double[] nulls = GlmLikelihoods.nullSums(rows, r.family(), new double[2 * levels + 2]);
                    System.arraycopy(outcome, 0, sums, 0, 2 * levels);
                    System.arraycopy(nulls, 0, sums, 2 * levels, 2 * levels + 2);
                    sums[4 * levels + 2] = MarginalEffect.otherThanZeroOrOne(rows,
                            coded.recorded[r.rows.columns()[p - 1]]);
                    yield sums;
                }
                case EVALUATE -> irls.partSums(rows, r.family(), r.alpha, r.beta);
                case MARGINS -> {
                    irls.partSums(rows, r.family(), r.alpha, r.beta);
                    double[] gradientLevels = new double[levels];
                    double[] gradientColumns = new double[p];
                    double[] sums = GeneralizedLinear.marginSums(rows, irls, r.family(),
                            coded.recorded[r.rows.columns()[p - 1]], r.twoValued, r.beta[p - 1],
                            new double[rows.n], gradientLevels, gradientColumns);
                    double[] all = new double[r.layout()];
                    all[0] = sums[0];
                    all[1] = sums[1];
                    System.arraycopy(gradientLevels, 0, all, 2, levels);
                    System.arraycopy(gradientColumns, 0, all, 2 + levels, p);
                    yield all;
                }
                case ORTHOGONAL -> {
                    irls.partSums(rows, r.family(), r.alpha, r.beta);
                    yield orthogonalFactor(rows, irls.weight, r.levelMean, r.kept);
                }
                case MEAT -> {
                    // its own fit: the meat takes the driver's information into the fit's arrays
                    Irls atEstimate = new Irls();
                    atEstimate.partSums(rows, r.family(), r.alpha, r.beta);
                    yield new GlmCovariance().partMeat(atEstimate, rows, r, glmClusterCodes(coded, intersections,
                            r.rows, rows));
                }
            };
        }
        return out;
    }

    /**
     * Per component of a generalized linear fit's cluster error type, the code of each of the part's rows of
     * it ({@link GlmRows#source}) among the variant's clusters: a column's own code, the same on every part;
     * an intersection's the rank of its key over the whole table ({@link #intersectionKeys}, given in
     * {@code intersections}) among the variant's keys. In a draw's copy, the codes and keys of the clusters
     * nested in the resampled units are those of the copies ({@link #codedWithClusters}), as the draw's
     * statistics number them. Null without clusters.
     */
    private int[][] glmClusterCodes(CodedRows coded, Map<String, long[]> intersections, GlmPassRequest.Rows r,
            GlmRows rows) {
        String[] keys = r.clusterKeys();
        if (keys.length == 0) {
            return null;
        }
        int[][] out = new int[keys.length][rows.n];
        for (int c = 0; c < keys.length; c++) {
            int[] local = coded.clusters.get(keys[c]);
            long[] ascending = r.intersectionKeys()[c];
            long[] global = ascending == null ? null : intersections.get(keys[c]);
            for (int k = 0; k < rows.n; k++) {
                int code = local[rows.source[k]];
                out[c][k] = global == null ? code : java.util.Arrays.binarySearch(ascending, global[code]);
            }
        }
        return out;
    }

    /** Two parts' cluster scores as one, cluster by cluster ({@code a} modified and returned). */
    static java.util.TreeMap<Long, Double> addScores(java.util.TreeMap<Long, Double> a,
            java.util.TreeMap<Long, Double> b) {
        b.forEach((cluster, score) -> a.merge(cluster, score, Double::sum));
        return a;
    }

    /** A variant's passes of its generalized linear fits over {@code parts}, merged by {@link #mergeEach}. */
    private static DataVariant.GlmPassReduction glmPasses(VariantKey key, WholeRows whole, VariantParts parts) {
        return batch -> {
            boolean[] stacked = new boolean[batch.length];
            for (int i = 0; i < batch.length; i++) {
                stacked[i] = batch[i].stacked();
            }
            return parts.reduce(batch, (part, b) -> part.glmPassSums(key, whole, b), (a, b) -> mergeEach(stacked, a, b));
        };
    }

    /**
     * Two parts' answers to a batch of passes as one, pass by pass ({@code a} modified and returned): added,
     * or where {@code stacked}, their p x p factors stacked and factored again ({@link #squareFactor}).
     */
    static double[][] mergeEach(boolean[] stacked, double[][] a, double[][] b) {
        for (int i = 0; i < a.length; i++) {
            if (stacked[i]) {
                int p = (int) Math.round(Math.sqrt(a[i].length));
                a[i] = squareFactor(stackedFactor(unflatten(a[i], p), unflatten(b[i], p)), p);
            } else {
                addSums(a[i], b[i]);
            }
        }
        return a;
    }

    /** Rows of this many at most are factored at once by {@link #orthogonalFactor}. */
    private static final int FACTOR_CHUNK = 4096;

    /**
     * A part's share of a GLM's QR pass ({@link GlmPassRequest.Kind#ORTHOGONAL}): the triangular factor of
     * its rows of W^1/2 (X - M) over the columns {@code considered} (the others 0), by chunks of rows each
     * stacked on the factor so far (the tall-skinny QR above, within the part), so the part's rows are never
     * held as one matrix.
     */
    private static double[] orthogonalFactor(GlmRows rows, double[] weight, double[] levelMean, boolean[] considered) {
        int p = rows.p;
        double[][] factor = new double[0][];
        for (int from = 0; from < rows.n; from += FACTOR_CHUNK) {
            int to = Math.min(rows.n, from + FACTOR_CHUNK);
            double[][] chunk = new double[to - from][p];
            for (int i = from; i < to; i++) {
                double root = Math.sqrt(weight[i]);
                int level = rows.level[i] * p;
                for (int j = 0; j < p; j++) {
                    if (considered[j]) {
                        chunk[i - from][j] = root * (rows.x[i * p + j] - levelMean[level + j]);
                    }
                }
            }
            factor = triangular(stackedOrFirst(factor, chunk));
        }
        return squareFactor(factor, p);
    }

    private static double[][] stackedOrFirst(double[][] a, double[][] b) {
        if (a.length == 0) {
            return b;
        }
        double[][] both = new double[a.length + b.length][];
        System.arraycopy(a, 0, both, 0, a.length);
        System.arraycopy(b, 0, both, a.length, b.length);
        return both;
    }

    /** A factor of at most p rows as p x p, row-major, rows of zeros below its own (which change no product R'R). */
    private static double[] squareFactor(double[][] factor, int p) {
        double[] out = new double[p * p];
        for (int i = 0; i < Math.min(p, factor.length); i++) {
            System.arraycopy(factor[i], 0, out, i * p, p);
        }
        return out;
    }

    private static double[][] unflatten(double[] square, int p) {
        double[][] out = new double[p][];
        for (int i = 0; i < p; i++) {
            out[i] = java.util.Arrays.copyOfRange(square, i * p, (i + 1) * p);
        }
        return out;
    }

    /** Two parts' meats as one, specification by specification ({@code a} modified and returned). */
    static double[] addSums(double[] a, double[] b) {
        for (int i = 0; i < a.length; i++) {
            a[i] += b[i];
        }
        return a;
    }

    /** Two parts' factors as one: stacked, and factored again when that leaves more rows than columns. */
    static double[][] stackedFactor(double[][] a, double[][] b) {
        double[][] both = new double[a.length + b.length][];
        System.arraycopy(a, 0, both, 0, a.length);
        System.arraycopy(b, 0, both, a.length, b.length);
        return triangular(both);
    }

    /**
     * The triangular factor R of {@code rows} by Householder QR (Commons Math's {@code QRDecomposition}),
     * its first min(m, n) rows; rows no more numerous than columns are returned as they are.
     */
    private static double[][] triangular(double[][] rows) {
        if (rows.length == 0 || rows.length <= rows[0].length) {
            return rows;
        }
        int n = rows[0].length;
        double[][] r = new org.apache.commons.math3.linear.QRDecomposition(
                new org.apache.commons.math3.linear.Array2DRowRealMatrix(rows, false), 0).getR().getData();
        return java.util.Arrays.copyOf(r, n);
    }

    private static double[][] mergeAll(double[][] a, double[][] b) {
        double[][] out = new double[a.length][];
        for (int j = 0; j < a.length; j++) {
            out[j] = Transforms.mergeFacts(a[j], b[j]);
        }
        return out;
    }

    private static int[] union(int[] a, int[] b) {
        return java.util.stream.IntStream.concat(java.util.stream.IntStream.of(a), java.util.stream.IntStream.of(b))
                .distinct().sorted().toArray();
    }

    /** The sample decisions (positions among them) whose chosen alternative in {@code key} is a trim, in order. */
    int[] trimSamples(VariantKey key) {
        List<Integer> out = new ArrayList<>();
        for (int s = 0; s < plan.samples.length; s++) {
            if (rule(key, s) instanceof SampleRule.TrimRows) {
                out.add(s);
            }
        }
        return out.stream().mapToInt(Integer::intValue).toArray();
    }

    /** With the trim of sample decision {@code sample} from every part's merged facts, refused as the engine refuses it. */
    WholeRows withTrim(VariantKey key, int sample, double[] facts, WholeRows whole) {
        SampleRule.TrimRows t = (SampleRule.TrimRows) rule(key, sample);
        long n = (long) facts[0];
        double sd = n > 1 ? Math.sqrt(facts[2] / (n - 1)) : 0;
        RowSelection.requireSpread(t.column(), n, sd, "decisions[" + plan.sampleAt[sample] + "].alternatives["
                + key.sampleChoices()[sample] + "].trim");
        return whole.withTrim(sample, facts[1], sd);
    }

    /** With every standardize's mean and spread from the merged facts; a transform that cannot apply is refused here. */
    WholeRows withTransforms(VariantKey key, double[][] facts, WholeRows whole) {
        WholeRows out = whole;
        for (CompiledPlan.CodedVariable v : alternatives()) {
            double[] given = Transforms.check(v.column().name(), v.transform(), facts[v.modelColumn()],
                    v.transformPath(), plan.describeRows(key.sampleChoices()));
            if (given != null) {
                out = out.withStandardize(v.modelColumn(), given[0], given[1]);
            }
        }
        return out;
    }

    /** Whether some outcome or predictor alternative's transform depends on the data ({@link Transforms#facts}). */
    private boolean needsTransformFacts() {
        return alternatives().stream().anyMatch(v -> !(v.column() instanceof CategoricalColumn
                || v.transform() instanceof Transform.Identity));
    }

    /** Model columns of the winsorized outcome and predictor alternatives, with their fractions. */
    List<double[]> winsorized() {
        List<double[]> out = new ArrayList<>();
        for (CompiledPlan.CodedVariable v : alternatives()) {
            if (v.transform() instanceof Transform.Winsorize w) {
                out.add(new double[] {v.modelColumn(), w.fraction()});
            }
        }
        return out;
    }

    /** With the level shifts from every part's merged {@link #shiftFacts}. */
    WholeRows withShifts(double[][][] facts, WholeRows whole) {
        double[][] shift = new double[facts.length][facts[0].length];
        for (int l = 0; l < facts.length; l++) {
            for (int j = 0; j < facts[l].length; j++) {
                shift[l][j] = facts[l][j][0] == 0 ? 0 : facts[l][j][1];
            }
        }
        return whole.withLevelShift(shift);
    }

    /**
     * Whether the variant's specifications need the fourth-moment tensors: some error type is HC0 or HC1
     * and the variant absorbs nothing (the tensors' route does not cover absorbed fixed effects).
     */
    boolean wantsTensors(VariantKey key) {
        if (VariantBuilder.absorbedColumns(plan, key).length > 0) {
            return false;
        }
        for (ErrorType e : plan.errorTypes) {
            if (e.kind() == ErrorType.Kind.HC0 || e.kind() == ErrorType.Kind.HC1) {
                return true;
            }
        }
        return false;
    }

    /** Whether the tensors of {@code groups} missing patterns stay within the engine's memory bound for them. */
    boolean tensorsFit(int groups) {
        long perGroup = FourthMoments.distinctFourth(plan.layout.size()) + FourthMoments.distinctThird(plan.layout.size());
        return perGroup * groups <= SandwichRoute.MAX_TENSOR_DOUBLES;
    }

    /** The variant the solvers read, from the sum of every part's statistics and the facts they shared. */
    DataVariant variant(VariantKey key, WholeRows whole, PartialStatistics sum) {
        Column[] absorbed = VariantBuilder.absorbedColumns(plan, key);
        if (absorbed.length > 1) {
            // every row at level 0, as one machine codes them (FixedEffectLevels), the columns' names joined
            String names = String.join(", ", java.util.Arrays.stream(absorbed).map(Column::name).toList());
            return sum.variant(plan.layout, 1, names, whole.levelShift(), absorbed.length);
        }
        int levels = absorbed.length == 0 ? 1 : Math.max(1, whole.absorbCodes().length);
        return sum.variant(plan.layout, levels, absorbed.length == 0 ? null : absorbed[0].name(), whole.levelShift(),
                0);
    }

    /** The plan this was compiled from. */
    public Plan plan() {
        return source;
    }

    private SampleRule rule(VariantKey key, int sample) {
        Decision.Sample d = plan.samples[sample];
        return d.alternatives().get(key.sampleChoices()[sample]);
    }

    private List<CompiledPlan.CodedVariable> alternatives() {
        List<CompiledPlan.CodedVariable> all = new ArrayList<>(List.of(plan.outcomes));
        all.addAll(List.of(plan.predictors));
        return all;
    }

    private CompiledPlan.CodedVariable alternative(int modelColumn) {
        return alternatives().stream().filter(v -> v.modelColumn() == modelColumn).findFirst().orElseThrow();
    }
}
