package org.forkscape.web.run;

import static org.hamcrest.Matchers.containsString;
import static org.hamcrest.Matchers.matchesPattern;
import static org.hamcrest.Matchers.startsWith;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.springframework.test.web.servlet.request.MockMvcRequestBuilders.get;
import static org.springframework.test.web.servlet.request.MockMvcRequestBuilders.post;
import static org.springframework.test.web.servlet.request.MockMvcRequestBuilders.put;
import static org.springframework.test.web.servlet.result.MockMvcResultMatchers.content;
import static org.springframework.test.web.servlet.result.MockMvcResultMatchers.header;
import static org.springframework.test.web.servlet.result.MockMvcResultMatchers.jsonPath;
import static org.springframework.test.web.servlet.result.MockMvcResultMatchers.model;
import static org.springframework.test.web.servlet.result.MockMvcResultMatchers.redirectedUrlPattern;
import static org.springframework.test.web.servlet.result.MockMvcResultMatchers.status;
import static org.springframework.test.web.servlet.result.MockMvcResultMatchers.view;

import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.security.MessageDigest;
import java.util.HexFormat;
import java.util.List;
import org.forkscape.Version;
import org.forkscape.run.Workspace;
import org.forkscape.web.CivicTestData;
import org.forkscape.web.WebTest;
import org.forkscape.web.system.ForkscapeSettings;
import org.junit.jupiter.api.BeforeEach;
import org.junit.jupiter.api.Test;
import org.springframework.beans.factory.annotation.Autowired;
import org.springframework.http.MediaType;
import tools.jackson.databind.JsonNode;

/** Starting, following and downloading runs, through the pages and the JSON API. */
class RunControllersTest extends WebTest {
    @Autowired
    Workspace workspace;
    @Autowired
    ForkscapeSettings settings;
    private String analysis;

    @BeforeEach
    void data() throws Exception {
        analysis = upload("runs.csv", CivicTestData.csv(150, 9));
    }

    @Test
    void theDownloadedSummaryRecordsTheWebRunsProvenance() throws Exception {
        String plan = CivicTestData.plan();
        String run = runToEnd(analysis, plan);
        JsonNode summary = json(mvc.perform(get("/analyses/" + analysis + "/runs/" + run + "/files/summary.json"))
                .andExpect(status().isOk()).andReturn().getResponse().getContentAsString());
        List<String> keys = List.copyOf(summary.propertyNames());
        assertEquals("provenance", keys.get(keys.size() - 1));
        JsonNode p = summary.get("provenance");
        assertEquals(List.of("version", "plan_sha256", "data_sha256", "seed", "command", "started", "java", "threads"),
                List.copyOf(p.propertyNames()));
        // java.security.MessageDigest on the plan as posted and the data as uploaded
        MessageDigest sha = MessageDigest.getInstance("SHA-256");
        assertEquals(HexFormat.of().formatHex(sha.digest(plan.getBytes(StandardCharsets.UTF_8))),
                p.get("plan_sha256").asString());
        assertEquals(HexFormat.of().formatHex(sha.digest(CivicTestData.csv(150, 9).getBytes(StandardCharsets.UTF_8))),
                p.get("data_sha256").asString());
        assertEquals("web: run of analysis " + analysis, p.get("command").asString());
        assertEquals(json(plan).get("seed").asLong(), p.get("seed").asLong());
        assertEquals(settings.runs().fittingThreads(), p.get("threads").asInt());
        assertEquals(System.getProperty("java.version"), p.get("java").asString());
        assertEquals(Version.current(), p.get("version").asString());
    }

