package org.forkscape.check;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.ByteArrayOutputStream;
import java.io.IOException;
import java.io.PrintStream;
import java.io.Reader;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.SplittableRandom;
import org.apache.commons.csv.CSVFormat;
import org.apache.commons.csv.CSVParser;
import org.apache.commons.csv.CSVRecord;
import org.forkscape.cli.CommandLine;
import org.junit.jupiter.api.BeforeEach;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import tools.jackson.databind.JsonNode;
import tools.jackson.databind.json.JsonMapper;

/**
 * {@code check RUN_DIR --policy POLICY.json} on runs the batch command made here, called in-process. The
 * thresholds are the policies' own (common practice, see README "The release check"); each measured value is
 * compared with the number the test reads itself from the run's summary.json or specifications.csv.
 */
class CheckCommandTest {
    private static final JsonMapper MAPPER = JsonMapper.builder().build();
    private static final String ALL_DEFAULTS = "{\"joint_tests\": {}, \"share_significant\": {}, "
            + "\"reported_percentile\": {\"from\": 0, \"to\": 100}, \"opposite_sign_groups\": {}, "
            + "\"rows_per_coefficient\": {}, \"plan_locked\": {}}";
    @TempDir
    Path dir;

    record Outcome(int code, String out, String err) {
    }

    static Outcome run(String... args) {
        ByteArrayOutputStream out = new ByteArrayOutputStream();
        ByteArrayOutputStream err = new ByteArrayOutputStream();
        int code = CommandLine.execute(args, new PrintStream(out, true, StandardCharsets.UTF_8),
                new PrintStream(err, true, StandardCharsets.UTF_8));
        return new Outcome(code, out.toString(StandardCharsets.UTF_8), err.toString(StandardCharsets.UTF_8));
    }

    /** A seeded invented scenario: turnout in 80 wards against the distance to the polling station (a clear effect). */
    @BeforeEach
    void writeData() throws IOException {
        SplittableRandom random = new SplittableRandom(17);
        StringBuilder csv = new StringBuilder("turnout,distance,age,density\n");
        for (int i = 0; i < 80; i++) {
            double distance = random.nextDouble(0.2, 6);
            double age = random.nextGaussian() + 0.2 * distance;
            double density = random.nextGaussian();
            double turnout = 60 - 2 * distance + age + 0.5 * density + 3 * random.nextGaussian();
            csv.append(turnout).append(',').append(distance).append(',').append(age).append(',').append(density)
                    .append('\n');
        }
        Files.writeString(dir.resolve("wards.csv"), csv);
    }

    private Path plan(String name, boolean reported) throws IOException {
        Path plan = dir.resolve(name);
        Files.writeString(plan, "{\"data\": \"wards.csv\", \"decisions\": ["
                + "{\"name\": \"outcome\", \"kind\": \"outcome\", \"alternatives\": [{\"label\": \"turnout\", \"column\": \"turnout\"}]},"
                + "{\"name\": \"key\", \"kind\": \"predictor\", \"alternatives\": [{\"label\": \"distance\", \"column\": \"distance\"}]},"
                + "{\"name\": \"controls\", \"kind\": \"controls\", \"optional\": [\"age\", \"density\"]},"
                + "{\"name\": \"errors\", \"kind\": \"errors\", \"alternatives\": [\"classical\", \"HC1\"]}]"
                + (reported ? ", \"reported\": {\"outcome\": \"turnout\", \"key\": \"distance\", \"controls\": \"age\", "
                + "\"errors\": \"HC1\"}" : "") + "}");
        return plan;
    }

    private Path runInto(Path plan, String out, String... options) {
        List<String> args = new ArrayList<>(List.of("run", plan.toString(), "--out", dir.resolve(out).toString()));
        args.addAll(List.of(options));
        Outcome o = run(args.toArray(String[]::new));
        assertEquals(0, o.code(), o.err());
        return dir.resolve(out);
    }

    private Path policy(String text) throws IOException {
        Path p = dir.resolve("policy-" + Math.abs(text.hashCode()) + ".json");
        Files.writeString(p, text);
        return p;
    }

    private static JsonNode json(Path file) throws IOException {
        return MAPPER.readTree(file.toFile());
    }

    private static JsonNode rule(JsonNode check, String name) {
        for (JsonNode r : check.path("rules")) {
            if (r.path("rule").asString().equals(name)) {
                return r;
            }
        }
        throw new AssertionError("check.json has no rule " + name + ": " + check);
    }

