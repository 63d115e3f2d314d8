package org.forkscape.cli;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.ByteArrayOutputStream;
import java.io.IOException;
import java.io.PrintStream;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.security.MessageDigest;
import java.security.NoSuchAlgorithmException;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.HexFormat;
import java.util.List;
import java.util.SplittableRandom;
import org.apache.commons.csv.CSVFormat;
import org.apache.commons.csv.CSVParser;
import org.apache.commons.csv.CSVRecord;
import org.apache.commons.math3.stat.regression.OLSMultipleLinearRegression;
import org.forkscape.check.ReleaseCheck;
import org.forkscape.plan.PlanReader;
import org.forkscape.plan.SpecificationSpace;
import org.junit.jupiter.api.BeforeEach;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import tools.jackson.databind.JsonNode;
import tools.jackson.databind.json.JsonMapper;

/** The batch command's arguments, exit codes, messages and files, called in-process. */
class CommandLineTest {
    private static final int ROWS = 60;
    @TempDir
    Path dir;
    Path plan;
    double[][] columns;

    record Outcome(int code, String out, String err) {
        /** The one line on stderr, without the line break. */
        String line() {
            assertTrue(err.endsWith(System.lineSeparator()), err);
            String l = err.substring(0, err.length() - System.lineSeparator().length());
            assertFalse(l.contains("\n") || l.contains("\r"), "more than one line: " + err);
            return l;
        }
    }

    static Outcome run(String... args) {
        ByteArrayOutputStream out = new ByteArrayOutputStream();
        ByteArrayOutputStream err = new ByteArrayOutputStream();
        int code = CommandLine.execute(args, new PrintStream(out, true, StandardCharsets.UTF_8),
                new PrintStream(err, true, StandardCharsets.UTF_8));
        return new Outcome(code, out.toString(StandardCharsets.UTF_8), err.toString(StandardCharsets.UTF_8));
    }

    static void refused(Outcome o, String fragment) {
        assertEquals(2, o.code(), o.err());
        assertTrue(o.line().contains(fragment), "expected \"" + fragment + "\" in: " + o.err());
        assertEquals("", o.out());
    }

    /** A seeded random design: y = 1 + 0.5 x + noise, with controls z1, z2 and a two-level group. */
    @BeforeEach
    void writeDataAndPlan() throws IOException {
        SplittableRandom random = new SplittableRandom(5);
        columns = new double[4][ROWS];
        StringBuilder csv = new StringBuilder("y,x,z1,z2,group\n");
        for (int i = 0; i < ROWS; i++) {
            double x = random.nextGaussian();
            double z1 = random.nextGaussian() + 0.3 * x;
            double z2 = random.nextGaussian();
            double y = 1 + 0.5 * x - 0.2 * z1 + 0.1 * z2 + random.nextGaussian();
            columns[0][i] = y;
            columns[1][i] = x;
            columns[2][i] = z1;
            columns[3][i] = z2;
            csv.append(y).append(',').append(x).append(',').append(z1).append(',').append(z2).append(',')
                    .append(i % 2 == 0 ? "even" : "odd").append('\n');
        }
        Files.writeString(dir.resolve("wards.csv"), csv);
        plan = dir.resolve("plan.json");
        Files.writeString(plan, "{\"data\": \"wards.csv\", \"decisions\": ["
                + "{\"name\": \"outcome\", \"kind\": \"outcome\", \"alternatives\": [{\"label\": \"y\", \"column\": \"y\"}]},"
                + "{\"name\": \"key\", \"kind\": \"predictor\", \"alternatives\": [{\"label\": \"x\", \"column\": \"x\"}]},"
                + "{\"name\": \"controls\", \"kind\": \"controls\", \"optional\": [\"z1\", \"z2\"]},"
                + "{\"name\": \"errors\", \"kind\": \"errors\", \"alternatives\": [\"classical\", \"HC1\"]}]}");
    }

    static List<CSVRecord> records(Path file) throws IOException {
        try (CSVParser p = CSVParser.builder().setPath(file).setCharset(StandardCharsets.UTF_8)
                .setFormat(CSVFormat.RFC4180.builder().setHeader().setSkipHeaderRecord(true).get()).get()) {
            return p.getRecords();
        }
    }

