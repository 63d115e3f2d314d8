package org.forkscape.web.check;

import static org.hamcrest.Matchers.containsString;
import static org.hamcrest.Matchers.not;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.springframework.test.web.servlet.request.MockMvcRequestBuilders.get;
import static org.springframework.test.web.servlet.request.MockMvcRequestBuilders.post;
import static org.springframework.test.web.servlet.result.MockMvcResultMatchers.content;
import static org.springframework.test.web.servlet.result.MockMvcResultMatchers.redirectedUrl;
import static org.springframework.test.web.servlet.result.MockMvcResultMatchers.status;

import java.io.Reader;
import java.nio.file.Files;
import java.nio.file.Path;
import org.apache.commons.csv.CSVFormat;
import org.apache.commons.csv.CSVParser;
import org.apache.commons.csv.CSVRecord;
import org.forkscape.run.Workspace;
import org.forkscape.web.CivicTestData;
import org.forkscape.web.WebTest;
import org.junit.jupiter.api.BeforeEach;
import org.junit.jupiter.api.Test;
import org.springframework.beans.factory.annotation.Autowired;
import org.springframework.test.web.servlet.MvcResult;
import tools.jackson.databind.JsonNode;

/**
 * The explore page's release-check panel: the form posts a policy, the same check as the batch command's runs on
 * the run folder and writes its check.json, and the page (after the redirect) shows each rule's verdict.
 */
class ReleaseCheckWebTest extends WebTest {
    @Autowired
    Workspace workspace;
    private String analysis;
    private String run;
    private String page;

    @BeforeEach
    void aFinishedRun() throws Exception {
        analysis = upload("check.csv", CivicTestData.csv(150, 9));
        run = runToEnd(analysis, CivicTestData.plan());
        page = "/analyses/" + analysis + "/runs/" + run;
    }

    private MvcResult postPolicy(String policy) throws Exception {
        return mvc.perform(post(page + "/check").param("policy", policy)).andExpect(status().is3xxRedirection())
                .andExpect(redirectedUrl(page + "#release-check")).andReturn();
    }

    /** The smallest n_obs / n_params over the run's fitted rows, read here with Commons CSV. */
    private double fewestRowsPerCoefficient(Path csv) throws Exception {
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
    void beforeAnyCheckThePanelOffersEveryRuleWithItsDefaults() throws Exception {
        mvc.perform(get(page)).andExpect(status().isOk())
                .andExpect(content().string(containsString("id=\"release-check\"")))
                .andExpect(content().string(containsString("&quot;rows_per_coefficient&quot;: {&quot;at_least&quot;: 10}")))
                .andExpect(content().string(containsString("judgement, not a standard")))
                .andExpect(content().string(not(containsString("id=\"check-result\""))));
    }

    @Test
    void aPostedPolicyIsCheckedWrittenAndShownRuleByRule() throws Exception {
        MvcResult posted = postPolicy("{\"rows_per_coefficient\": {\"at_least\": 1}, \"plan_locked\": {}}");
        Path folder = workspace.runFolder(analysis, run);
        JsonNode check = json(Files.readString(folder.resolve("check.json")));
        assertFalse(check.path("passed").asBoolean(), "a web run of an unlocked plan fails plan_locked");
        assertEquals("pass", check.path("rules").get(0).path("result").asString());
        assertEquals(fewestRowsPerCoefficient(folder.resolve("specifications.csv")),
                check.path("rules").get(0).path("measured").asDouble());
        assertEquals("fail", check.path("rules").get(1).path("result").asString());
        String shown = mvc.perform(get(page).flashAttrs(posted.getFlashMap())).andExpect(status().isOk())
                .andReturn().getResponse().getContentAsString();
        assertTrue(shown.contains("data-rule=\"rows_per_coefficient\" data-result=\"pass\""), shown);
        assertTrue(shown.contains("data-rule=\"plan_locked\" data-result=\"fail\""), shown);
        assertTrue(shown.contains("Failed: 1 of 2 rules."), shown);
        assertTrue(shown.contains("the run&#39;s plan had no lock"), shown);
        // the form keeps the policy just checked
        assertTrue(shown.contains("{&quot;rows_per_coefficient&quot;: {&quot;at_least&quot;: 1}, &quot;plan_locked&quot;: {}}</textarea>"), shown);
        // and the page offers check.json among the run's files
        mvc.perform(get(page + "/files/check.json")).andExpect(status().isOk())
                .andExpect(content().string(containsString("\"rule\" : \"rows_per_coefficient\"")));
    }

    @Test
    void aBadPolicyComesBackAsOneSentenceWithItsJsonPathAndWritesNothing() throws Exception {
        MvcResult posted = postPolicy("{\"rows_per_coefficient\": {\"at_least\": \"ten\"}}");
        assertFalse(Files.exists(workspace.runFolder(analysis, run).resolve("check.json")));
        mvc.perform(get(page).flashAttrs(posted.getFlashMap())).andExpect(status().isOk())
                .andExpect(content().string(containsString("policy, rows_per_coefficient.at_least: must be a number "
                        + "of at least 1; found &quot;ten&quot;")))
                .andExpect(content().string(not(containsString("id=\"check-result\""))));
    }
}