    /** The smallest n_obs / n_params over fitted rows, read here with Commons CSV. */
    private static double fewestRowsPerCoefficient(Path csv) throws IOException {
        double fewest = Double.POSITIVE_INFINITY;
        try (Reader r = Files.newBufferedReader(csv);
             CSVParser p = CSVParser.parse(r, CSVFormat.RFC4180.builder().setHeader().setSkipHeaderRecord(true).get())) {
            for (CSVRecord row : p) {
                if (row.get("status").equals("ok")) {
                    fewest = Math.min(fewest, Double.parseDouble(row.get("n_obs")) / Double.parseDouble(row.get("n_params")));
                }
            }
        }
        return fewest;
    }

    @Test
    void aLockedRunWithNullDrawsPassesEveryRule() throws IOException {
        Path plan = plan("plan.json", true);
        assertEquals(0, run("lock", plan.toString()).code());
        // 39 draws: a p of 0 means p < 1/40 = 0.025, below the default level 0.05
        Path out = runInto(plan, "results", "--null-draws", "39", "--threads", "1");
        Outcome o = run("check", out.toString(), "--policy", policy(ALL_DEFAULTS).toString());
        assertEquals(0, o.code(), o.out() + o.err());
        assertEquals("", o.err());
        assertTrue(o.out().contains("release check passed"), o.out());
        assertEquals(7, o.out().lines().count(), "one line per rule and the verdict: " + o.out());

        JsonNode summary = json(out.resolve("summary.json"));
        JsonNode check = json(out.resolve("check.json"));
        assertTrue(check.path("passed").asBoolean());
        assertEquals(0, check.path("failed").asInt());
        assertEquals(6, check.path("rules").size());
        for (JsonNode r : check.path("rules")) {
            assertEquals("pass", r.path("result").asString(), r.toString());
        }
        assertEquals(summary.path("null").path("p_stouffer").asDouble(),
                rule(check, "joint_tests").path("measured").path("stouffer").asDouble());
        String sign = summary.path("median_estimate").asDouble() < 0 ? "negative" : "positive";
        assertEquals("negative", sign, "distance lowers turnout in the invented data");
        assertEquals(summary.path("share_significant_negative").asDouble(),
                rule(check, "share_significant").path("measured").asDouble());
        assertEquals(summary.path("reported").path("scales").path("as_fitted").path("percentile").asDouble(),
                rule(check, "reported_percentile").path("measured").asDouble());
        assertEquals(summary.path("scales").path("groups").get(0).path("share_significant_positive").asDouble(),
                rule(check, "opposite_sign_groups").path("measured").asDouble());
        assertEquals(fewestRowsPerCoefficient(out.resolve("specifications.csv")),
                rule(check, "rows_per_coefficient").path("measured").asDouble());
        assertTrue(summary.path("provenance").path("lock").path("plan_matches").asBoolean());
        assertTrue(rule(check, "plan_locked").path("measured").asBoolean());
    }

    @Test
    void aPolicyThatFailsExitsWithThreeAndNamesTheFailingRules() throws IOException {
        Path out = runInto(plan("plan.json", true), "results", "--threads", "1");
        double percentile = json(out.resolve("summary.json")).path("reported").path("scales").path("as_fitted")
                .path("percentile").asDouble();
        String outside = percentile > 50 ? "\"from\": 0, \"to\": " + (percentile - 1)
                : "\"from\": " + (percentile + 1) + ", \"to\": 100";
        Outcome o = run("check", out.toString(), "--policy", policy("{\"rows_per_coefficient\": {\"at_least\": 1000}, "
                + "\"share_significant\": {\"above\": 0}, \"plan_locked\": {}, \"joint_tests\": {}, "
                + "\"reported_percentile\": {" + outside + "}}").toString());
        assertEquals(3, o.code(), o.out() + o.err());
        assertTrue(o.out().contains("release check failed: 4 of 5 rules"), o.out());
        JsonNode check = json(out.resolve("check.json"));
        assertFalse(check.path("passed").asBoolean());
        assertEquals(4, check.path("failed").asInt());
        assertEquals("fail", rule(check, "rows_per_coefficient").path("result").asString());
        assertEquals(fewestRowsPerCoefficient(out.resolve("specifications.csv")),
                rule(check, "rows_per_coefficient").path("measured").asDouble());
        assertEquals("pass", rule(check, "share_significant").path("result").asString());
        assertEquals("fail", rule(check, "plan_locked").path("result").asString());
        assertEquals("the run's plan had no lock", rule(check, "plan_locked").path("detail").asString());
        assertEquals("fail", rule(check, "joint_tests").path("result").asString());
        assertTrue(rule(check, "joint_tests").path("measured").isNull(), "no null draws, nothing measured");
        assertEquals("fail", rule(check, "reported_percentile").path("result").asString());
        assertEquals(percentile, rule(check, "reported_percentile").path("measured").asDouble());
    }