    /** estimate: the time (measured, so only its form is checked) and the memory, and nothing written. */
    @Test
    void estimateSaysWhatARunWouldTakeAndWritesNothing() throws IOException {
        Outcome o = run("estimate", plan.toString(), "--threads", "1", "--null-draws", "5");
        assertEquals(0, o.code(), o.err());
        List<String> lines = o.out().lines().toList();
        assertEquals(2, lines.size(), o.out());
        assertTrue(lines.get(0).startsWith("time: ") && lines.get(0).contains(" on 1 thread (fitting ")
                && lines.get(0).contains("null draws") && lines.get(0).contains("of the 8 specifications fitted on "
                + "this machine"), lines.get(0));
        assertTrue(lines.get(1).startsWith("memory: about ") && lines.get(1).contains("of a limit of"), lines.get(1));
        try (var files = Files.list(dir)) {
            assertEquals(2, files.count(), "only the data and the plan");
        }
        refused(run("estimate"), "estimate needs a plan file");
        refused(run("estimate", plan.toString(), "--out", "x"), "unknown option --out");
        Files.writeString(plan, Files.readString(plan).replace("\"column\": \"x\"", "\"column\": \"xx\""));
        refused(run("estimate", plan.toString()), "plan.json, decisions[1].alternatives[0].column");
    }

    @Test
    void aSuccessfulRunWritesTheDocumentedFilesWithCorrectEstimates() throws IOException {
        Path out = dir.resolve("results");
        Outcome o = run("run", plan.toString(), "--out", out.toString());
        assertEquals(0, o.code(), o.err());
        assertEquals("", o.err());
        assertTrue(o.out().startsWith("fitted 8 of 8 specifications in "), o.out());
        assertEquals(List.of("spec", "outcome", "key", "controls", "errors", "estimate", "std_error", "statistic", "df",
                "p_value", "ci_low", "ci_high", "std_estimate", "effect", "effect_std_error", "n_obs", "n_params", "r2", "adj_r2",
                "model_p_value", "deviance", "status"),
                Arrays.asList(Files.readAllLines(out.resolve("specifications.csv")).get(0).split(",")));
        List<CSVRecord> rows = records(out.resolve("specifications.csv"));
        assertEquals(8, rows.size());
        // specification 7 (1-based) is controls = z1 + z2, classical errors
        CSVRecord full = rows.get(6);
        assertEquals(List.of("7", "y", "x", "z1 + z2", "classical"), full.toList().subList(0, 5));
        OLSMultipleLinearRegression ols = new OLSMultipleLinearRegression();
        double[][] x = new double[ROWS][];
        for (int i = 0; i < ROWS; i++) {
            x[i] = new double[] {columns[2][i], columns[3][i], columns[1][i]};
        }
        ols.newSampleData(columns[0], x);
        // Apache Commons Math 3.6.1 OLSMultipleLinearRegression, an implementation outside this project
        assertEquals(ols.estimateRegressionParameters()[3], Double.parseDouble(full.get("estimate")), 1e-9);
        assertEquals(ols.estimateRegressionParametersStandardErrors()[3], Double.parseDouble(full.get("std_error")), 1e-9);
        assertEquals(ols.calculateRSquared(), Double.parseDouble(full.get("r2")), 1e-9);
        assertEquals(String.valueOf(ROWS), full.get("n_obs"));
        assertEquals("4", full.get("n_params"));
        assertEquals("ok", full.get("status"));
        JsonNode summary = JsonMapper.builder().build().readTree(out.resolve("summary.json").toFile());
        for (String key : List.of("specifications", "fitted", "failed", "median_estimate", "share_positive",
                "share_significant_positive", "share_significant_negative")) {
            assertTrue(summary.has(key), key);
        }
        assertEquals(8, summary.get("specifications").asInt());
        assertEquals(8, summary.get("fitted").asInt());
        assertEquals(0, summary.get("failed").asInt());
        assertEquals(Files.readString(plan), Files.readString(out.resolve("plan.json")));
    }

