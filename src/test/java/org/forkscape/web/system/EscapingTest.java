package org.forkscape.web.system;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.springframework.test.web.servlet.request.MockMvcRequestBuilders.get;
import static org.springframework.test.web.servlet.request.MockMvcRequestBuilders.multipart;
import static org.springframework.test.web.servlet.request.MockMvcRequestBuilders.post;
import static org.springframework.test.web.servlet.request.MockMvcRequestBuilders.put;

import java.io.StringReader;
import java.nio.charset.StandardCharsets;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import org.apache.commons.csv.CSVFormat;
import org.apache.commons.csv.CSVRecord;
import org.forkscape.run.Json;
import org.forkscape.web.CivicTestData;
import org.forkscape.web.WebTest;
import org.junit.jupiter.api.BeforeEach;
import org.junit.jupiter.api.Test;
import org.springframework.http.MediaType;
import org.springframework.mock.web.MockMultipartFile;
import org.springframework.web.util.HtmlUtils;
import tools.jackson.databind.JsonNode;

/**
 * Text from the user (column names, decision names, labels, titles) holding markup, quotes and the
 * characters a spreadsheet runs as a formula travels through every door intact and inert: escaped in the
 * pages, exact in the JSON, and in the exported specifications.csv exact too but with cells that begin
 * with {@code =}, {@code +}, {@code -} or {@code @} prefixed with an apostrophe (OWASP's advice on CSV
 * injection, as {@code run.SpreadsheetSafe} applies it).
 */
class EscapingTest extends WebTest {
    private static final String SCRIPT = "<script>alert(\"x\")</script>";
    private static final String SUM = "=SUM(A1:A9)";
    private static final String COMMAND = "+cmd|' /C calc'!A0";
    private static final String LINK = "@HYPERLINK(\"http://example.org\")";
    private static final String OUTCOME = "<i>outcome</i>";
    private static final String QUOTED = "\"quoted\" turnout";
    private static final String BOLD = "<b>turnout change</b>";
    private static final String MINUS = "-hours";
    private static final String FORMULA = "=log hours";
    private static final String ROWS = "=rows";
    private static final String ALL = "@all";
    private static final String TITLE = "\"><img src=x onerror=alert(3)>";

    private String analysis;

    @BeforeEach
    void data() throws Exception {
        String csv = CivicTestData.csv(200, 31);
        String header = csv.substring(0, csv.indexOf('\n'));
        String names = "district,region,urban,outreach_hours,mailers," + cell(SCRIPT) + "," + cell(LINK) + ","
                + cell(COMMAND) + "," + cell(SUM) + ",turnout,turnout_change";
        MockMultipartFile file = new MockMultipartFile("file", "<names>.csv", "text/csv",
                (names + csv.substring(header.length())).getBytes(StandardCharsets.UTF_8));
        String body = mvc.perform(multipart("/api/analyses").file(file).param("title", TITLE)).andReturn().getResponse()
                .getContentAsString();
        JsonNode created = json(body);
        analysis = created.path("analysis").path("id").asString();
        assertEquals(TITLE, created.path("analysis").path("title").asString());
        assertEquals(List.of("district", "region", "urban", "outreach_hours", "mailers", SCRIPT, LINK, COMMAND, SUM,
                "turnout", "turnout_change"), names(created.path("columns"), "name"));
    }

    @Test
    void pagesShowUserTextEscaped() throws Exception {
        String plan = plan("urban == 1");
        assertEquals(200, mvc.perform(put("/api/analyses/" + analysis + "/plan").contentType(MediaType.APPLICATION_JSON)
                .content(plan)).andReturn().getResponse().getStatus());
        String run = runToEnd(analysis, plan);
        for (String page : List.of("/", "/analyses/" + analysis, "/analyses/" + analysis + "/plan",
                "/analyses/" + analysis + "/runs/" + run)) {
            String html = mvc.perform(get(page)).andReturn().getResponse().getContentAsString();
            assertFalse(html.contains("<img src=x"), page);
            assertFalse(html.contains("<script>alert"), page);
            assertFalse(html.contains("<i>outcome"), page);
            assertTrue(html.contains(HtmlUtils.htmlEscape(TITLE)), page + " shows the title");
        }
        String planPage = mvc.perform(get("/analyses/" + analysis + "/plan")).andReturn().getResponse().getContentAsString();
        assertTrue(planPage.contains(HtmlUtils.htmlEscape(OUTCOME)), "the plan text is in the page, escaped");
        String dataPage = mvc.perform(get("/analyses/" + analysis)).andReturn().getResponse().getContentAsString();
        assertTrue(dataPage.contains(HtmlUtils.htmlEscape(SCRIPT)), "the column names are in the page, escaped");

        // a problem that quotes a label, on the plain form, and a run that fails naming its choices
        String duplicate = plan.replace(Json.MAPPER.writeValueAsString(BOLD), Json.MAPPER.writeValueAsString(QUOTED));
        String form = mvc.perform(post("/analyses/" + analysis + "/plan").param("plan", duplicate)).andReturn()
                .getResponse().getContentAsString();
        assertTrue(form.contains(HtmlUtils.htmlEscape("the label \"" + QUOTED + "\" is used twice")), form);
        String failed = runToEnd(analysis, plan("outreach_hours > 1000", "outreach_hours > 1000"));
        String progress = mvc.perform(get("/analyses/" + analysis + "/runs/" + failed)).andReturn().getResponse()
                .getContentAsString();
        assertTrue(progress.contains(HtmlUtils.htmlEscape(OUTCOME + " = " + QUOTED)), progress);
        assertFalse(progress.contains("<i>outcome"));
    }

