package org.forkscape.cli;

import static org.forkscape.cli.CommandLineTest.run;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNotEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import java.io.Reader;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.SplittableRandom;
import org.apache.commons.csv.CSVFormat;
import org.apache.commons.csv.CSVRecord;
import org.forkscape.cli.CommandLineTest.Outcome;
import org.junit.jupiter.api.BeforeEach;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import tools.jackson.databind.JsonNode;
import tools.jackson.databind.json.JsonMapper;

/**
 * {@code compare RUN_A RUN_B --out DIR} on runs the batch command makes here, called in-process. The
 * expected counts are the plan's arithmetic (an all-subsets controls decision over k controls has 2^k
 * alternatives), and the shared specifications are checked against the two specifications.csv files
 * read here with Commons CSV, matched by their labels.
 */
class CompareCommandTest {
    private static final String NL = System.lineSeparator();
    private static final JsonMapper MAPPER = JsonMapper.builder().build();
    private static final List<String> LABELS = List.of("outcome", "key", "controls", "errors");
    @TempDir
    Path dir;

    /** A seeded invented scenario: library visits in 90 neighbourhoods against the distance to the branch. */
    @BeforeEach
    void writeData() throws IOException {
        SplittableRandom random = new SplittableRandom(41);
        StringBuilder csv = new StringBuilder("visits,distance,age,density,income\n");
        for (int i = 0; i < 90; i++) {
            double distance = random.nextDouble(0.1, 8);
            double age = random.nextGaussian() + 0.1 * distance;
            double density = random.nextGaussian();
            double income = random.nextGaussian() - 0.2 * distance;
            double visits = 40 - 1.5 * distance + age + 0.4 * density + 0.8 * income + 4 * random.nextGaussian();
            csv.append(visits).append(',').append(distance).append(',').append(age).append(',').append(density)
                    .append(',').append(income).append('\n');
        }
        Files.writeString(dir.resolve("neighbourhoods.csv"), csv);
    }

    private Path runOf(String name, String required, String optional, String... options) throws IOException {
        Path plan = dir.resolve(name + ".json");
        Files.writeString(plan, "{\"data\": \"neighbourhoods.csv\", \"decisions\": ["
                + "{\"name\": \"outcome\", \"kind\": \"outcome\", \"alternatives\": [{\"label\": \"visits\", \"column\": \"visits\"}]},"
                + "{\"name\": \"key\", \"kind\": \"predictor\", \"alternatives\": [{\"label\": \"distance\", \"column\": \"distance\"}]},"
                + "{\"name\": \"controls\", \"kind\": \"controls\", \"required\": [" + required + "], \"optional\": ["
                + optional + "]},"
                + "{\"name\": \"errors\", \"kind\": \"errors\", \"alternatives\": [\"classical\", \"HC1\"]}]}");
        Path out = dir.resolve(name);
        List<String> args = new ArrayList<>(List.of("run", plan.toString(), "--out", out.toString(),
                "--threads", "1"));
        args.addAll(List.of(options));
        Outcome o = run(args.toArray(String[]::new));
        assertEquals(0, o.code(), o.err());
        return out;
    }

    @Test
    void oneAddedControlKeepsTheSharedSpecificationsIdenticalAndAddsAsManyAsTheArithmeticSays() throws IOException {
        Path a = runOf("authors", "", "\"age\", \"density\"");
        // income listed first, so that shared specifications take other numbers in B than in A
        Path b = runOf("reviewer", "", "\"income\", \"age\", \"density\"");
        Path out = dir.resolve("comparison");
        Outcome o = run("compare", a.toString(), b.toString(), "--out", out.toString());
        assertEquals(0, o.code(), o.err());
        assertEquals("", o.err());

        // 2^2 control subsets x 2 error types in A, 2^3 x 2 in B (the plans' arithmetic)
        int sizeA = 4 * 2;
        int sizeB = 8 * 2;
        JsonNode json = MAPPER.readTree(out.resolve("compare.json").toFile());
        JsonNode specs = json.path("specifications");
        assertEquals(sizeA, specs.path("a").asInt());
        assertEquals(sizeB, specs.path("b").asInt());
        assertEquals(sizeA, specs.path("shared").asInt());
        assertEquals(sizeB - sizeA, specs.path("only_b").asInt());
        assertEquals(0, specs.path("only_a").asInt());
        assertTrue(specs.path("shared_identical").asBoolean(), specs.toString());
        assertEquals(0, specs.path("differences").size());
        JsonNode changed = json.path("plan").path("decisions_changed");
        assertEquals(1, changed.size(), changed.toString());
        assertEquals("controls", changed.get(0).path("name").asString());
        assertEquals(List.of("income"), List.of(changed.get(0).path("added").get(0).asString()));
        assertEquals(0, json.path("plan").path("decisions_added").size());
        assertEquals(json.path("sentence").asString() + NL, o.out());
        assertTrue(o.out().startsWith("B adds 1 control (income) to \"controls\"; the 8 shared specifications are "
                + "identical; the 8 added ones move the median from "), o.out());
        assertEquals(sizeA, json.path("headline").path("a").path("specifications").asInt());
        assertEquals(sizeB, json.path("headline").path("b").path("specifications").asInt());
        assertEquals(1, json.path("groups").size());

        // compare.csv against the two runs' own files, matched here by label
        Map<List<String>, CSVRecord> rowsA = byLabels(a.resolve("specifications.csv"));
        Map<List<String>, CSVRecord> rowsB = byLabels(b.resolve("specifications.csv"));
        List<CSVRecord> rows = records(out.resolve("compare.csv"));
        assertEquals(sizeB, rows.size());
        int shared = 0;
        boolean renumbered = false;
        for (CSVRecord r : rows) {
            List<String> labels = LABELS.stream().map(r::get).toList();
            assertEquals("yes", r.get("in_b"));
            assertEquals(rowsB.get(labels).get("spec"), r.get("spec_b"));
            assertEquals(rowsB.get(labels).get("estimate"), r.get("estimate_b"));
            if (r.get("in_a").equals("yes")) {
                shared++;
                CSVRecord inA = rowsA.get(labels);
                assertEquals(inA.get("spec"), r.get("spec_a"));
                for (String column : List.of("estimate", "std_error", "p_value")) {
                    assertEquals(inA.get(column), r.get(column + "_a"));
                    assertEquals(inA.get(column), r.get(column + "_b"), column + " of " + labels);
                }
                assertEquals("yes", r.get("identical"));
                renumbered |= !r.get("spec_a").equals(r.get("spec_b"));
            } else {
                assertFalse(rowsA.containsKey(labels), labels.toString());
                assertTrue(r.get("controls").contains("income"), labels.toString());
                assertEquals("", r.get("identical"));
            }
        }
        assertEquals(sizeA, shared);
        assertTrue(renumbered, "the shared specifications are renumbered in B, so matching by number would fail");
    }