    @Test
    void aSeededSampleFitsExactlyTheSampledSpecificationsAndRepeatsWithTheSameSeed() throws IOException {
        Path a = dir.resolve("a");
        Path b = dir.resolve("b");
        Path c = dir.resolve("c");
        assertEquals(0, run("run", plan.toString(), "--out", a.toString(), "--sample", "3", "--seed", "9").code());
        assertEquals(0, run("run", plan.toString(), "--sample=3", "--seed=9", "--out=" + b).code());
        assertEquals(0, run("run", plan.toString(), "--out", c.toString(), "--sample", "3", "--seed", "-4").code());
        long[] expected = new SpecificationSpace(new PlanReader(false).read(plan)).indices(3, 9);
        List<String> specs = records(a.resolve("specifications.csv")).stream().map(r -> r.get("spec")).toList();
        assertEquals(Arrays.stream(expected).mapToObj(i -> String.valueOf(i + 1)).toList(), specs);
        assertEquals(Files.readString(a.resolve("specifications.csv")), Files.readString(b.resolve("specifications.csv")));
        assertEquals(3, records(c.resolve("specifications.csv")).size());
    }

    @Test
    void summaryJsonRecordsTheRunsProvenance() throws Exception {
        // a byte-order mark, which the plan's text drops: the hash is of the file's bytes as read
        byte[] planBytes = ("\uFEFF" + Files.readString(plan)).getBytes(StandardCharsets.UTF_8);
        Files.write(plan, planBytes);
        Path out = dir.resolve("results");
        Outcome o = run("run", plan.toString(), "--out", out.toString(), "--threads", "1", "--seed", "13");
        assertEquals(0, o.code(), o.err());
        JsonNode summary = JsonMapper.builder().build().readTree(out.resolve("summary.json").toFile());
        List<String> keys = new ArrayList<>(summary.propertyNames());
        assertEquals("provenance", keys.get(keys.size() - 1));
        JsonNode p = summary.get("provenance");
        assertEquals(List.of("version", "plan_sha256", "data_sha256", "seed", "command", "started", "java", "threads"),
                new ArrayList<>(p.propertyNames()));
        // java.security.MessageDigest on the same bytes
        assertEquals(sha256(planBytes), p.get("plan_sha256").asString());
        assertEquals(sha256(Files.readAllBytes(dir.resolve("wards.csv"))), p.get("data_sha256").asString());
        assertEquals(13, p.get("seed").asLong());
        assertEquals("run " + plan + " --out " + out + " --threads 1 --seed 13", p.get("command").asString());
        assertEquals(1, p.get("threads").asInt());
        assertEquals(System.getProperty("java.version"), p.get("java").asString());
        assertEquals(run("--version").out().trim(), "forkscape " + p.get("version").asString());
        assertTrue(p.get("started").asString().matches("\\d{4}-\\d\\d-\\d\\dT\\d\\d:\\d\\d:\\d\\dZ"),
                p.get("started").asString());
    }

    private static String sha256(byte[] bytes) throws NoSuchAlgorithmException {
        return HexFormat.of().formatHex(MessageDigest.getInstance("SHA-256").digest(bytes));
    }

    @Test
    void theThreadCountDoesNotChangeTheResults() throws IOException {
        Path one = dir.resolve("one");
        Path two = dir.resolve("two");
        assertEquals(0, run("run", plan.toString(), "--out", one.toString(), "--threads", "1").code());
        assertEquals(0, run("run", plan.toString(), "--out", two.toString(), "--threads", "2").code());
        assertEquals(Files.readString(one.resolve("specifications.csv")), Files.readString(two.resolve("specifications.csv")));
    }