    @Test
    void theJsonApiCarriesUserTextExactly() throws Exception {
        String base = "/api/analyses/" + analysis + "/runs/" + runToEnd(analysis, plan("urban == 1"));
        JsonNode layout = json(mvc.perform(get(base + "/layout")).andReturn().getResponse().getContentAsString());
        assertEquals(OUTCOME, layout.path("outcome").asString());
        List<String> factors = names(layout.path("factors"), "name");
        assertTrue(factors.containsAll(List.of(OUTCOME, SCRIPT, SUM, COMMAND, LINK, ROWS)), factors.toString());
        List<String> rows = names(layout.path("gridRows"), "label");
        assertTrue(rows.containsAll(List.of(QUOTED, BOLD, MINUS, FORMULA, ALL)), rows.toString());

        JsonNode at = json(mvc.perform(get(base + "/at").param("position", "0")).andReturn().getResponse()
                .getContentAsString());
        assertEquals(OUTCOME, at.path("choices").get(0).path("decision").asString());
        assertTrue(List.of(QUOTED, BOLD).contains(at.path("choices").get(0).path("label").asString()));
        // specification 61 (outcome 1, coding 1, every control, all rows, classical) names every control as the data do
        JsonNode fit = json(mvc.perform(get(base + "/specifications/61/fit")).andReturn().getResponse()
                .getContentAsString());
        assertTrue(names(fit.path("fit").path("coefficients"), "term").containsAll(List.of(SCRIPT, SUM, COMMAND, LINK)),
                fit.toString());
    }

    @Test
    void theExportedCsvKeepsTextExactAndNeutralisesFormulaCells() throws Exception {
        String run = runToEnd(analysis, plan("urban == 1"));
        String csv = mvc.perform(get("/analyses/" + analysis + "/runs/" + run + "/files/specifications.csv"))
                .andReturn().getResponse().getContentAsString(StandardCharsets.UTF_8);
        List<CSVRecord> records = CSVFormat.RFC4180.parse(new StringReader(csv)).getRecords();
        List<String> header = records.get(0).toList();
        assertEquals(OUTCOME, header.get(1), "a name that is not a formula is left as it is");
        assertTrue(header.contains("'" + ROWS), header.toString());
        List<String> cells = new ArrayList<>();
        for (CSVRecord r : records.subList(1, records.size())) {
            cells.addAll(r.toList());
        }
        for (String formula : List.of(MINUS, FORMULA, ALL)) {
            assertTrue(cells.contains("'" + formula), formula);
            assertFalse(cells.contains(formula), formula);
        }
        assertTrue(cells.contains(QUOTED) && cells.contains(BOLD), "other text is exact");
        // the controls label starts with the first chosen control: a formula when that is =SUM(...)
        assertTrue(cells.contains("'" + SUM + " + " + COMMAND), "a controls label that starts with = is neutralised");
        assertTrue(cells.contains(SCRIPT + " + " + LINK), "one that does not is exact");
        for (String cell : cells) {
            assertFalse(!cell.isEmpty() && "=+-@".indexOf(cell.charAt(0)) >= 0 && !isNumber(cell),
                    "a text cell a spreadsheet would run: " + cell);
        }
    }

    private static boolean isNumber(String cell) {
        try {
            Double.parseDouble(cell);
            return true;
        } catch (NumberFormatException e) {
            return false;
        }
    }

    /** The plan over the renamed columns, with a sample rule of its own beside every row. */
    private static String plan(String keep) {
        return plan(null, keep);
    }

    /** @param first the rule of the first sample alternative, or null for every row */
    private static String plan(String first, String keep) {
        Map<String, Object> plan = new LinkedHashMap<>();
        plan.put("title", TITLE);
        plan.put("data", "data.csv");
        plan.put("decisions", List.of(
                Map.of("name", OUTCOME, "kind", "outcome", "alternatives", List.of(
                        Map.of("label", QUOTED, "column", "turnout"), Map.of("label", BOLD, "column", "turnout_change"))),
                Map.of("name", "outreach", "kind", "predictor", "alternatives", List.of(
                        Map.of("label", MINUS, "column", "outreach_hours"),
                        Map.of("label", FORMULA, "column", "outreach_hours", "transform", "log"))),
                Map.of("name", "controls", "kind", "controls", "optional", List.of(SUM, COMMAND, SCRIPT, LINK)),
                Map.of("name", ROWS, "kind", "sample", "alternatives", List.of(
                        first == null ? Map.of("label", ALL) : Map.of("label", ALL, "keep", first),
                        Map.of("label", "kept", "keep", keep))),
                Map.of("name", "errors", "kind", "errors", "alternatives", List.of("classical", "HC1"))));
        return Json.MAPPER.writeValueAsString(plan);
    }

    private static List<String> names(JsonNode array, String field) {
        List<String> out = new ArrayList<>();
        array.forEach(n -> out.add(n.path(field).asString()));
        return out;
    }

    /** A CSV header cell, quoted as RFC 4180 asks when it holds a quote, a comma or a line break. */
    private static String cell(String text) {
        return text.matches("[^\",\r\n]*") ? text : "\"" + text.replace("\"", "\"\"") + "\"";
    }
}
