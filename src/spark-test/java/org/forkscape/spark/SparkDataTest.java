package org.forkscape.spark;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.ByteArrayOutputStream;
import java.io.IOException;
import java.io.PrintStream;
import java.math.BigDecimal;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.Random;
import java.util.concurrent.atomic.AtomicBoolean;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.RowFactory;
import org.apache.spark.sql.SparkSession;
import org.apache.spark.sql.types.DataTypes;
import org.apache.spark.sql.types.StructType;
import org.forkscape.InputException;
import org.forkscape.data.CategoricalColumn;
import org.forkscape.data.CsvTableReader;
import org.forkscape.data.NumericColumn;
import org.forkscape.data.Table;
import org.forkscape.plan.Plan;
import org.forkscape.plan.PlanReader;
import org.forkscape.run.MultiverseRunner;
import org.forkscape.run.ResultTable;
import org.forkscape.run.RunProgress;
import org.forkscape.run.RunResult;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * How the Spark runner reads Parquet: integers, longs, floats, decimals and booleans as numbers (booleans
 * 0/1), strings as categorical columns with sorted levels (Spark writes them dictionary-encoded), nulls as
 * missing cells, several part files; checked against the same invented values written as CSV and read by
 * the CSV reader, through a whole run of a small plan (every specification within 1e-10 relative). A
 * corrupt file and a column of a type Forkscape does not read are refused in one line, exit code 2.
 */
class SparkDataTest {
    static final String PLAN = """
            {"title": "types", "data": "%s",
             "decisions": [
              {"name": "outcome", "kind": "outcome", "alternatives": [{"label": "y", "column": "y"}]},
              {"name": "key", "kind": "predictor", "alternatives": [{"label": "x", "column": "x"}]},
              {"name": "controls", "kind": "controls", "optional": ["n", "f", "d", "b", "g"]},
              {"name": "errors", "kind": "errors", "alternatives": ["classical", "HC1", "cluster:g"]}
             ]}""";

    static SparkSession spark;
    @TempDir
    static Path folder;

    @BeforeAll
    static void start() throws IOException {
        ((ch.qos.logback.classic.Logger) org.slf4j.LoggerFactory.getLogger(org.slf4j.Logger.ROOT_LOGGER_NAME))
                .setLevel(ch.qos.logback.classic.Level.WARN);
        spark = SparkSession.builder().master("local[2]").appName("forkscape-spark-data-test")
                .config("spark.ui.enabled", "false").config("spark.sql.shuffle.partitions", "4").getOrCreate();
        StructType schema = DataTypes.createStructType(List.of(
                DataTypes.createStructField("y", DataTypes.DoubleType, true),
                DataTypes.createStructField("x", DataTypes.IntegerType, true),
                DataTypes.createStructField("n", DataTypes.LongType, true),
                DataTypes.createStructField("f", DataTypes.FloatType, true),
                DataTypes.createStructField("d", DataTypes.createDecimalType(10, 2), true),
                DataTypes.createStructField("b", DataTypes.BooleanType, true),
                DataTypes.createStructField("g", DataTypes.StringType, true),
                DataTypes.createStructField("when", DataTypes.DateType, true)));
        Random random = new Random(15);
        List<Row> rows = new ArrayList<>();
        StringBuilder csv = new StringBuilder("y,x,n,f,d,b,g\n");
        String[] groups = {"river", "hill", "coast", "plain"};
        for (int i = 0; i < 400; i++) {
            int x = random.nextInt(50);
            Long n = random.nextInt(10) == 0 ? null : (long) random.nextInt(1000);
            float f = random.nextFloat() * 10;
            BigDecimal d = BigDecimal.valueOf(random.nextInt(100000), 2);
            Boolean b = random.nextInt(12) == 0 ? null : random.nextBoolean();
            String g = random.nextInt(15) == 0 ? null : groups[random.nextInt(groups.length)];
            double y = 0.3 * x + 0.01 * (n == null ? 0 : n) + f + (b != null && b ? 2 : 0) + random.nextGaussian();
            rows.add(RowFactory.create(y, x, n, f, d, b, g, java.sql.Date.valueOf("2026-01-01")));
            csv.append(y).append(',').append(x).append(',').append(n == null ? "" : n).append(',')
                    .append((double) f).append(',').append(d.toPlainString()).append(',')
                    .append(b == null ? "" : b ? "1" : "0").append(',').append(g == null ? "" : g).append('\n');
        }
        spark.createDataFrame(rows, schema).repartition(3).write().parquet(folder.resolve("types.parquet").toString());
        Files.writeString(folder.resolve("types.csv"), csv.toString());
        Files.writeString(folder.resolve("csv-plan.json"), PLAN.formatted("types.csv"));
        Files.writeString(folder.resolve("parquet-plan.json"), PLAN.formatted("types.parquet"));
    }