    @Test
    void badOptionsAreRefusedBeforeAnythingIsRead() {
        String out = dir.resolve("o").toString();
        refused(run("run", plan.toString(), "--out", out, "--output", "x"), "unknown option --output; the options are "
                + "--max-memory, --max-null-draws, --max-specifications, --null-cluster, --null-draws, --null-method, --out, --sample, "
                + "--seed, --threads");
        refused(run("run", plan.toString(), "--out", out, "-o", "x"), "unknown option -o");
        refused(run("run", plan.toString()), "run needs --out DIR");
        refused(run("run", "--out", out), "run needs a plan file");
        refused(run("run", plan.toString(), "other.json", "--out", out), "run takes one plan file, found 2");
        refused(run("run", plan.toString(), "--out"), "--out needs a value");
        refused(run("run", plan.toString(), "--out", out, "--sample", "3", "--sample", "4"), "--sample is given twice");
        refused(run("run", plan.toString(), "--out", out, "--sample", "0"), "--sample must be between 1 and 2,147,483,647");
        refused(run("run", plan.toString(), "--out", out, "--sample", "2.5"), "--sample must be a whole number; found \"2.5\"");
        refused(run("run", plan.toString(), "--out", out, "--seed", "x9"), "--seed must be a whole number; found \"x9\"");
        refused(run("run", plan.toString(), "--out", out, "--threads", "0"), "--threads must be between 1 and 1,024");
        refused(run("run", plan.toString(), "--out", out, "--max-specifications", "-1"), "--max-specifications must be "
                + "between 1 and");
        refused(run("run", dir.resolve("missing.json").toString(), "--out", out), "no plan file at "
                + dir.resolve("missing.json"));
        assertFalse(Files.exists(dir.resolve("o")));
    }

    @Test
    void anOutputPathThatIsAFileIsRefused() throws IOException {
        Path file = Files.writeString(dir.resolve("taken"), "x");
        refused(run("run", plan.toString(), "--out", file.toString()), "is a file; give a folder for the results");
        assertEquals("x", Files.readString(file));
    }

    @Test
    void noCommandAndHelp() {
        Outcome none = run();
        assertEquals(2, none.code());
        assertTrue(none.line().contains("no command given"));
        Outcome help = run("help");
        assertEquals(0, help.code());
        assertTrue(help.out().contains("run PLAN.json --out DIR [--sample N --seed S]"), help.out());
        assertTrue(CommandLine.handles(new String[] {"run"}));
        assertFalse(CommandLine.handles(new String[] {"--server.port=9000"}));
        assertFalse(CommandLine.handles(new String[0]));
    }

    @Test
    void tooManySpecificationsGivesTheCountTheCapAndTheWayToSample() throws IOException {
        StringBuilder header = new StringBuilder("y,x");
        List<String> controls = new ArrayList<>();
        for (int j = 1; j <= 20; j++) {
            header.append(",c").append(j);
            controls.add("\"c" + j + "\"");
        }
        SplittableRandom random = new SplittableRandom(8);
        StringBuilder csv = new StringBuilder(header).append('\n');
        for (int i = 0; i < 40; i++) {
            for (int j = 0; j < 22; j++) {
                csv.append(j == 0 ? "" : ",").append(random.nextGaussian());
            }
            csv.append('\n');
        }
        Files.writeString(dir.resolve("wide.csv"), csv);
        Path wide = Files.writeString(dir.resolve("wide.json"), "{\"data\": \"wide.csv\", \"decisions\": ["
                + "{\"name\": \"y\", \"kind\": \"outcome\", \"alternatives\": [{\"label\": \"y\", \"column\": \"y\"}]},"
                + "{\"name\": \"x\", \"kind\": \"predictor\", \"alternatives\": [{\"label\": \"x\", \"column\": \"x\"}]},"
                + "{\"name\": \"c\", \"kind\": \"controls\", \"optional\": [" + String.join(", ", controls) + "]}]}");
        Path out = dir.resolve("wide-out");
        refused(run("run", wide.toString(), "--out", out.toString()), "wide.json, decisions: the plan has 1,048,576 "
                + "specifications, above the cap of 1,000,000; fit a seeded random sample instead with --sample N --seed S");
        assertFalse(Files.exists(out));
        Outcome sampled = run("run", wide.toString(), "--out", out.toString(), "--sample", "50", "--seed", "2");
        assertEquals(0, sampled.code(), sampled.err());
        assertEquals(50, records(out.resolve("specifications.csv")).size());
        Outcome raised = run("run", plan.toString(), "--out", dir.resolve("r").toString(), "--max-specifications", "7");
        refused(raised, "plan.json, decisions: the plan has 8 specifications, above the cap of 7");
    }

