package org.forkscape.web.plan;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.springframework.test.web.servlet.request.MockMvcRequestBuilders.get;
import static org.springframework.test.web.servlet.request.MockMvcRequestBuilders.post;
import static org.springframework.test.web.servlet.request.MockMvcRequestBuilders.put;
import static org.springframework.test.web.servlet.result.MockMvcResultMatchers.jsonPath;
import static org.springframework.test.web.servlet.result.MockMvcResultMatchers.status;

import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.security.MessageDigest;
import java.util.HexFormat;
import org.forkscape.run.Workspace;
import org.forkscape.web.CivicTestData;
import org.forkscape.web.WebTest;
import org.junit.jupiter.api.BeforeEach;
import org.junit.jupiter.api.Test;
import org.springframework.beans.factory.annotation.Autowired;
import org.springframework.http.MediaType;
import tools.jackson.databind.JsonNode;

/**
 * "Lock this plan" through the plan API, and the provenance of the web's runs of a locked plan. The hashes
 * are recomputed here with java.security.MessageDigest (SHA-256, FIPS 180-4).
 */
class PlanLockApiTest extends WebTest {
    @Autowired
    Workspace workspace;
    private String analysis;
    private String api;

    @BeforeEach
    void data() throws Exception {
        analysis = upload("lock.csv", CivicTestData.csv(120, 8));
        api = "/api/analyses/" + analysis + "/plan";
    }

    private void save(String plan) throws Exception {
        mvc.perform(put(api).contentType(MediaType.APPLICATION_JSON).content(plan)).andExpect(status().isOk());
    }

    private static String sha256(byte[] bytes) throws Exception {
        return HexFormat.of().formatHex(MessageDigest.getInstance("SHA-256").digest(bytes));
    }

    @Test
    void lockingStoresTheSavedPlansHashesInTheAnalysisFolderAndRunsRecordWhetherTheyMatch() throws Exception {
        mvc.perform(post(api + "/lock")).andExpect(status().isBadRequest())
                .andExpect(jsonPath("$.message").value("save the plan before locking it"));
        mvc.perform(get(api + "/lock")).andExpect(status().isOk()).andExpect(jsonPath("$.lock").isEmpty());
        String plan = CivicTestData.plan();
        save(plan);
        JsonNode answer = json(mvc.perform(post(api + "/lock")).andExpect(status().isOk()).andReturn().getResponse()
                .getContentAsString()).path("lock");
        assertTrue(answer.path("plan_matches").asBoolean(false));
        assertTrue(answer.path("data_matches").asBoolean(false));
        Path lockFile = workspace.analysisFolder(analysis).resolve(Workspace.PLAN_LOCK);
        JsonNode stored = json(Files.readString(lockFile));
        assertEquals(sha256(plan.getBytes(StandardCharsets.UTF_8)), stored.path("plan_sha256").asString());
        assertEquals(sha256(Files.readAllBytes(workspace.dataFile(analysis))), stored.path("data_sha256").asString());
        assertEquals(stored.path("fingerprint").asString(), answer.path("fingerprint").asString());
        assertEquals(stored.path("locked").asString(), answer.path("locked").asString());

        // a second lock keeps the first unless asked to replace it
        mvc.perform(post(api + "/lock")).andExpect(status().isBadRequest())
                .andExpect(jsonPath("$.where").value("lock"));
        assertEquals(stored, json(Files.readString(lockFile)));

        String first = runToEnd(analysis, "");
        JsonNode matching = provenanceLock(first);
        assertTrue(explorePage(first).contains("<p id=\"plan-lock-note\" class=\"notice lock-matches\" role=\"note\">"
                + "The plan and the data of this run are those locked at " + stored.path("locked").asString()
                + " (fingerprint " + stored.path("fingerprint").asString() + ").</p>"), explorePage(first));
        assertEquals(stored.path("fingerprint").asString(), matching.path("fingerprint").asString());
        assertTrue(matching.path("plan_matches").asBoolean(false));
        assertTrue(matching.path("data_matches").asBoolean(false));

        save(plan.replace("\"seed\": 7,", "\"seed\": 8,"));
        mvc.perform(get(api + "/lock")).andExpect(jsonPath("$.lock.plan_matches").value(false))
                .andExpect(jsonPath("$.lock.data_matches").value(true));
        String edited = runToEnd(analysis, "");
        JsonNode changed = provenanceLock(edited);
        assertFalse(changed.path("plan_matches").asBoolean(true));
        assertTrue(explorePage(edited).contains("class=\"notice lock-changed\" role=\"note\">Warning: the plan has "
                + "changed since the plan was locked (" + stored.path("locked").asString()), explorePage(edited));
        assertTrue(Files.readString(workspace.runFolder(analysis, edited).resolve(Workspace.LOG))
                .contains("warning: the plan has changed since the plan was locked"));

        mvc.perform(post(api + "/lock").param("replace", "yes")).andExpect(status().isOk())
                .andExpect(jsonPath("$.lock.plan_matches").value(true));
        mvc.perform(post(api + "/lock").param("replace", "perhaps")).andExpect(status().isBadRequest())
                .andExpect(jsonPath("$.where").value("replace"));
    }

    @Test
    void aRunOfAnUnlockedPlanRecordsNoLock() throws Exception {
        save(CivicTestData.plan());
        String run = runToEnd(analysis, "");
        assertTrue(provenanceLock(run).isMissingNode());
        assertTrue(explorePage(run).contains("id=\"explorer\""), "the explorer was shown");
        assertFalse(explorePage(run).contains("plan-lock-note"));
    }

    private String explorePage(String run) throws Exception {
        return mvc.perform(get("/analyses/" + analysis + "/runs/" + run)).andExpect(status().isOk()).andReturn()
                .getResponse().getContentAsString();
    }

    private JsonNode provenanceLock(String run) throws Exception {
        Path summary = workspace.runFolder(analysis, run).resolve("summary.json");
        assertTrue(Files.exists(summary), "the run finished: " + Files.readString(workspace.runFolder(analysis, run)
                .resolve(Workspace.LOG)));
        return json(Files.readString(summary)).path("provenance").path("lock");
    }
}