    @Test
    void aRunOfThePlanInTheBodyFinishesAndItsPageIsTheExplorer() throws Exception {
        String run = runToEnd(analysis, CivicTestData.plan());
        String status = "/api/analyses/" + analysis + "/runs/" + run;
        mvc.perform(get(status)).andExpect(status().isOk()).andExpect(jsonPath("$.state").value("finished"))
                .andExpect(jsonPath("$.done").value(576)).andExpect(jsonPath("$.total").value(576));
        mvc.perform(get("/api/analyses/" + analysis + "/runs")).andExpect(jsonPath("$[0].id").value(run));
        mvc.perform(get("/analyses/" + analysis + "/runs/" + run)).andExpect(status().isOk())
                .andExpect(view().name("explore/explore"))
                .andExpect(content().string(containsString("A robust curve is not evidence of a causal effect")))
                .andExpect(content().string(matchesPattern("(?s).*src=\"/webjars/chart.js/[0-9.]+/dist/chart.umd.js\".*")))
                // downloads are saved under names that carry the analysis and the run
                .andExpect(content().string(matchesPattern("(?s).*id=\"export-csv\" href=\"[^\"]+\" download=\"runs(-csv)?-" + run
                        + "-specifications.csv\".*")));
        mvc.perform(get("/analyses/" + analysis + "/runs/" + run + "/files/specifications.csv"))
                .andExpect(status().isOk()).andExpect(header().string("Content-Disposition",
                        matchesPattern("attachment; filename=\"runs(-csv)?-" + run + "-specifications.csv\"")))
                .andExpect(content().string(startsWith("spec,outcome,outreach,controls,rows,errors,fixed effects,estimate")));
        mvc.perform(get("/analyses/" + analysis + "/runs/" + run + "/files/summary.json")).andExpect(status().isOk())
                .andExpect(jsonPath("$.specifications").value(576));
        for (String name : new String[] {"run.json", "status", "..%2F..%2Fdata.csv", "data.csv"}) {
            mvc.perform(get("/analyses/" + analysis + "/runs/" + run + "/files/" + name))
                    .andExpect(status().isNotFound());
        }
    }

    @Test
    void thePlainFormRunsTheSavedPlan() throws Exception {
        mvc.perform(post("/analyses/" + analysis + "/runs")).andExpect(status().isBadRequest())
                .andExpect(view().name("error")).andExpect(model().attribute("where", "plan"));
        mvc.perform(put("/api/analyses/" + analysis + "/plan").contentType(MediaType.APPLICATION_JSON)
                .content(CivicTestData.plan())).andExpect(status().isOk());
        mvc.perform(post("/analyses/" + analysis + "/runs")).andExpect(status().is3xxRedirection())
                .andExpect(redirectedUrlPattern("/analyses/" + analysis + "/runs/*"));
    }

    @Test
    void aPlanThatCannotRunIsRefusedBeforeAnyRunIsRecorded() throws Exception {
        int before = workspace.runs(analysis).size();
        mvc.perform(post("/api/analyses/" + analysis + "/runs").contentType(MediaType.APPLICATION_JSON)
                .content(CivicTestData.plan().replace("outreach_hours", "outreach"))).andExpect(status().isBadRequest())
                .andExpect(jsonPath("$.where").value("decisions[1].alternatives[0].column"));
        mvc.perform(post("/api/analyses/" + analysis + "/runs")).andExpect(status().isBadRequest())
                .andExpect(jsonPath("$.where").value("plan"));
        org.junit.jupiter.api.Assertions.assertEquals(before, workspace.runs(analysis).size());
    }

    @Test
    void aRunWithNoFittableSpecificationFailsWithItsReasonAndWritesNoResults() throws Exception {
        String plan = CivicTestData.plan().replace("{\"label\": \"all\"},", "")
                .replace("{\"label\": \"urban\", \"keep\": \"urban == 1\"},", "")
                .replace("{\"label\": \"trimmed\", \"trim\": {\"column\": \"turnout\", \"z\": 2.5}}",
                        "{\"label\": \"one row\", \"keep\": \"outreach_hours > 100\"}");
        String run = runToEnd(analysis, plan);
        mvc.perform(get("/api/analyses/" + analysis + "/runs/" + run)).andExpect(jsonPath("$.state").value("failed"))
                .andExpect(jsonPath("$.problem").value(startsWith("no specification could be fitted: all 192 failed with \"too few rows")));
        org.junit.jupiter.api.Assertions.assertFalse(Files.exists(workspace.runFolder(analysis, run)
                .resolve("specifications.csv")));
        mvc.perform(get("/analyses/" + analysis + "/runs/" + run)).andExpect(status().isOk())
                .andExpect(view().name("run/progress"))
                .andExpect(content().string(containsString("The run stopped with a problem")));
        mvc.perform(get("/api/analyses/" + analysis + "/runs/" + run + "/layout")).andExpect(status().isConflict())
                .andExpect(jsonPath("$.message").value(containsString("only a finished run can be explored")));
        mvc.perform(post("/analyses/" + analysis + "/runs/" + run + "/again")).andExpect(status().is3xxRedirection());
    }

    @Test
    void unknownRunsAreNotFound() throws Exception {
        mvc.perform(get("/api/analyses/" + analysis + "/runs/20990101-000000-zzzzzz")).andExpect(status().isNotFound())
                .andExpect(jsonPath("$.message").value(containsString("has no run")));
        mvc.perform(post("/api/analyses/" + analysis + "/runs/../cancel")).andExpect(status().isNotFound());
        mvc.perform(get("/analyses/" + analysis + "/runs/nope")).andExpect(status().isNotFound());
    }
}
