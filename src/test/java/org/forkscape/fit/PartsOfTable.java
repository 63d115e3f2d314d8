package org.forkscape.fit;

import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.SplittableRandom;
import java.util.concurrent.ExecutorService;
import org.forkscape.data.CategoricalColumn;
import org.forkscape.data.Column;
import org.forkscape.data.NumericColumn;
import org.forkscape.data.Table;
import org.forkscape.plan.Plan;

/**
 * For tests of the Poisson bootstrap by parts without Spark: a table cut into consecutive slices, each a
 * part with its rows' identities, as the Spark runner holds partitions; the one-machine draw of the same
 * counts by {@link ResampledVariant}; and an invented clustered table.
 */
public final class PartsOfTable {
    /** No absorbed effects: classical, HC1 (from the fourth moments by parts) and school clusters. */
    public static final String ROWS_PLAN = """
            {"data": "schools.csv",
             "decisions": [
               {"name": "outcome", "kind": "outcome", "alternatives": [
                  {"label": "first measure", "column": "y"},
                  {"label": "second measure, standardized", "column": "y2", "transform": "standardize"}]},
               {"name": "key", "kind": "predictor", "alternatives": [{"label": "x", "column": "x"}]},
               {"name": "controls", "kind": "controls", "optional": ["a", "b"]},
               {"name": "rows", "kind": "sample", "alternatives": [
                  {"label": "all"}, {"label": "b above -1", "keep": "b > -1"}]},
               {"name": "errors", "kind": "errors", "alternatives": ["classical", "HC1", "cluster:school"]}
             ]}
            """;

    /** A district fixed effect absorbed or not, with classical and school-clustered errors. */
    public static final String SCHOOLS_PLAN = """
            {"data": "schools.csv",
             "decisions": [
               {"name": "outcome", "kind": "outcome", "alternatives": [{"label": "first measure", "column": "y"}]},
               {"name": "key", "kind": "predictor", "alternatives": [{"label": "x", "column": "x"}]},
               {"name": "controls", "kind": "controls", "optional": ["a", "b"]},
               {"name": "effects", "kind": "absorb", "alternatives": [
                  {"label": "none", "columns": []}, {"label": "district", "columns": ["district"]}]},
               {"name": "errors", "kind": "errors", "alternatives": ["classical", "cluster:school"]}
             ]}
            """;

    /**
     * Errors clustered on classes (nested in schools) and on districts (which hold several schools), for draws
     * of whole schools: each drawn copy of a school makes new classes, while its rows stay in their district.
     */
    public static final String CLASSES_PLAN = """
            {"data": "schools.csv",
             "decisions": [
               {"name": "outcome", "kind": "outcome", "alternatives": [{"label": "first measure", "column": "y"}]},
               {"name": "key", "kind": "predictor", "alternatives": [{"label": "x", "column": "x"}]},
               {"name": "controls", "kind": "controls", "optional": ["a", "b"]},
               {"name": "errors", "kind": "errors", "alternatives": ["cluster:class", "cluster:district"]}
             ]}
            """;

    private PartsOfTable() {
    }

    /** The identities of a table read from one file named {@code fileName}: that name and each row's index. */
    public static long[] rowKeys(String fileName, int rows) {
        long file = PoissonCounts.textHash(fileName);
        long[] keys = new long[rows];
        for (int r = 0; r < rows; r++) {
            keys[r] = PoissonCounts.rowKey(file, r);
        }
        return keys;
    }

    /** Variants and bootstrap draws from {@code slices} consecutive slices of the table's rows. */
    public static VariantSource source(Plan plan, Table table, long[] rowKeys, int slices) {
        List<VariantByParts> parts = new ArrayList<>();
        int n = table.rowCount();
        for (int s = 0; s < slices; s++) {
            int from = s * n / slices;
            int to = (s + 1) * n / slices;
            parts.add(new VariantByParts(plan, VariantByPartsTest.slice(table, from, to),
                    Arrays.copyOfRange(rowKeys, from, to)));
        }
        VariantByParts decider = new VariantByParts(plan, table);
        WholeRows grouping = WholeRows.NONE.withGroupingValues(VariantByPartsTest.numericGroupingValues(table));
        VariantParts inMemory = VariantByPartsTest.inMemory(parts);
        return new VariantSource() {
            private final java.util.Map<VariantKey, DataVariant> built = new java.util.concurrent.ConcurrentHashMap<>();

            @Override
            public DataVariant variant(VariantKey key, ExecutorService pool) {
                return built.computeIfAbsent(key, k -> decider.build(k, grouping, inMemory));
            }

            @Override
            public BootstrapByParts bootstrap(BootstrapDesign design) {
                return new BootstrapByParts(decider, inMemory, design);
            }
        };
    }

