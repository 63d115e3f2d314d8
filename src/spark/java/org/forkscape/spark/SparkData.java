package org.forkscape.spark;

import java.nio.file.Path;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.Set;
import org.apache.spark.api.java.JavaRDD;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.SparkSession;
import org.apache.spark.sql.types.StructField;
import org.apache.spark.sql.types.StructType;
import org.apache.spark.storage.StorageLevel;
import org.forkscape.InputException;
import org.forkscape.data.Table;
import org.forkscape.fit.VariantSource;
import org.forkscape.fit.WholeRows;
import org.forkscape.plan.Plan;
import org.forkscape.run.RunData;

import static org.apache.spark.sql.functions.col;
import static org.apache.spark.sql.functions.isnan;

/**
 * A run's data as a Parquet file or folder of part files read by Spark: the driver learns the columns'
 * types, the levels of the categorical ones, the values of the numeric grouping columns and the row count
 * (each one aggregation), and builds every data variant from statistics summed on the executors
 * ({@link SparkVariants}). The rows stay on the executors, each partition held there as one table of the
 * plan's columns between the passes.
 */
final class SparkData implements RunData {
    private final SparkSession spark;
    private final String location;
    private final int partitions;
    private final String planText;
    private final Path planFolder;
    private TableShape shape;
    private Dataset<Row> data;
    private WholeRows grouping;
    /** The columns read as categorical, and the data's name in messages (set by {@link #table}). */
    private Set<String> categoricalNames;
    private String source;
    /** Whether the partitions carry their rows' identities (for bootstrap draws; {@link RowIdentity}). */
    private boolean keyed;

    /**
     * @param location   where the data are (a path or URI Spark reads), or null for the plan's own data file
     * @param partitions how many partitions to spread the rows over, or 0 to keep Spark's reading
     * @param planText   the plan file's text (the executors read it again)
     * @param planFolder the plan file's folder
     */
    SparkData(SparkSession spark, String location, int partitions, String planText, Path planFolder) {
        this.spark = spark;
        this.location = location;
        this.partitions = partitions;
        this.planText = planText;
        this.planFolder = planFolder;
    }

    @Override
    public Table table(Plan plan) {
        String where = location != null ? location : plan.dataFile().toString();
        String source = location != null ? location : String.valueOf(plan.dataFile().getFileName());
        Dataset<Row> all;
        try {
            all = spark.read().parquet(where);
        } catch (Exception e) {
            // Spark's analysis errors are checked exceptions thrown undeclared from Scala
            throw new InputException("data", "\"" + where + "\" cannot be read as Parquet (" + firstLine(e) + ")");
        }
        StructType schema = all.schema();
        Set<String> named = PlanColumns.of(plan);
        List<String> present = new ArrayList<>();
        List<String> others = new ArrayList<>();
        for (StructField f : schema.fields()) {
            (named.contains(f.name()) ? present : others).add(f.name());
        }
        String[] names = present.toArray(new String[0]);
        boolean[] categorical = new boolean[names.length];
        String[][] levels = new String[names.length][];
        List<org.apache.spark.sql.Column> read = new ArrayList<>(present.stream().map(n -> col("`" + n + "`"))
                .toList());
        keyed = RowIdentity.needed(plan);
        if (keyed) {
            RowIdentity.requireDistinctNames(all.inputFiles(), source);
            read.addAll(RowIdentity.columns());
        }
        Dataset<Row> selected = all.select(read.toArray(org.apache.spark.sql.Column[]::new));
        Map<String, double[]> groupingValues = new HashMap<>();
        Set<String> grouping = PlanColumns.grouping(plan);
        try {
            for (int c = 0; c < names.length; c++) {
                categorical[c] = TableShape.categorical(schema.apply(names[c]), source);
                String q = "`" + names[c] + "`";
                if (categorical[c]) {
                    levels[c] = selected.select(col(q)).where(col(q).isNotNull()).distinct().collectAsList().stream()
                            .map(r -> r.getString(0)).sorted().toArray(String[]::new);
                } else if (grouping.contains(names[c])) {
                    Dataset<Row> numbers = selected.select(col(q).cast("double")).where(col(q).isNotNull());
                    groupingValues.put(names[c], numbers.where(isnan(col(q)).unary_$bang()).distinct()
                            .collectAsList().stream().mapToDouble(r -> r.getDouble(0)).sorted().toArray());
                }
            }
            categoricalNames = new java.util.HashSet<>();
            for (int c = 0; c < names.length; c++) {
                if (categorical[c]) {
                    categoricalNames.add(names[c]);
                }
            }
            this.source = source;
            long rows = selected.count();
            if (rows > Integer.MAX_VALUE) {
                throw new InputException("data", String.format("%s has %,d rows, above the engine's limit of %,d "
                        + "rows per data set", source, rows, Integer.MAX_VALUE));
            }
            data = partitioned(plan, selected, levels, groupingValues, names);
            shape = new TableShape(names, categorical, levels, selected.schema());
            this.grouping = WholeRows.NONE.withGroupingValues(groupingValues);
            return shape.withoutRows(source, (int) rows, others);
        } catch (InputException e) {
            throw e;
        } catch (Exception e) {
            throw new InputException("data", "\"" + where + "\" cannot be read as Parquet (" + firstLine(e) + ")");
        }
    }