    @AfterAll
    static void stop() {
        spark.stop();
    }

    @Test
    void parquetTypesReadAsTheSameValuesInCsv() throws IOException {
        Plan csvPlan = new PlanReader(false).read(folder.resolve("csv-plan.json"));
        Table csv = new CsvTableReader().read(csvPlan.dataFile());
        String text = Files.readString(folder.resolve("parquet-plan.json"));
        Plan plan = new PlanReader(false).read(text, folder);
        SparkData data = new SparkData(spark, null, 0, text, folder);
        Table columns = data.table(plan);
        assertEquals(400, columns.rowCount());
        assertEquals(List.of("coast", "hill", "plain", "river"), ((CategoricalColumn) columns.column("g")).levels());
        assertTrue(columns.column("b") instanceof NumericColumn && columns.column("d") instanceof NumericColumn);
        assertFalse(columns.holdsRows());

        ResultTable a = new MultiverseRunner(2).run(csvPlan, csv, RunProgress.SILENT, new AtomicBoolean()).results();
        RunResult onSpark = new MultiverseRunner(2).withVariants(data.variants(plan, columns)).run(plan, columns,
                RunProgress.SILENT, new AtomicBoolean());
        ResultTable b = onSpark.results();
        assertEquals(a.size(), b.size());
        for (int slot = 0; slot < a.size(); slot++) {
            String where = "specification " + a.specNumber(slot);
            assertEquals(a.status(slot), b.status(slot), where);
            assertEquals(a.nObs(slot), b.nObs(slot), where + " n_obs (nulls as missing)");
            assertEquals(a.nParams(slot), b.nParams(slot), where + " n_params (levels)");
            SparkParityTest.assertClose(a.estimate(slot), b.estimate(slot), SparkParityTest.RELATIVE, where);
            SparkParityTest.assertClose(a.stdError(slot), b.stdError(slot), SparkParityTest.RELATIVE, where);
        }
    }

    @Test
    void aColumnOfAnotherTypeIsRefusedByName() throws IOException {
        String text = PLAN.formatted("types.parquet").replace("\"optional\": [\"n\"", "\"optional\": [\"when\", \"n\"");
        Plan plan = new PlanReader(false).read(text, folder);
        InputException e = assertThrows(InputException.class, () -> new SparkData(spark, null, 0, text, folder)
                .table(plan));
        assertEquals("data: column \"when\" of types.parquet has the Parquet type date, which Forkscape does not "
                + "read; give numbers, booleans or text", e.getMessage());
    }

    @Test
    void aCorruptFileIsOneLineAndExitCode2() throws IOException {
        Path bad = folder.resolve("corrupt");
        Files.createDirectories(bad);
        Files.write(bad.resolve("part-0.parquet"), "PAR1 this is not a Parquet file".getBytes(StandardCharsets.UTF_8));
        Path plan = folder.resolve("corrupt-plan.json");
        Files.writeString(plan, PLAN.formatted("corrupt"));
        ByteArrayOutputStream err = new ByteArrayOutputStream();
        PrintStream was = System.err;
        int code;
        System.setErr(new PrintStream(err, true, StandardCharsets.UTF_8));
        try {
            code = SparkRun.execute(new String[] {"run", plan.toString(), "--out", folder.resolve("none").toString()});
        } finally {
            System.setErr(was);
        }
        String message = err.toString(StandardCharsets.UTF_8).trim();
        assertEquals(2, code, message);
        assertTrue(message.startsWith("forkscape: data: \"" + bad + "\" cannot be read as Parquet (")
                && !message.contains("Job aborted"), message);
        assertEquals(1, message.lines().count(), message);
        assertFalse(Files.exists(folder.resolve("none")));
    }
}
