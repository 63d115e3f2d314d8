package org.forkscape.infer;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.ByteArrayOutputStream;
import java.io.IOException;
import java.io.PrintStream;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.SplittableRandom;
import org.forkscape.cli.CommandLine;
import org.junit.jupiter.api.BeforeEach;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import tools.jackson.databind.JsonNode;
import tools.jackson.databind.json.JsonMapper;

/** The batch command with joint inference: the files and keys it writes, and one-line errors with exit code 2. */
class RunCommandInferenceTest {
    @TempDir
    Path dir;
    private Path plan;
    private String err;
    private String out;

    private static final String PLAN = """
            {"data": "data.csv", %s
             "decisions": [
               {"name": "outcome", "kind": "outcome", "alternatives": [{"label": "y", "column": "%s"}]},
               {"name": "key", "kind": "predictor", "alternatives": [{"label": "x", "column": "x"}]},
               {"name": "controls", "kind": "controls", "optional": ["a", "b"]},
               {"name": "errors", "kind": "errors", "alternatives": [%s]}
             ]}
            """;
    private static final String CLUSTERED = "\"classical\", \"cluster:g\"";

    @BeforeEach
    void data() throws IOException {
        SplittableRandom r = new SplittableRandom(2);
        // district holds schools 0-2 and 3-5; zone cuts across schools; rows is a column named like the word
        // strong carries the same noise as y beside a key effect five times larger
        List<String> lines = new ArrayList<>(List.of("y,x,a,b,g,flat,district,zone,rows,strong"));
        for (int i = 0; i < 60; i++) {
            double x = Scenarios.gaussian(r);
            int school = r.nextInt(6);
            double noise = Scenarios.gaussian(r);
            lines.add((0.4 * x + noise) + "," + x + "," + Scenarios.gaussian(r) + ","
                    + Scenarios.gaussian(r) + ",school" + school + ",3,district" + school / 3 + ",zone" + i % 2
                    + ",room" + school + "," + (2 * x + noise));
        }
        Files.write(dir.resolve("data.csv"), lines);
        plan = writePlan("", "y");
    }

    private Path writePlan(String extraKeys, String outcome) throws IOException {
        return writePlan(extraKeys, outcome, CLUSTERED);
    }

    private Path writePlan(String extraKeys, String outcome, String errors) throws IOException {
        Path p = dir.resolve("plan.json");
        Files.writeString(p, String.format(PLAN, extraKeys, outcome, errors));
        return p;
    }

    private JsonNode nullSection() {
        return JsonMapper.builder().build().readTree(dir.resolve("out/summary.json").toFile()).get("null");
    }

    /** The draws resampled {@code cluster} (null for rows) and said nothing, on stderr or in summary.json. */
    private void assertResampledQuietly(String cluster) {
        JsonNode draws = nullSection();
        assertEquals(cluster == null ? "rows" : "clusters", draws.get("resampled").stringValue());
        if (cluster == null) {
            assertTrue(draws.get("cluster").isNull());
        } else {
            assertEquals(cluster, draws.get("cluster").stringValue());
        }
        assertTrue(draws.get("warning").isNull(), draws.toString());
        assertEquals("", err);
    }

    /** The warning in summary.json is the line on stderr, and says each thing listed. */
    private void assertWarned(String... mustContain) {
        JsonNode warning = nullSection().get("warning");
        assertTrue(warning.isString(), nullSection().toString());
        assertEquals("forkscape: warning: " + warning.stringValue() + System.lineSeparator(), err);
        for (String s : mustContain) {
            assertTrue(warning.stringValue().contains(s), "\"" + s + "\" in: " + warning.stringValue());
        }
        assertEquals(1, out.lines().count(), out);
    }

    private int run(String... options) {
        List<String> args = new ArrayList<>(List.of("run", plan.toString(), "--out", dir.resolve("out").toString()));
        args.addAll(List.of(options));
        ByteArrayOutputStream o = new ByteArrayOutputStream();
        ByteArrayOutputStream e = new ByteArrayOutputStream();
        int code = CommandLine.execute(args.toArray(String[]::new), new PrintStream(o, true, StandardCharsets.UTF_8),
                new PrintStream(e, true, StandardCharsets.UTF_8));
        out = o.toString(StandardCharsets.UTF_8);
        err = e.toString(StandardCharsets.UTF_8);
        return code;
    }

    private void assertRefused(String... mustContain) {
        assertEquals(1, err.lines().count(), err);
        assertTrue(err.startsWith("forkscape: "), err);
        for (String s : mustContain) {
            assertTrue(err.contains(s), "\"" + s + "\" in: " + err);
        }
        assertFalse(Files.exists(dir.resolve("out")), "nothing is written");
    }