    @Test
    void aRequiredControlAddedToBothMakesEverySharedSpecificationDiffer() throws IOException {
        Path a = runOf("authors", "", "\"age\", \"density\"");
        Path b = runOf("reviewer", "\"income\"", "\"age\", \"density\"");
        Path out = dir.resolve("comparison");
        Outcome o = run("compare", a.toString(), b.toString(), "--out", out.toString());
        assertEquals(0, o.code(), o.err());
        assertTrue(o.out().startsWith("B adds 1 required control (income) to \"controls\"; 8 of the 8 shared "
                + "specifications differ (first: A's specification 1, B's 1, estimate "), o.out());
        JsonNode specs = MAPPER.readTree(out.resolve("compare.json").toFile()).path("specifications");
        assertFalse(specs.path("shared_identical").asBoolean(), specs.toString());
        assertEquals(8, specs.path("shared_differing").asInt());
        assertEquals(8, specs.path("differences").size());
        assertEquals("estimate", specs.path("differences").get(0).path("column").asString());
        List<CSVRecord> rows = records(out.resolve("compare.csv"));
        assertEquals(8, rows.size());
        for (CSVRecord r : rows) {
            assertEquals("no", r.get("identical"));
            assertNotEquals(r.get("estimate_a"), r.get("estimate_b"));
        }
    }

    @Test
    void aRunComparedWithItselfChangesNothingAndHelpNamesTheCommand() throws IOException {
        Path a = runOf("authors", "", "\"age\"");
        Outcome o = run("compare", a.toString(), a.toString(), "--out", dir.resolve("same").toString());
        assertEquals(0, o.code(), o.err());
        assertEquals("B's plan has the same decisions and alternatives as A's; the 4 shared specifications are "
                + "identical." + NL, o.out());
        Outcome help = run("compare", "--help");
        assertEquals(0, help.code());
        assertTrue(help.out().contains("java -jar forkscape.jar compare RUN_A RUN_B --out DIR"), help.out());
        assertTrue(run("help").out().contains("java -jar forkscape.jar compare RUN_A RUN_B --out DIR"));
    }

    @Test
    void aWholeAddedDecisionMakesEverySpecificationOfBItsOwn() throws IOException {
        Path a = runOf("authors", "", "\"age\"");
        Path plan = dir.resolve("reviewer.json");
        Files.writeString(plan, Files.readString(dir.resolve("authors.json")).replace("]}]}", "]},"
                + "{\"name\": \"rows\", \"kind\": \"sample\", \"alternatives\": [{\"label\": \"all\"}, "
                + "{\"label\": \"near\", \"keep\": \"distance < 6\"}]}]}"));
        Path b = dir.resolve("reviewer");
        assertEquals(0, run("run", plan.toString(), "--out", b.toString()).code());
        Outcome o = run("compare", a.toString(), b.toString(), "--out", dir.resolve("comparison").toString());
        assertEquals(0, o.code(), o.err());
        // 2 control subsets x 2 error types in A; times 2 sample alternatives in B
        assertTrue(o.out().startsWith("B adds the decision \"rows\" (2 alternatives); the runs share no "
                + "specification; the 8 added and 4 removed ones move the median from "), o.out());
        JsonNode json = MAPPER.readTree(dir.resolve("comparison").resolve("compare.json").toFile());
        assertEquals("rows", json.path("plan").path("decisions_added").get(0).path("name").asString());
        assertEquals(0, json.path("specifications").path("shared").asInt());
        assertEquals(12, records(dir.resolve("comparison").resolve("compare.csv")).size());
    }