    @Test
    void tooFewDrawsToGoBelowTheLevelFail() throws IOException {
        // 19 draws: a p of 0 only says p < 1/20 = 0.05, which is not below 0.05
        Path out = runInto(plan("plan.json", false), "results", "--null-draws", "19", "--threads", "1");
        Outcome o = run("check", out.toString(), "--policy", policy("{\"joint_tests\": {\"tests\": [\"median\"]}}")
                .toString());
        assertEquals(3, o.code(), o.out() + o.err());
        JsonNode joint = rule(json(out.resolve("check.json")), "joint_tests");
        assertEquals(0.0, joint.path("measured").path("median").asDouble());
        assertEquals("median p < 0.05", joint.path("detail").asString());
    }

    @Test
    void withoutAReportedSpecificationItsRuleDoesNotApply() throws IOException {
        Path out = runInto(plan("plan.json", false), "results", "--threads", "1");
        Outcome o = run("check", out.toString(), "--policy", policy("{\"reported_percentile\": {}}").toString());
        assertEquals(0, o.code(), o.out() + o.err());
        JsonNode r = rule(json(out.resolve("check.json")), "reported_percentile");
        assertEquals("not applicable", r.path("result").asString());
        assertTrue(o.out().startsWith("not applicable reported_percentile: the plan names no reported specification"),
                o.out());
    }

    @Test
    void aMalformedPolicyIsOneLineNamingItsJsonPathAndWritesNothing() throws IOException {
        Path out = runInto(plan("plan.json", false), "results", "--threads", "1");
        String[][] cases = {
                {"{\"joint_tests\": {\"below\": \"0.05\"}}", "joint_tests.below: must be a number from 0 to 1"},
                {"{\"joint_tests\": {\"tests\": [\"median\", \"mean\"]}}", "joint_tests.tests[1]: must be one of"},
                {"{\"rows\": {}}", "rows: unknown rule; the rules are joint_tests"},
                {"{\"share_significant\": {\"abov\": 0.5}}", "share_significant.abov: unknown setting"},
                {"{\"plan_locked\": true}", "plan_locked: must be an object"},
                {"{\"reported_percentile\": {\"from\": 80, \"to\": 20}}", "reported_percentile.to: must not be below"},
                {"{}", "the policy names no rule"},
                {"{\"joint_tests\": {}", "is not valid JSON"},
        };
        for (String[] c : cases) {
            Path policy = policy(c[0]);
            Outcome o = run("check", out.toString(), "--policy", policy.toString());
            assertEquals(2, o.code(), c[0] + ": " + o.err());
            assertEquals("", o.out());
            assertEquals(1, o.err().lines().count(), o.err());
            assertTrue(o.err().startsWith("forkscape: " + policy), o.err());
            assertTrue(o.err().contains(c[1]), c[0] + " -> " + o.err());
            assertFalse(Files.exists(out.resolve("check.json")), "nothing is written for a bad policy");
        }
    }

    @Test
    void aMissingRunFolderOrPolicyIsExitTwo() throws IOException {
        Path policy = policy("{\"plan_locked\": {}}");
        Outcome noFolder = run("check", dir.resolve("absent").toString(), "--policy", policy.toString());
        assertEquals(2, noFolder.code());
        assertTrue(noFolder.err().contains("absent is not a folder"), noFolder.err());
        Path empty = Files.createDirectory(dir.resolve("empty"));
        Outcome noSummary = run("check", empty.toString(), "--policy", policy.toString());
        assertEquals(2, noSummary.code());
        assertTrue(noSummary.err().contains("has no summary.json"), noSummary.err());
        Outcome noPolicy = run("check", empty.toString(), "--policy", dir.resolve("none.json").toString());
        assertEquals(2, noPolicy.code());
        assertTrue(noPolicy.err().contains("none.json: no such policy file"), noPolicy.err());
        Outcome noOption = run("check", empty.toString());
        assertEquals(2, noOption.code());
        assertTrue(noOption.err().contains("check needs --policy POLICY.json"), noOption.err());
    }

    @Test
    void aNewRunIntoTheFolderRemovesTheEarlierCheck() throws IOException {
        Path plan = plan("plan.json", false);
        Path out = runInto(plan, "results", "--threads", "1");
        assertEquals(0, run("check", out.toString(), "--policy", policy("{\"rows_per_coefficient\": {}}").toString())
                .code());
        assertTrue(Files.exists(out.resolve("check.json")));
        runInto(plan, "results", "--threads", "1");
        assertFalse(Files.exists(out.resolve("check.json")), "a check of the earlier results does not stay beside new ones");
    }
}
