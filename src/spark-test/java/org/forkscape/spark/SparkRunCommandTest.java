package org.forkscape.spark;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.ByteArrayOutputStream;
import java.io.IOException;
import java.io.PrintStream;
import java.io.Reader;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.Iterator;
import java.util.List;
import java.util.Map;
import java.util.Set;
import org.apache.commons.csv.CSVFormat;
import org.apache.commons.csv.CSVParser;
import org.apache.commons.csv.CSVRecord;
import org.apache.spark.sql.SparkSession;
import org.forkscape.cli.CommandLine;
import org.forkscape.data.CsvTableReader;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import tools.jackson.databind.JsonNode;
import tools.jackson.databind.ObjectMapper;

/**
 * The Spark runner's command end to end: the same plan through {@code forkscape.jar run} on the CSV and
 * through {@link SparkRun} on a Parquet copy writes the same specifications.csv (text cells equal, numbers
 * within {@value SparkParityTest#RELATIVE} relative) and the same summary.json (numbers within 1e-9 relative,
 * or {@value #ROUNDING_ZERO} absolute for quantities that are zero up to rounding; apart from the run's time, its
 * provenance, whose data hash is null on Spark, and the standard-error routes, since Spark takes the row pass
 * only where no route without rows serves, here for HC3); a refused plan (negative weights, counted on the executors) is one line at its JSON path, exit code 2,
 * and nothing written.
 */
class SparkRunCommandTest {
    /**
     * Below this absolute difference two summary numbers are both rounding noise around zero: a share formed as
     * 1 minus the other shares (the influence's interactions share) is accurate to a few units of 2.2e-16, the
     * spacing of doubles at 1, not relative to its own size; measured here: -1.8e-15 on one machine, -2.2e-16 on
     * Spark, for a share that is zero.
     */
    static final double ROUNDING_ZERO = 1e-14;

    static SparkSession spark;
    @TempDir
    static Path folder;
    static Path parquet;
    static Path plan;

    @BeforeAll
    static void start() throws IOException {
        ((ch.qos.logback.classic.Logger) org.slf4j.LoggerFactory.getLogger(org.slf4j.Logger.ROOT_LOGGER_NAME))
                .setLevel(ch.qos.logback.classic.Level.WARN);
        spark = SparkSession.builder().master("local[2]").appName("forkscape-spark-command-test")
                .config("spark.ui.enabled", "false").config("spark.sql.shuffle.partitions", "4").getOrCreate();
        parquet = ParquetCopy.write(spark, new CsvTableReader().read(SparkParityTest.REFERENCE.resolve(
                "toothgrowth.csv")), folder.resolve("toothgrowth.parquet"), 2);
        Files.copy(SparkParityTest.REFERENCE.resolve("toothgrowth.csv"), folder.resolve("toothgrowth.csv"));
        plan = folder.resolve("toothgrowth-plan.json");
        Files.copy(SparkParityTest.REFERENCE.resolve("toothgrowth-plan.json"), plan);
    }

    @AfterAll
    static void stop() {
        spark.stop();
    }

    @Test
    void writesTheSameFilesAsTheSingleMachineRun() throws IOException {
        Path local = folder.resolve("local");
        Path onSpark = folder.resolve("spark");
        assertEquals(0, CommandLine.execute(new String[] {"run", plan.toString(), "--out", local.toString()},
                quiet(), quiet()));
        assertEquals(0, SparkRun.execute(new String[] {"run", plan.toString(), "--out", onSpark.toString(),
                "--data", parquet.toString(), "--partitions", "3"}));

        List<CSVRecord> a = csv(local.resolve("specifications.csv"));
        List<CSVRecord> b = csv(onSpark.resolve("specifications.csv"));
        assertEquals(a.size(), b.size());
        assertEquals(a.get(0).toList(), b.get(0).toList(), "header");
        for (int r = 1; r < a.size(); r++) {
            for (int c = 0; c < a.get(r).size(); c++) {
                cell(a.get(r).get(c), b.get(r).get(c), "specifications.csv row " + r + ", " + a.get(0).get(c));
            }
        }

        ObjectMapper json = new ObjectMapper();
        JsonNode sa = json.readTree(local.resolve("summary.json").toFile());
        JsonNode sb = json.readTree(onSpark.resolve("summary.json").toFile());
        assertTrue(sb.get("provenance").get("data_sha256").isNull(), "no data hash on Spark");
        assertEquals(sa.get("data_rows").asInt(), sb.get("data_rows").asInt());
        // the routes differ by design: Spark takes the row pass for HC3 alone (3 outcomes x 2 x 2 specifications,
        // by batches over the partitions), one machine wherever it finds it cheaper
        assertEquals(12, sb.get("standard_error_routes").get("row_pass").asInt(), sb.get("standard_error_routes")
                .toString());
        same(sa, sb, "summary.json", Set.of("seconds", "provenance", "standard_error_routes"));
        assertTrue(Files.exists(onSpark.resolve("overfitting.csv")));
    }

