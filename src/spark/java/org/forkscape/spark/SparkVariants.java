package org.forkscape.spark;

import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import java.util.concurrent.ConcurrentHashMap;
import java.util.concurrent.ExecutorService;
import org.apache.spark.api.java.JavaRDD;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Encoders;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.SparkSession;
import org.forkscape.InputException;
import org.forkscape.data.Table;
import org.forkscape.fit.BootstrapByParts;
import org.forkscape.fit.BootstrapDesign;
import org.forkscape.fit.DataVariant;
import org.forkscape.fit.VariantByParts;
import org.forkscape.fit.VariantKey;
import org.forkscape.fit.VariantParts;
import org.forkscape.fit.VariantSource;
import org.forkscape.fit.WholeRows;
import org.forkscape.plan.Plan;
import org.forkscape.plan.PlanReader;

/**
 * The data variants of a plan whose rows are partitions of a Spark data set: {@link VariantByParts#build}
 * with the partitions as its parts. Each of its steps is one Spark job over the partitions, each running the
 * engine's coding on its rows, whose small results are reduced in partition order ({@link OrderedTree}); a
 * winsorize's quantiles are Spark's exact {@code percentile} aggregate. Only these statistics reach the driver.
 * A variant is built once and kept (the run and its inference both ask for it); its size does not grow with
 * the rows.
 */
final class SparkVariants implements VariantSource, VariantParts {
    private final SparkSession spark;
    private final JavaRDD<SparkPart> parts;
    private final String planText;
    private final String planFolder;
    private final VariantByParts whole;
    private final WholeRows grouping;
    private final Map<VariantKey, DataVariant> built = new ConcurrentHashMap<>();
    private final Plan plan;

    /**
     * @param parts      each partition's rows as one table (with the rows' identities when bootstrap draws are
     *                   asked for), kept in executor memory between the passes
     * @param planText   the plan file's text, read again on the executors (a plan is not serializable)
     * @param planFolder the plan's folder
     * @param columns    the plan's columns without rows (the driver's table)
     * @param grouping   the sorted values of the numeric grouping columns over the whole data set
     */
    SparkVariants(SparkSession spark, JavaRDD<SparkPart> parts, String planText, Path planFolder, Plan plan,
            Table columns, WholeRows grouping) {
        this.spark = spark;
        this.parts = parts;
        this.planText = planText;
        this.planFolder = planFolder.toString();
        this.whole = new VariantByParts(plan, columns);
        this.plan = plan;
        this.grouping = grouping;
    }

    /**
     * The variant {@code key}; a plan problem raised in a task on an executor (which Spark reports wrapped in
     * its own exception) is rethrown as the problem itself, so that the user sees the plan's message.
     */
    @Override
    public synchronized DataVariant variant(VariantKey key, ExecutorService pool) {
        try {
            return built.computeIfAbsent(key, k -> {
                DataVariant v = whole.build(k, grouping, this);
                SparkRefusals.drawClusterings(plan, v);
                return v;
            });
        } catch (RuntimeException e) {
            for (Throwable t = e.getCause(); t != null; t = t.getCause()) {
                if (t instanceof InputException problem) {
                    throw problem;
                }
            }
            throw e;
        }
    }

    @Override
    public <T> T reduce(PartFunction<T> f, Merge<T> merge) {
        String text = planText;
        String folder = planFolder;
        JavaRDD<Holder<T>> results = parts.map(table -> new Holder<>(f.apply(coding(text, folder, table))));
        Holder<T> h = OrderedTree.reduce(results, (a, b) -> new Holder<>(a.value == null ? b.value
                : b.value == null ? a.value : merge.apply(a.value, b.value)));
        return h == null ? null : h.value;
    }

    /**
     * {@code shared} goes to each executor once as a broadcast variable (a batch of specifications' pieces for
     * the row pass, {@link org.forkscape.fit.RowPassesByParts}), destroyed when the job is done.
     */
    @Override
    public <S extends java.io.Serializable, T> T reduce(S shared, SharedPartFunction<S, T> f, Merge<T> merge) {
        String text = planText;
        String folder = planFolder;
        org.apache.spark.broadcast.Broadcast<S> sent = org.apache.spark.api.java.JavaSparkContext
                .fromSparkContext(spark.sparkContext()).broadcast(shared);
        try {
            JavaRDD<Holder<T>> results = parts.map(table -> new Holder<>(f.apply(coding(text, folder, table),
                    sent.value())));
            Holder<T> h = OrderedTree.reduce(results, (a, b) -> new Holder<>(a.value == null ? b.value
                    : b.value == null ? a.value : merge.apply(a.value, b.value)));
            return h == null ? null : h.value;
        } finally {
            sent.destroy();
        }
    }

    /**
     * Spark's {@code percentile} aggregate is exact: it interpolates linearly between the order statistics
     * at (n - 1) p, which is type 7 of Hyndman &amp; Fan (1996), the engine's.
     */
    @Override
    public double[] quantiles(PartFunction<double[]> values, double low, double high) {
        String text = planText;
        String folder = planFolder;
        JavaRDD<Double> all = parts.flatMap(table -> {
            double[] x = values.apply(coding(text, folder, table));
            List<Double> out = new ArrayList<>(x.length);
            for (double d : x) {
                out.add(d);
            }
            return out.iterator();
        });
        Dataset<Double> data = spark.createDataset(all.rdd(), Encoders.DOUBLE());
        Row q = data.selectExpr("percentile(value, array(" + low + "D, " + high + "D)) AS q").first();
        List<Double> bounds = q.getList(0);
        return new double[] {bounds.get(0), bounds.get(1)};
    }

    /** The coding of one partition's rows, the plan read again from its text on the executor. */
    private static VariantByParts coding(String planText, String planFolder, SparkPart part) {
        Plan plan = new PlanReader(false).read(planText, Path.of(planFolder));
        return new VariantByParts(plan, part.table(), part.rowKeys());
    }

    /**
     * Poisson bootstrap draws over the same partitions: each draw's statistics are summed where the rows are,
     * several draws per pass, and reduced in partition order as the observed ones are.
     */
    @Override
    public BootstrapByParts bootstrap(BootstrapDesign design) {
        return new BootstrapByParts(whole, this, design);
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
