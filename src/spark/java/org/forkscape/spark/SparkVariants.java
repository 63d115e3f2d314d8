package org.forkscape.spark;

import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import java.util.concurrent.ConcurrentHashMap;
import java.util.concurrent.ExecutorService;
import java.util.stream.IntStream;
import org.apache.spark.api.java.JavaRDD;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Encoders;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.SparkSession;
import org.forkscape.InputException;
import org.forkscape.data.Table;
import org.forkscape.fit.DataVariant;
import org.forkscape.fit.PartialStatistics;
import org.forkscape.fit.VariantByParts;
import org.forkscape.fit.VariantKey;
import org.forkscape.fit.VariantSource;
import org.forkscape.fit.WholeRows;
import org.forkscape.plan.Plan;
import org.forkscape.plan.PlanReader;

/**
 * The data variants of a plan whose rows are partitions of a Spark data set. Each variant is coded by the
 * engine's own steps on every partition ({@link VariantByParts}) in a few passes: one per trim rule (its
 * column's mean and spread over the rows kept before it), one for the transforms' statistics and the fixed
 * effect's levels (plus one exact percentile aggregation per winsorized alternative), one for the level
 * shifts, and one for the sufficient statistics, which are reduced in a fixed order ({@link OrderedTree}).
 * Only these statistics reach the driver, which builds from them the variant the solvers read. A variant
 * is built once and kept (the run and its inference both ask for it); its size does not grow with the rows.
 */
final class SparkVariants implements VariantSource {
    private final SparkSession spark;
    private final JavaRDD<Table> parts;
    private final String planText;
    private final String planFolder;
    private final VariantByParts whole;
    private final WholeRows grouping;
    private final Map<VariantKey, DataVariant> built = new ConcurrentHashMap<>();

    /**
     * @param parts      each partition's rows as one table, kept in executor memory between the passes
     * @param planText   the plan file's text, read again on the executors (a plan is not serializable)
     * @param planFolder the plan's folder
     * @param columns    the plan's columns without rows (the driver's table)
     * @param grouping   the sorted values of the numeric grouping columns over the whole data set
     */
    SparkVariants(SparkSession spark, JavaRDD<Table> parts, String planText, Path planFolder, Plan plan,
            Table columns, WholeRows grouping) {
        this.spark = spark;
        this.parts = parts;
        this.planText = planText;
        this.planFolder = planFolder.toString();
        this.whole = new VariantByParts(plan, columns);
        this.grouping = grouping;
    }

    @Override
    public synchronized DataVariant variant(VariantKey key, ExecutorService pool) {
        DataVariant v = built.get(key);
        if (v == null) {
            v = build(key);
            built.put(key, v);
        }
        return v;
    }

    private DataVariant build(VariantKey key) {
        WholeRows facts = grouping;
        for (int s : whole.trimSamples(key)) {
            WholeRows given = facts;
            double[] trim = reduce((part, table) -> part.trimFacts(key, s, given), VariantByParts::mergeFacts);
            facts = whole.withTrim(key, s, trim, facts);
        }
        WholeRows sampled = facts;
        double[][] transforms = reduce((part, table) -> part.transformFacts(key, sampled), SparkVariants::mergeAll);
        facts = whole.withTransforms(key, transforms, facts);
        for (double[] w : whole.winsorized()) {
            facts = winsorized(key, (int) w[0], w[1], facts);
        }
        WholeRows coded = facts;
        int[] codes = reduce((part, table) -> part.absorbCodes(key, coded), SparkVariants::union);
        facts = facts.withAbsorbCodes(codes);
        WholeRows levelled = facts;
        double[][][] shifts = reduce((part, table) -> part.shiftFacts(key, levelled), VariantByParts::mergeShiftFacts);
        facts = whole.withShifts(shifts, facts);
        WholeRows shifted = facts;
        boolean tensors = whole.wantsTensors(key);
        String text = planText;
        String folder = planFolder;
        JavaRDD<PartialStatistics> statistics = parts.map(table -> coding(text, folder, table)
                .statistics(key, shifted, tensors));
        PartialStatistics sum = OrderedTree.reduce(statistics, PartialStatistics::add);
        DataVariant variant = whole.variant(key, facts, sum);
        if (tensors && !whole.tensorsFit(variant.groupCount())) {
            throw new InputException("decisions", "the fourth moments that HC0 and HC1 need on Spark are above the "
                    + "engine's memory bound for them (" + variant.groupCount() + " missing-value patterns of "
                    + variant.layout().size() + " columns)" + SparkRefusals.WAY_OUT);
        }
        return variant;
    }

    /**
     * The type-7 quantiles of a winsorized alternative over the variant's rows, exact: Spark's
     * {@code percentile} aggregate interpolates linearly between the order statistics at (n - 1) p, as
     * Hyndman &amp; Fan (1996), "Sample quantiles in statistical packages", The American Statistician 50(4),
     * define type 7, which the engine uses.
     */
    private WholeRows winsorized(VariantKey key, int modelColumn, double fraction, WholeRows facts) {
        String text = planText;
        String folder = planFolder;
        JavaRDD<Double> values = parts.flatMap(table -> {
            double[] x = coding(text, folder, table).winsorizeValues(key, modelColumn, facts);
            List<Double> out = new ArrayList<>(x.length);
            for (double d : x) {
                out.add(d);
            }
            return out.iterator();
        });
        Dataset<Double> data = spark.createDataset(values.rdd(), Encoders.DOUBLE());
        Row q = data.selectExpr("percentile(value, array(" + fraction + "D, " + (1 - fraction) + "D)) AS q").first();
        List<Double> bounds = q.getList(0);
        return facts.withWinsorize(modelColumn, bounds.get(0), bounds.get(1));
    }

    /** A computation on every partition's coding, its results merged (each partition's result may be null). */
    private <T> T reduce(PartFunction<T> f, OrderedTree.Merge<T> merge) {
        String text = planText;
        String folder = planFolder;
        JavaRDD<Holder<T>> results = parts.map(table -> new Holder<>(f.apply(coding(text, folder, table), table)));
        Holder<T> h = OrderedTree.reduce(results, (a, b) -> new Holder<>(a.value == null ? b.value
                : b.value == null ? a.value : merge.apply(a.value, b.value)));
        return h == null ? null : h.value;
    }

    /** The coding of one partition's rows, the plan read again from its text on the executor. */
    private static VariantByParts coding(String planText, String planFolder, Table table) {
        Plan plan = new PlanReader(false).read(planText, Path.of(planFolder));
        return new VariantByParts(plan, table);
    }

    private static double[][] mergeAll(double[][] a, double[][] b) {
        double[][] out = new double[a.length][];
        for (int j = 0; j < a.length; j++) {
            out[j] = VariantByParts.mergeFacts(a[j], b[j]);
        }
        return out;
    }

    private static int[] union(int[] a, int[] b) {
        return IntStream.concat(IntStream.of(a), IntStream.of(b)).distinct().sorted().toArray();
    }

    /** One partition's computation. */
    interface PartFunction<T> extends java.io.Serializable {
        T apply(VariantByParts part, Table table);
    }

    /** A possibly null result, so that Spark never handles a null element. */
    static final class Holder<T> implements java.io.Serializable {
        private static final long serialVersionUID = 1L;
        final T value;

        Holder(T value) {
            this.value = value;
        }
    }
}