    /**
     * One machine's fit of every given specification in a draw with the same counts: the in-memory variant's
     * rows repeated by {@link ResampledVariant}, whole clusters' copies made new clusters as it decides.
     *
     * @param inMemory the observed variant holding its rows
     * @return one fit per specification, null where it cannot be fitted in the draw
     */
    public static DrawFit[] oneMachine(DataVariant inMemory, int predictors, List<SpecificationModel> specs,
            Table table, long[] rowKeys, BootstrapDesign design, int draw) {
        long[] units = design.unitKeys(table, rowKeys);
        int[] counts = design.counts(units, draw);
        int[] unitOf = null;
        if (design.resampledColumn() != null) {
            // the resampled unit of each table row, numbered in order of first appearance of its key
            java.util.Map<Long, Integer> number = new java.util.HashMap<>();
            unitOf = new int[units.length];
            for (int r = 0; r < units.length; r++) {
                unitOf[r] = number.computeIfAbsent(units[r], k -> number.size());
            }
        }
        ResampledVariant rv = new ResampledVariant(inMemory, predictors);
        rv.bootstrap(counts, unitOf);
        DrawFit[] out = new DrawFit[specs.size()];
        for (int i = 0; i < out.length; i++) {
            out[i] = rv.fit(specs.get(i));
        }
        return out;
    }

    /**
     * Invented pupils in schools: {@code schools} schools of {@code pupils} pupils, a key predictor x and two
     * outcome measures y and y2 each with an intra-school correlation of {@code icc}, plus {@code effect} x in
     * y; controls a (with about 5% of its cells missing) and b; the school as text ("s000", ...), three classes
     * per school as text ("s000-0", ...), and a numeric district (school mod 7) as a coarser grouping.
     */
    public static Table schools(long seed, int schools, int pupils, double icc, double effect) {
        SplittableRandom r = new SplittableRandom(seed);
        int n = schools * pupils;
        double[] x = new double[n];
        double[] y = new double[n];
        double[] y2 = new double[n];
        double[] a = new double[n];
        double[] b = new double[n];
        double[] district = new double[n];
        int[] school = new int[n];
        int[] classOf = new int[n];
        List<String> levels = new ArrayList<>();
        List<String> classes = new ArrayList<>();
        double shared = Math.sqrt(icc);
        double own = Math.sqrt(1 - icc);
        for (int k = 0; k < schools; k++) {
            levels.add(String.format("s%03d", k));
            for (int c = 0; c < 3; c++) {
                classes.add(String.format("s%03d-%d", k, c));
            }
            double gx = gaussian(r);
            double gy = gaussian(r);
            double gy2 = gaussian(r);
            for (int i = k * pupils; i < (k + 1) * pupils; i++) {
                school[i] = k;
                classOf[i] = 3 * k + i % 3;
                district[i] = k % 7;
                x[i] = shared * gx + own * gaussian(r);
                a[i] = r.nextDouble() < 0.05 ? Double.NaN : gaussian(r);
                b[i] = gaussian(r);
                y[i] = effect * x[i] + shared * gy + own * gaussian(r) + 0.3 * b[i];
                y2[i] = 0.6 * y[i] + 0.8 * (shared * gy2 + own * gaussian(r));
            }
        }
        List<Column> cols = List.of(new NumericColumn("y", y), new NumericColumn("y2", y2), new NumericColumn("x", x),
                new NumericColumn("a", a), new NumericColumn("b", b), new CategoricalColumn("school", school, levels),
                new CategoricalColumn("class", classOf, classes), new NumericColumn("district", district));
        return new Table("schools.csv", cols);
    }

    /**
     * Invented pupils in {@code schools} schools of 12 ({@link #schools}, an effect of 0.3) with a 0/1 outcome {@code passed}
     * (y above 0), a count {@code visits} (Poisson with log mean 0.2 + 0.3 x + 0.2 b, drawn by Knuth's
     * product of uniforms, Knuth 1969, The Art of Computer Programming vol. 2) and survey weights {@code w}
     * (5% missing, 5% zero).
     */
    public static Table glmSchools(long seed, int schools) {
        Table base = schools(seed, schools, 12, 0.3, 0.3);
        double[] y = ((NumericColumn) base.column("y")).values();
        double[] x = ((NumericColumn) base.column("x")).values();
        double[] b = ((NumericColumn) base.column("b")).values();
        SplittableRandom random = new SplittableRandom(seed + 1);
        int n = y.length;
        double[] passed = new double[n];
        double[] visits = new double[n];
        double[] w = new double[n];
        for (int i = 0; i < n; i++) {
            passed[i] = y[i] > 0 ? 1 : 0;
            double limit = Math.exp(-Math.exp(0.2 + 0.3 * x[i] + 0.2 * b[i]));
            int count = 0;
            for (double product = random.nextDouble(); product > limit; product *= random.nextDouble()) {
                count++;
            }
            visits[i] = count;
            double u = random.nextDouble();
            w[i] = u < 0.05 ? Double.NaN : u < 0.1 ? 0 : 0.5 + 2 * random.nextDouble();
        }
        List<Column> cols = new ArrayList<>(base.columns());
        cols.add(new NumericColumn("passed", passed));
        cols.add(new NumericColumn("visits", visits));
        cols.add(new NumericColumn("w", w));
        return new Table("schools.csv", cols);
    }

    private static double gaussian(SplittableRandom r) {
        // Box-Muller (Box & Muller 1958, Annals of Mathematical Statistics 29(2))
        double u = 1 - r.nextDouble();
        return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * r.nextDouble());
    }
}
