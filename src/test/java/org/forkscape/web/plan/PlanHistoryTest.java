package org.forkscape.web.plan;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.springframework.test.web.servlet.request.MockMvcRequestBuilders.get;
import static org.springframework.test.web.servlet.request.MockMvcRequestBuilders.post;
import static org.springframework.test.web.servlet.request.MockMvcRequestBuilders.put;
import static org.springframework.test.web.servlet.result.MockMvcResultMatchers.redirectedUrl;
import static org.springframework.test.web.servlet.result.MockMvcResultMatchers.status;

import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.attribute.FileTime;
import java.security.MessageDigest;
import java.time.Instant;
import java.util.HexFormat;
import java.util.List;
import org.forkscape.run.Workspace;
import org.forkscape.web.CivicTestData;
import org.forkscape.web.WebTest;
import org.junit.jupiter.api.Test;
import org.springframework.beans.factory.annotation.Autowired;
import org.springframework.http.MediaType;
import tools.jackson.databind.JsonNode;

/**
 * The plan's history: each save that changes the plan is a version with its time and SHA-256 (checked against
 * the JDK's MessageDigest, and against the run's provenance), a version can be viewed and restored, a run
 * names the version it ran, and an analysis saved before the history shows its plan as version 1.
 */
class PlanHistoryTest extends WebTest {
    @Autowired
    Workspace workspace;

    private static String sha256(String text) throws Exception {
        return HexFormat.of().formatHex(MessageDigest.getInstance("SHA-256").digest(text.getBytes(StandardCharsets.UTF_8)));
    }

    private JsonNode versions(String analysis) throws Exception {
        return json(mvc.perform(get("/api/analyses/" + analysis + "/plan/versions")).andExpect(status().isOk())
                .andReturn().getResponse().getContentAsString());
    }

    private void save(String analysis, String plan) throws Exception {
        mvc.perform(put("/api/analyses/" + analysis + "/plan").contentType(MediaType.APPLICATION_JSON).content(plan))
                .andExpect(status().isOk());
    }

    @Test
    void everyChangedSaveIsAVersionThatCanBeViewedRestoredAndNamedByItsRuns() throws Exception {
        String analysis = upload("civic.csv", CivicTestData.csv(120, 5));
        String first = CivicTestData.plan(1);
        String second = CivicTestData.plan(2);
        save(analysis, first);
        save(analysis, first);
        assertEquals(1, versions(analysis).size(), "saving the same plan again adds no version");
        save(analysis, second);
        JsonNode v = versions(analysis);
        assertEquals(List.of(2, 1), List.of(v.get(0).get("version").asInt(), v.get(1).get("version").asInt()),
                "newest first");
        assertEquals(sha256(second), v.get(0).get("sha256").asString());
        assertEquals(sha256(first), v.get(1).get("sha256").asString());
        assertTrue(v.get(0).get("working").asBoolean());

        String run = runToEnd(analysis, second);
        String other = runToEnd(analysis, CivicTestData.plan(3));
        JsonNode summary = json(mvc.perform(get("/analyses/" + analysis + "/runs/" + run + "/files/summary.json"))
                .andReturn().getResponse().getContentAsString());
        assertEquals(v.get(0).get("sha256").asString(), summary.get("provenance").get("plan_sha256").asString(),
                "the version's hash is the run's");
        assertEquals(List.of(run), texts(versions(analysis).get(0).get("runs")), "the run of a plan sent with it is none's");
        String page = mvc.perform(get("/analyses/" + analysis + "/runs/" + run)).andReturn().getResponse()
                .getContentAsString();
        assertTrue(page.contains("It ran version 2 of the plan, saved " + v.get(0).get("saved").asString()), page);
        assertTrue(mvc.perform(get("/analyses/" + analysis + "/runs/" + other)).andReturn().getResponse()
                .getContentAsString().contains("Its plan is none of the saved versions"));

        assertEquals(first, mvc.perform(get("/analyses/" + analysis + "/plan/versions/1")).andExpect(status().isOk())
                .andReturn().getResponse().getContentAsString(StandardCharsets.UTF_8));
        mvc.perform(post("/analyses/" + analysis + "/plan/versions/1/restore"))
                .andExpect(redirectedUrl("/analyses/" + analysis + "/plan?restored=1"));
        assertEquals(first, workspace.plan(analysis).orElseThrow(), "version 1 is the working plan again");
        JsonNode restored = versions(analysis).get(0);
        assertEquals(3, restored.get("version").asInt());
        assertEquals(1, restored.get("restoredFrom").asInt());
        assertEquals(sha256(first), restored.get("sha256").asString());
        String planPage = mvc.perform(get("/analyses/" + analysis + "/plan?restored=1")).andReturn().getResponse()
                .getContentAsString();
        assertTrue(planPage.contains("Version 1 of the plan is the working plan again."));
        assertTrue(planPage.contains("id=\"restore-version-2\""), "an older version offers to be restored");

        mvc.perform(get("/analyses/" + analysis + "/plan/versions/9")).andExpect(status().isNotFound());
        mvc.perform(get("/analyses/" + analysis + "/plan/versions/first")).andExpect(status().isNotFound());
        mvc.perform(post("/analyses/" + analysis + "/plan/versions/9/restore")).andExpect(status().isNotFound());
    }

    @Test
    void anAnalysisSavedBeforeTheHistoryShowsItsPlanAsVersionOneAndKeepsItOnTheNextSave() throws Exception {
        String analysis = upload("civic.csv", CivicTestData.csv(120, 6));
        String old = CivicTestData.plan(1);
        Path plan = workspace.analysisFolder(analysis).resolve(Workspace.PLAN);
        Files.writeString(plan, old);
        Instant then = Instant.parse("2026-01-05T10:00:00Z");
        Files.setLastModifiedTime(plan, FileTime.from(then));
        JsonNode v = versions(analysis);
        assertEquals(1, v.size());
        assertEquals(1, v.get(0).get("version").asInt());
        assertEquals(then.toString(), v.get(0).get("saved").asString());
        assertEquals(sha256(old), v.get(0).get("sha256").asString());
        assertEquals(old, mvc.perform(get("/analyses/" + analysis + "/plan/versions/1")).andReturn().getResponse()
                .getContentAsString(StandardCharsets.UTF_8));

        save(analysis, CivicTestData.plan(2));
        JsonNode after = versions(analysis);
        assertEquals(2, after.size());
        assertEquals(then.toString(), after.get(1).get("saved").asString(), "the old plan kept as version 1");
        assertEquals(old, workspace.planVersion(analysis, 1).orElseThrow());
    }

    private static List<String> texts(JsonNode array) {
        return java.util.stream.StreamSupport.stream(array.spliterator(), false).map(JsonNode::asString).toList();
    }
}