    @Test
    void aRunWithNothingFittedLeavesAnEarlierResultUntouched() throws IOException {
        Path out = Files.createDirectories(dir.resolve("earlier"));
        Files.writeString(out.resolve("specifications.csv"), "from an earlier run\n");
        Files.writeString(dir.resolve("plan.json"), Files.readString(plan).replace("\"HC1\"]", "\"cluster:group\"]")
                .replace("\"classical\", ", "").replace("[\"z1\", \"z2\"]", "[]"));
        String csv = Files.readString(dir.resolve("wards.csv")).replace(",odd\n", ",even\n");
        Files.writeString(dir.resolve("wards.csv"), csv);
        // refused at the check, before fitting: every specification would fail
        refused(run("run", plan.toString(), "--out", out.toString()), "plan.json, decisions[3]: every specification is "
                + "bound to fail: its errors cluster on \"group\", which has a single value in the data");
        try (var files = Files.list(out)) {
            assertEquals(List.of(out.resolve("specifications.csv")), files.toList());
        }
        assertEquals("from an earlier run\n", Files.readString(out.resolve("specifications.csv")));
    }

    @Test
    void aRerunRemovesTheEarlierRunsResultFilesItDoesNotWriteAndNothingElse() throws IOException {
        Path out = dir.resolve("rerun");
        Outcome first = run("run", plan.toString(), "--out", out.toString(), "--null-draws", "20", "--seed", "3");
        assertEquals(0, first.code(), first.err());
        try (var files = Files.list(out)) {
            // check.json, also among the earlier results, is written by check, not by run
            assertEquals(EarlierResultFiles.NAMES.stream().filter(n -> !n.equals(ReleaseCheck.FILE)).sorted().toList(),
                    files.map(f -> f.getFileName().toString()).sorted().toList(), "every file a run writes is listed");
        }
        Files.writeString(out.resolve("notes.txt"), "the reviewer's notes\n");
        Files.createDirectories(out.resolve("older"));
        Files.writeString(out.resolve("older").resolve("null-draws.csv"), "kept\n");
        refused(run("run", plan.toString(), "--out", out.toString(), "--sample", "0"), "--sample must be between");
        assertTrue(Files.exists(out.resolve("null-draws.csv")), "a refused rerun leaves the earlier result whole");

        Outcome second = run("run", plan.toString(), "--out", out.toString());
        assertEquals(0, second.code(), second.err());
        try (var files = Files.list(out)) {
            assertEquals(List.of("notes.txt", "older", "overfitting.csv", "plan.json", "specifications.csv",
                    "summary.json"), files.map(f -> f.getFileName().toString()).sorted().toList());
        }
        assertFalse(JsonMapper.builder().build().readTree(out.resolve("summary.json").toFile()).has("null"));
        assertEquals("the reviewer's notes\n", Files.readString(out.resolve("notes.txt")));
        assertEquals("kept\n", Files.readString(out.resolve("older").resolve("null-draws.csv")));
    }

    @Test
    void aRerunLeavesAFolderOfAResultFilesNameAlone() throws IOException {
        Path out = Files.createDirectories(dir.resolve("odd").resolve("null-draws.csv")).getParent();
        Outcome o = run("run", plan.toString(), "--out", out.toString());
        assertEquals(0, o.code(), o.err());
        assertTrue(Files.isDirectory(out.resolve("null-draws.csv")));
    }

    @Test
    void aMessageQuotingALineBreakStaysOneLine() throws IOException {
        Files.writeString(dir.resolve("wards.csv"), "\"y\nmeasured\",x\n1,2\n3,4\n5,7\n");
        Files.writeString(plan, Files.readString(plan).replace("\"column\": \"y\"", "\"column\": \"y measured\"")
                .replace("\"optional\": [\"z1\", \"z2\"]", "\"optional\": []"));
        refused(run("run", plan.toString(), "--out", dir.resolve("o").toString()), "did you mean \"y\\nmeasured\"?");
    }

    @Test
    void oneLineEscapesControlCharacters() {
        assertEquals("a\\nb\\r\\tc\\u0007d\\u2028", CommandLine.oneLine("a\nb\r\tc\u0007d\u2028"));
        assertEquals("plain é 日", CommandLine.oneLine("plain é 日"));
    }
}