    @Test
    void theJointTestsOfEachRunAndGroupAreCopiedFromItsSummary() throws IOException {
        Path a = runOf("authors", "", "\"age\"", "--null-draws", "19", "--seed", "3");
        Path b = runOf("reviewer", "", "\"age\", \"income\"", "--null-draws", "19", "--seed", "3");
        Path out = dir.resolve("comparison");
        assertEquals(0, run("compare", a.toString(), b.toString(), "--out", out.toString()).code());
        JsonNode json = MAPPER.readTree(out.resolve("compare.json").toFile());
        for (String side : List.of("a", "b")) {
            JsonNode summary = MAPPER.readTree((side.equals("a") ? a : b).resolve("summary.json").toFile());
            JsonNode whole = json.path("headline").path(side).path("joint_tests");
            assertEquals(19, whole.path("draws").asInt(), whole.toString());
            assertEquals(summary.path("null").path("p_median"), whole.path("p_median"));
            assertEquals(summary.path("null").path("p_stouffer"), whole.path("p_stouffer"));
            assertEquals(summary.path("null").path("tests").path("median").path("p_bound"),
                    whole.path("p_bounds").path("median"));
            JsonNode group = json.path("groups").get(0).path(side).path("joint_tests");
            JsonNode tests = summary.path("by_scale").path("groups").get(0).path("null").path("tests");
            assertTrue(tests.path("median").path("p").isNumber(), tests.toString());
            assertEquals(tests.path("median").path("p"), group.path("p_median"));
            assertEquals(tests.path("share_significant").path("p"), group.path("p_share_significant"));
            assertEquals(tests.path("stouffer").path("p_bound"), group.path("p_bounds").path("stouffer"));
        }
    }

    @Test
    void badInputIsOneLineWithExitCodeTwoAndWritesNothing() throws IOException {
        Path a = runOf("authors", "", "\"age\"");
        Path out = dir.resolve("comparison");
        Path empty = Files.createDirectory(dir.resolve("empty"));
        CommandLineTest.refused(run("compare", a.toString(), empty.toString(), "--out", out.toString()),
                empty + ": has no summary.json; give the --out folder of a run");
        CommandLineTest.refused(run("compare", a.toString(), dir.resolve("absent").toString(), "--out",
                out.toString()), "is not a folder");
        CommandLineTest.refused(run("compare", a.toString(), a.toString()), "compare needs --out DIR");
        CommandLineTest.refused(run("compare", a.toString(), "--out", out.toString()),
                "compare takes two run folders, found 1");
        CommandLineTest.refused(run("compare", a.toString(), a.toString(), "--out", a.toString()),
                "--out " + a + " is the run folder " + a);
        Path noSpecifications = dir.resolve("partial");
        Files.createDirectory(noSpecifications);
        Files.copy(a.resolve("summary.json"), noSpecifications.resolve("summary.json"));
        Files.copy(a.resolve("plan.json"), noSpecifications.resolve("plan.json"));
        CommandLineTest.refused(run("compare", a.toString(), noSpecifications.toString(), "--out", out.toString()),
                noSpecifications + ": has no specifications.csv");
        Files.writeString(noSpecifications.resolve("specifications.csv"), "spec,estimate\n1,0.5\n");
        CommandLineTest.refused(run("compare", a.toString(), noSpecifications.toString(), "--out", out.toString()),
                noSpecifications.resolve("specifications.csv") + ": has no column \"outcome\", which plan.json names "
                        + "as a decision");
        Files.writeString(noSpecifications.resolve("summary.json"), "{\"specifications\": ");
        CommandLineTest.refused(run("compare", a.toString(), noSpecifications.toString(), "--out", out.toString()),
                noSpecifications.resolve("summary.json") + ": is not valid JSON");
        assertFalse(Files.exists(out), "a refused comparison writes nothing");
        assertEquals(List.of("plan.json", "specifications.csv", "summary.json", "overfitting.csv").stream().sorted()
                .toList(), Files.list(a).map(p -> p.getFileName().toString()).sorted().toList());
    }

    private static Map<List<String>, CSVRecord> byLabels(Path csv) throws IOException {
        Map<List<String>, CSVRecord> map = new HashMap<>();
        for (CSVRecord r : records(csv)) {
            map.put(LABELS.stream().map(r::get).toList(), r);
        }
        return map;
    }

    private static List<CSVRecord> records(Path csv) throws IOException {
        try (Reader reader = Files.newBufferedReader(csv)) {
            return CSVFormat.RFC4180.builder().setHeader().setSkipHeaderRecord(true).get().parse(reader).getRecords();
        }
    }
}
