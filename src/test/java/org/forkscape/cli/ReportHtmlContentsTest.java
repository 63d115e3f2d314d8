package org.forkscape.cli;

import static org.forkscape.cli.CommandLineTest.run;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import java.io.Reader;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import javax.swing.text.MutableAttributeSet;
import javax.swing.text.html.HTML;
import javax.swing.text.html.HTMLEditorKit;
import javax.swing.text.html.parser.ParserDelegator;
import org.forkscape.cli.CommandLineTest.Outcome;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import tools.jackson.databind.JsonNode;
import tools.jackson.databind.json.JsonMapper;

/**
 * What report.html holds besides the figure and tables, read back with the JDK's own HTML parser (Swing's
 * {@code ParserDelegator}, not the project's writer): the reported specification, placed as summary.json's
 * {@code reported} places it, and the release check as check.json records it, rule by rule; and, for a run
 * without either, the sentences that say so.
 */
class ReportHtmlContentsTest {
    private static final JsonMapper MAPPER = JsonMapper.builder().build();
    private static final String REPORTED = ReportFixture.ONE_GROUP.replace("\"data\": \"data.csv\",",
            "\"data\": \"data.csv\", \"reported\": {\"outcome\": \"turnout\", \"outreach\": \"hours\", "
                    + "\"controls\": \"median_age + rainfall\", \"errors\": \"HC1\"},");
    @TempDir
    Path dir;

    /** The text of every table by id (rows of cells) and of every element with an id. */
    private record Page(Map<String, List<List<String>>> tables, Map<String, String> byId) {
    }

    private static Page parse(Path html) throws IOException {
        Map<String, List<List<String>>> tables = new LinkedHashMap<>();
        Map<String, String> byId = new LinkedHashMap<>();
        HTMLEditorKit.ParserCallback callback = new HTMLEditorKit.ParserCallback() {
            private String table;
            private List<String> row;
            private StringBuilder cell;
            private String idOpen;
            private HTML.Tag idTag;
            private StringBuilder idText;

            @Override
            public void handleStartTag(HTML.Tag t, MutableAttributeSet a, int pos) {
                Object id = a.getAttribute(HTML.Attribute.ID);
                if (t == HTML.Tag.TABLE) {
                    table = String.valueOf(id);
                    tables.put(table, new ArrayList<>());
                } else if (t == HTML.Tag.TR && table != null) {
                    row = new ArrayList<>();
                } else if ((t == HTML.Tag.TD || t == HTML.Tag.TH) && row != null) {
                    cell = new StringBuilder();
                } else if (id != null && idOpen == null && t == HTML.Tag.P) {
                    idOpen = id.toString();
                    idTag = t;
                    idText = new StringBuilder();
                }
            }

            @Override
            public void handleText(char[] data, int pos) {
                if (cell != null) {
                    cell.append(data);
                }
                if (idText != null) {
                    idText.append(data);
                }
            }

            @Override
            public void handleEndTag(HTML.Tag t, int pos) {
                if ((t == HTML.Tag.TD || t == HTML.Tag.TH) && cell != null) {
                    row.add(cell.toString().strip());
                    cell = null;
                } else if (t == HTML.Tag.TR && row != null) {
                    tables.get(table).add(row);
                    row = null;
                } else if (t == HTML.Tag.TABLE) {
                    table = null;
                } else if (t == idTag && idOpen != null) {
                    byId.put(idOpen, idText.toString().strip());
                    idOpen = null;
                    idText = null;
                }
            }
        };
        try (Reader r = Files.newBufferedReader(html, StandardCharsets.UTF_8)) {
            new ParserDelegator().parse(r, callback, true);
        }
        return new Page(tables, byId);
    }