    /**
     * The scale command's plan with {@code --model logit}: the same 2,048 specifications of the 0/1 outcome b
     * by logit, which the Spark runner accepts.
     */
    @Test
    void scaleLogitPlanFitsTheBinaryOutcomeByLogit() {
        org.forkscape.plan.Plan plan = new org.forkscape.plan.PlanReader(false).read(SparkScale.plan("data", 0, true, false),
                folder.toAbsolutePath());
        assertEquals(java.math.BigInteger.valueOf(2048), new org.forkscape.plan.SpecificationSpace(plan).count());
        assertTrue(plan.decisions().stream().anyMatch(d -> d instanceof org.forkscape.plan.Decision.Model m
                && m.alternatives().equals(List.of(org.forkscape.plan.ModelFamily.LOGIT))), plan.decisions().toString());
        assertTrue(plan.decisions().stream().anyMatch(d -> d instanceof org.forkscape.plan.Decision.Outcome o
                && o.alternatives().get(0).column().equals("b")), plan.decisions().toString());
        SparkRefusals.check(plan);
        org.forkscape.plan.Plan ols = new org.forkscape.plan.PlanReader(false).read(SparkScale.plan("data", 0, false, false),
                folder.toAbsolutePath());
        assertTrue(ols.decisions().stream().noneMatch(d -> d instanceof org.forkscape.plan.Decision.Model),
                "without --model the plan has no model decision");
        assertTrue(ols.decisions().stream().noneMatch(d -> d instanceof org.forkscape.plan.Decision.Absorb),
                "without --absorb the plan absorbs nothing");
        // --absorb two-way: the unit and period effects, which the Spark runner solves by parts
        org.forkscape.plan.Plan twoWay = new org.forkscape.plan.PlanReader(false).read(SparkScale.plan("data", 0,
                false, true), folder.toAbsolutePath());
        assertTrue(twoWay.decisions().stream().anyMatch(d -> d instanceof org.forkscape.plan.Decision.Absorb a
                && a.alternatives().get(0).columns().equals(List.of("unit", "period"))), twoWay.decisions().toString());
        assertEquals(java.math.BigInteger.valueOf(2048), new org.forkscape.plan.SpecificationSpace(twoWay).count());
        SparkRefusals.check(twoWay);
    }

    /**
     * The scale command's small case: the generated table, read back from its Parquet parts by one machine,
     * gives the Spark run's every specification (within {@value SparkParityTest#RELATIVE} relative), and
     * the report's row names the row count and the aggregation's time beside Spark's own sums.
     */
    @Test
    void scaleRunsItsGeneratedPlanAsOneMachineDoes() throws IOException {
        Path out = folder.resolve("scale");
        ByteArrayOutputStream report = new ByteArrayOutputStream();
        PrintStream was = System.out;
        int code;
        System.setOut(new PrintStream(report, true, StandardCharsets.UTF_8));
        try {
            code = SparkRun.execute(new String[] {"scale", "--rows", "3000", "--out", out.toString(), "--partitions",
                    "3"});
        } finally {
            System.setOut(was);
        }
        assertEquals(0, code);
        // the table's lines; the test's logging also goes to the standard output
        List<String> lines = report.toString(StandardCharsets.UTF_8).lines().filter(l -> l.startsWith("|")).toList();
        assertEquals(3, lines.size(), lines.toString());
        assertTrue(lines.get(2).startsWith("| 3,000 | "), lines.get(2));
        assertTrue(lines.get(2).endsWith("| not run |"), lines.get(2));

        Path rows = out.resolve("rows-3000");
        Path local = rows.resolve("single");
        assertEquals(0, CommandLine.execute(new String[] {"run", rows.resolve("plan.json").toString(), "--out",
                local.toString()}, quiet(), quiet()));
        List<CSVRecord> a = csv(local.resolve("specifications.csv"));
        List<CSVRecord> b = csv(rows.resolve("spark-run").resolve("specifications.csv"));
        assertEquals(1 + 2 * 1024, a.size(), "every subset of ten controls, two error types");
        assertEquals(a.size(), b.size());
        for (int r = 1; r < a.size(); r++) {
            for (int c = 0; c < a.get(r).size(); c++) {
                cell(a.get(r).get(c), b.get(r).get(c), "specifications.csv row " + r + ", " + a.get(0).get(c));
            }
        }
    }