    @Test
    void writesTheInferenceSectionsAndFiles() throws IOException {
        assertEquals(0, run("--null-draws", "30", "--seed", "5", "--threads", "2", "--null-cluster", "g"), err);
        JsonNode summary = JsonMapper.builder().build().readTree(dir.resolve("out/summary.json").toFile());
        for (String key : List.of("null", "best", "interval_bounds", "comparable_groups", "overfitting", "influence",
                "influence_overall")) {
            assertTrue(summary.has(key), key);
        }
        JsonNode draws = summary.get("null");
        assertEquals(30, draws.get("draws").intValue());
        assertEquals("bootstrap", draws.get("method").stringValue());
        assertEquals(5, draws.get("seed").longValue());
        assertEquals("g", draws.get("cluster").stringValue());
        for (String key : List.of("p_median", "p_share_significant", "p_stouffer")) {
            assertTrue(draws.get(key).isNumber(), key);
        }
        assertTrue(draws.get("null_quantiles").get("median_estimate").has("97.5"));
        assertTrue(summary.get("best").get("p_adjusted").isNumber());
        assertEquals(5, summary.get("influence").size(), "outcome, key, the two optional controls, errors");
        assertEquals(31, Files.readAllLines(dir.resolve("out/null-draws.csv")).size());
        assertEquals(9, Files.readAllLines(dir.resolve("out/overfitting.csv")).size());
        assertTrue(out.contains("30 null draws: median p "), out);
    }

    @Test
    void twoOutcomesGetTheirTestsAndBandsPerGroupAndTheLineSaysTheWholeRunsMedianPoolsUnits() throws IOException {
        Files.writeString(plan, Files.readString(plan).replace("""
                [{"label": "y", "column": "y"}]""", """
                [{"label": "y", "column": "y"}, {"label": "strong", "column": "strong"}]"""));
        assertEquals(0, run("--null-draws", "12", "--seed", "5", "--null-cluster", "g"), err);
        assertTrue(out.contains("(over every estimate as fitted, which pools different units; per comparable group in "
                + "summary.json's by_scale), share significant "), out);
        JsonNode summary = JsonMapper.builder().build().readTree(dir.resolve("out/summary.json").toFile());
        assertTrue(summary.get("null").get("median_mixes_units").booleanValue());
        JsonNode groups = summary.get("by_scale").get("groups");
        assertEquals(2, groups.size());
        for (JsonNode g : groups) {
            assertEquals(8, g.get("specifications").intValue());
            assertEquals(12, g.get("null").get("tests").get("median").get("draws").intValue());
            assertEquals(8, g.get("null").get("envelope").get("ranks").size());
        }
        assertEquals(16, summary.get("by_scale").get("t_statistic").get("null").get("envelope").get("ranks").size());
    }

    @Test
    void noDrawAsExtremeIsReportedAsABoundWithTheDraws() throws IOException {
        plan = writePlan("", "strong");
        assertEquals(0, run("--null-draws", "19", "--seed", "5", "--null-cluster", "g"), err);
        // 19 draws cannot show a p below 1/20 (North, Curtis & Sham 2002, American Journal of Human Genetics 71(2))
        String bound = "p < 0.05 (1/20; none of 19 draws as extreme)";
        assertTrue(out.contains("; 19 null draws: median " + bound + ", share significant " + bound + ", Stouffer "
                + bound + "; results in "), out);
        JsonNode draws = JsonMapper.builder().build().readTree(dir.resolve("out/summary.json").toFile()).get("null");
        assertEquals(0.0, draws.get("p_median").doubleValue(), 0, "the share of draws, as before");
        for (String test : List.of("median", "share_significant", "stouffer")) {
            JsonNode t = draws.get("tests").get(test);
            assertEquals(0, t.get("exceedances").intValue(), test);
            assertEquals(19, t.get("draws").intValue(), test);
            assertEquals(0.0, t.get("p").doubleValue(), 0, test);
            assertEquals(0.05, t.get("p_bound").doubleValue(), 1e-15, test);
        }
    }

    @Test
    void withoutNullDrawsTheOtherSectionsStillComeOut() throws IOException {
        assertEquals(0, run(), err);
        JsonNode summary = JsonMapper.builder().build().readTree(dir.resolve("out/summary.json").toFile());
        assertFalse(summary.has("null"));
        assertTrue(summary.get("best").get("p_adjusted").isNull());
        assertFalse(Files.exists(dir.resolve("out/null-draws.csv")));
    }

    @Test
    void tooManyDrawsAreRefused() throws IOException {
        assertEquals(2, run("--null-draws", "10001"));
        assertRefused("--null-draws", "cap of 10,000");
        assertEquals(2, run("--null-draws", "60", "--max-null-draws", "50"));
        assertRefused("cap of 50");
        plan = writePlan("\"nullDraws\": 20000,", "y");
        assertEquals(2, run());
        assertRefused("plan.json, nullDraws", "20,000 null draws");
    }