    @Test
    void theReportedSpecificationAndTheReleaseCheckAreThoseOfSummaryJsonAndCheckJson() throws IOException {
        Path runFolder = ReportFixture.runFolder(dir, REPORTED, "--null-draws", "19", "--seed", "5");
        Path policy = dir.resolve("policy.json");
        Files.writeString(policy, "{\"rows_per_coefficient\": {\"at_least\": 1}, \"reported_percentile\": "
                + "{\"from\": 0, \"to\": 100}, \"plan_locked\": {}}");
        Outcome checked = run("check", runFolder.toString(), "--policy", policy.toString());
        assertEquals(3, checked.code(), "plan_locked fails on an unlocked plan: " + checked.out() + checked.err());
        Path out = dir.resolve("report");
        ReportFixture.report(runFolder, out);
        Page page = parse(out.resolve("report.html"));

        JsonNode reported = MAPPER.readTree(runFolder.resolve("summary.json").toFile()).get("reported");
        JsonNode fitted = reported.get("scales").get("as_fitted");
        String sentence = page.byId().get("reported-sentence");
        assertTrue(sentence.startsWith("The reported specification (number " + reported.get("spec").asString()
                + "; outcome: turnout, outreach: hours, controls: median_age + rainfall, errors: HC1): the reported "
                + "estimate, "), sentence);
        assertTrue(sentence.contains("of the " + fitted.get("specifications").asInt() + " specifications"), sentence);
        List<List<String>> scales = page.tables().get("reported");
        assertEquals(List.of("Scale", "Value", "Rank (1 = smallest)", "Percentile", "Share smaller",
                "Share significant in its sign", "Among"), scales.get(0));
        List<String> asFitted = scales.get(1);
        assertEquals("as fitted", asFitted.get(0));
        assertEquals(fitted.get("value").doubleValue(), Double.parseDouble(asFitted.get(1)),
                4e-4 * Math.abs(fitted.get("value").doubleValue()), "four significant digits");
        assertEquals(fitted.get("rank").asInt() + " of " + fitted.get("specifications").asInt(), asFitted.get(2));
        assertEquals(fitted.get("percentile").doubleValue(), Double.parseDouble(asFitted.get(3)), 0.5,
                "three significant digits");
        assertEquals(Math.round(1000 * fitted.get("share_smaller").doubleValue()) / 10.0,
                Double.parseDouble(asFitted.get(4).replace("%", "")), 1e-9);
        Map<String, String> names = Map.of("as_fitted", "as fitted", "average_marginal_effect",
                "average marginal effect", "standardized", "standardized coefficient", "partial_correlation",
                "partial correlation", "t_statistic", "t statistic");
        List<String> expected = new ArrayList<>();
        reported.get("scales").properties().forEach(e -> expected.add(names.get(e.getKey())));
        assertEquals(expected, scales.subList(1, scales.size()).stream().map(r -> r.get(0)).toList(),
                "every scale summary.json places it on, in its order");

        JsonNode check = MAPPER.readTree(runFolder.resolve("check.json").toFile());
        assertEquals("Failed: 1 of 3 rules. The rules and their levels are the review group's judgement, not a "
                + "standard; passing them does not show that the effect is causal.", page.byId().get("check-verdict"));
        List<List<String>> rules = page.tables().get("release-check");
        assertEquals(List.of("Rule", "Result", "Measured", "Measured, as in check.json", "Required"), rules.get(0));
        assertEquals(1 + check.get("rules").size(), rules.size());
        for (int i = 0; i < check.get("rules").size(); i++) {
            JsonNode rule = check.get("rules").get(i);
            List<String> row = rules.get(i + 1);
            assertEquals(rule.get("rule").asString(), row.get(0));
            assertEquals(rule.get("result").asString(), row.get(1));
            assertEquals(rule.get("detail").asString(), row.get(2));
            if (rule.get("measured").isNumber()) {
                assertEquals(rule.get("measured").doubleValue(), Double.parseDouble(row.get(3)), 0.0, row.toString());
            }
            assertEquals(rule.get("requirement").asString(), row.get(4));
        }
        assertEquals(List.of("pass", "pass", "fail"), rules.subList(1, 4).stream().map(r -> r.get(1)).toList());
    }

    @Test
    void aRunWithoutAReportedSpecificationOrACheckSaysSo() throws IOException {
        Path runFolder = ReportFixture.runFolder(dir, ReportFixture.ONE_GROUP);
        Path out = dir.resolve("report");
        ReportFixture.report(runFolder, out);
        Page page = parse(out.resolve("report.html"));
        assertTrue(page.byId().get("reported-sentence").startsWith("The plan names no reported specification"),
                page.byId().toString());
        assertTrue(page.byId().get("check-verdict").startsWith("No release check was run on this run"));
        assertEquals(null, page.tables().get("release-check"));
        assertEquals(null, page.tables().get("reported"));
    }
}