    /**
     * The rows spread over the partitions: as read, or over {@code --partitions} N; beside two absorbed columns
     * by the column with more levels ({@link CrossedPartitioning}), each of its levels in one partition (N, or as
     * many as read), its rows then sorted within their partition by every column read, since a shuffle delivers
     * them in no fixed order and the sums must have the same bits on every run.
     */
    private Dataset<Row> partitioned(Plan plan, Dataset<Row> selected, String[][] levels,
            Map<String, double[]> groupingValues, String[] names) {
        Map<String, Integer> counts = new HashMap<>();
        for (int c = 0; c < names.length; c++) {
            if (levels[c] != null) {
                counts.put(names[c], levels[c].length);
            } else if (groupingValues.containsKey(names[c])) {
                counts.put(names[c], groupingValues.get(names[c]).length);
            }
        }
        String by = CrossedPartitioning.column(plan, counts);
        if (by == null) {
            return partitions > 0 ? selected.repartition(partitions) : selected;
        }
        int n = partitions > 0 ? partitions : selected.javaRDD().getNumPartitions();
        org.apache.spark.sql.Column[] all = Arrays.stream(selected.columns()).map(c -> col("`" + c + "`"))
                .toArray(org.apache.spark.sql.Column[]::new);
        return selected.repartition(n, col("`" + by + "`")).sortWithinPartitions(all);
    }

    @Override
    public VariantSource variants(Plan plan, Table table) {
        SparkRefusals.check(plan);
        SparkWeights.check(plan, data, categoricalNames, source);
        TableShape s = shape;
        boolean withKeys = keyed;
        // Spark's internal rows, read by their types' getters: converting each to an external Row first boxes
        // every value and took about as long as decoding the Parquet pages
        JavaRDD<SparkPart> parts = data.queryExecution().toRdd().toJavaRDD()
                .mapPartitions(rows -> List.of(s.part(rows, withKeys)).iterator()).persist(StorageLevel.MEMORY_ONLY());
        return new SparkVariants(spark, parts, planText, planFolder, plan, table, grouping);
    }

    /** No hash: the data are not read through the driver (summary.json's data_sha256 is null). */
    @Override
    public Path hashedFile(Plan plan) {
        return null;
    }

    /** The first line of the innermost cause's message: the reader's own words, not Spark's job report. */
    private static String firstLine(Throwable e) {
        Throwable root = e;
        while (root.getCause() != null && root.getCause() != root) {
            root = root.getCause();
        }
        String m = root.getMessage() == null ? root.getClass().getSimpleName() : root.getMessage();
        int nl = m.indexOf('\n');
        return nl < 0 ? m : m.substring(0, nl);
    }

    @Override
    public String toString() {
        return "SparkData[" + location + ", " + Arrays.toString(shape == null ? null : shape.names()) + "]";
    }
}