    @Test
    void refusesNegativeWeightsAtTheirPathWithNothingWritten() throws IOException {
        // weights of length - 10: negative in the shortest teeth, counted on the executors
        org.forkscape.data.Table tooth = new CsvTableReader().read(SparkParityTest.REFERENCE.resolve("toothgrowth.csv"));
        double[] w = ((org.forkscape.data.NumericColumn) tooth.column("len")).values().clone();
        for (int i = 0; i < w.length; i++) {
            w[i] -= 10;
        }
        java.util.List<org.forkscape.data.Column> columns = new java.util.ArrayList<>(tooth.columns());
        columns.add(new org.forkscape.data.NumericColumn("w", w));
        Path weighted = ParquetCopy.write(spark, new org.forkscape.data.Table(tooth.source(), columns),
                folder.resolve("weighted.parquet"), 2);
        Path planFile = folder.resolve("negative-weights-plan.json");
        Files.writeString(planFile, Files.readString(SparkParityTest.REFERENCE.resolve("toothgrowth-plan.json"))
                .replace("{\"name\": \"outcome\"", "{\"name\": \"weights\", \"kind\": \"weights\", "
                        + "\"alternatives\": [{\"label\": \"by length\", \"column\": \"w\"}]},\n    "
                        + "{\"name\": \"outcome\""));
        Path out = folder.resolve("refused");
        ByteArrayOutputStream err = new ByteArrayOutputStream();
        PrintStream was = System.err;
        int code;
        System.setErr(new PrintStream(err, true, StandardCharsets.UTF_8));
        try {
            code = SparkRun.execute(new String[] {"run", planFile.toString(), "--out", out.toString(), "--data",
                    weighted.toString()});
        } finally {
            System.setErr(was);
        }
        assertEquals(2, code);
        String message = err.toString(StandardCharsets.UTF_8).trim();
        assertTrue(message.startsWith("forkscape: negative-weights-plan.json, decisions[0].alternatives[0].column: "
                + "the weights in \"w\" must be finite and not negative; "), message);
        assertEquals(1, message.lines().count(), message);
        assertTrue(!Files.exists(out.resolve("specifications.csv")));
    }

    private static void cell(String expected, String actual, String where) {
        if (expected.equals(actual)) {
            return;
        }
        double e;
        double x;
        try {
            e = Double.parseDouble(expected);
            x = Double.parseDouble(actual);
        } catch (NumberFormatException notANumber) {
            assertEquals(expected, actual, where);
            return;
        }
        SparkParityTest.assertClose(e, x, SparkParityTest.RELATIVE, where);
    }

    private static void same(JsonNode a, JsonNode b, String where, Set<String> skip) {
        if (a.isNumber() && b.isNumber()) {
            // a share or sum that is zero up to rounding (such as a variance share of 1e-31) has no relative accuracy
            if (Math.abs(a.asDouble() - b.asDouble()) > ROUNDING_ZERO) {
                SparkParityTest.assertClose(a.asDouble(), b.asDouble(), 1e-9, where);
            }
            return;
        }
        assertEquals(a.getNodeType(), b.getNodeType(), where);
        if (a.isObject()) {
            assertEquals(names(a), names(b), where);
            for (Map.Entry<String, JsonNode> e : a.properties()) {
                if (!skip.contains(e.getKey())) {
                    same(e.getValue(), b.get(e.getKey()), where + "." + e.getKey(), Set.of());
                }
            }
        } else if (a.isArray()) {
            assertEquals(a.size(), b.size(), where);
            for (int i = 0; i < a.size(); i++) {
                same(a.get(i), b.get(i), where + "[" + i + "]", Set.of());
            }
        } else {
            assertEquals(a, b, where);
        }
    }

    private static List<String> names(JsonNode o) {
        List<String> out = new ArrayList<>();
        for (Iterator<String> it = o.propertyNames().iterator(); it.hasNext();) {
            out.add(it.next());
        }
        return out;
    }

    private static List<CSVRecord> csv(Path file) throws IOException {
        try (Reader in = Files.newBufferedReader(file, StandardCharsets.UTF_8);
                CSVParser p = CSVParser.builder().setReader(in).setFormat(CSVFormat.RFC4180).get()) {
            return p.getRecords();
        }
    }

    private static PrintStream quiet() {
        return new PrintStream(new ByteArrayOutputStream(), true, StandardCharsets.UTF_8);
    }
}