    @Test
    void aSeedMustBeAWholeNumber() throws IOException {
        assertEquals(2, run("--null-draws", "10", "--seed", "1.5"));
        assertRefused("--seed must be a whole number");
        plan = writePlan("\"nullDraws\": 10, \"seed\": \"seven\",", "y");
        assertEquals(2, run());
        assertRefused("plan.json, seed", "whole number");
    }

    @Test
    void nullDrawsNeedAFittedSpecification() throws IOException {
        plan = writePlan("", "flat");
        assertEquals(2, run("--null-draws", "10"));
        assertRefused("every specification is bound to fail");
    }

    @Test
    void badMethodsAndClustersAreRefused() {
        assertEquals(2, run("--null-draws", "10", "--null-method", "shuffle"));
        assertRefused("--null-method must be bootstrap or permute");
        assertEquals(2, run("--null-draws", "10", "--null-method", "permute", "--null-cluster", "g"));
        assertRefused("--null-cluster", "bootstrap only");
        assertEquals(2, run("--null-draws", "10", "--null-cluster", "school"));
        assertRefused("--null-cluster", "\"school\" is not a column");
    }

    @Test
    void byDefaultTheDrawsResampleTheClustersTheErrorsUse() {
        assertEquals(0, run("--null-draws", "20"), err);
        assertResampledQuietly("g");
    }

    @Test
    void rowsAreResampledWhenAskedForAndTheDrawsSayWhichClusteringTheyIgnore() throws IOException {
        assertEquals(0, run("--null-draws", "20", "--null-cluster", "rows"), err);
        assertEquals("rows", nullSection().get("resampled").stringValue());
        assertWarned("The null draws resample single rows, as asked, so they split up the clusters of \"g\" that the "
                + "standard errors use and the joint p-values may be too small; name a column whose clusters contain "
                + "them in nullCluster (--null-cluster COLUMN).");
        plan = writePlan("\"nullDraws\": 20, \"nullCluster\": \"rows\",", "y");
        assertEquals(0, run(), err);
        assertEquals("rows", nullSection().get("resampled").stringValue());
        assertWarned("resample single rows, as asked");
    }

    @Test
    void thePermutationMovesRowsAndSaysSo() {
        assertEquals(0, run("--null-draws", "20", "--null-method", "permute"), err);
        assertEquals("rows", nullSection().get("resampled").stringValue());
        assertWarned("shuffle the key predictor between single rows", "\"g\"", "bootstrap");
        assertEquals(0, run("--null-draws", "20", "--null-method", "permute", "--null-cluster", "rows"), err);
        assertWarned("shuffle the key predictor");
    }

    @Test
    void aColumnWhoseClustersContainTheErrorsClustersKeepsThem() {
        assertEquals(0, run("--null-draws", "20", "--null-cluster", "district"), err);
        assertResampledQuietly("district");
        assertEquals(0, run("--null-draws", "20", "--null-cluster", "zone"), err);
        assertEquals("zone", nullSection().get("cluster").stringValue());
        assertWarned("resample whole clusters of \"zone\"", "the clusters of \"g\"");
    }

    @Test
    void withSeveralClusterColumnsNoneIsChosen() throws IOException {
        plan = writePlan("", "y", "\"cluster:g\", \"cluster:district\"");
        assertEquals(0, run("--null-draws", "20"), err);
        assertEquals("rows", nullSection().get("resampled").stringValue());
        assertWarned("more than one column", "\"g\" and \"district\"");
        assertEquals(0, run("--null-draws", "20", "--null-cluster", "district"), err);
        assertResampledQuietly("district");
    }

    @Test
    void theWordRowsMeansRowsAndAColumnNamedSoIsResampledByDefault() throws IOException {
        plan = writePlan("", "y", "\"HC1\", \"cluster:rows\"");
        assertEquals(0, run("--null-draws", "20"), err);
        assertResampledQuietly("rows");
        assertEquals(0, run("--null-draws", "20", "--null-cluster", "rows"), err);
        assertWarned("resample single rows, as asked", "the clusters of \"rows\"");
    }

    @Test
    void aPlanWithoutClusteredErrorsResamplesRowsWithoutAWarning() throws IOException {
        plan = writePlan("", "y", "\"classical\", \"HC1\"");
        assertEquals(0, run("--null-draws", "20"), err);
        assertResampledQuietly(null);
        assertEquals(0, run("--null-draws", "20", "--null-method", "permute"), err);
        assertResampledQuietly(null);
    }
}
