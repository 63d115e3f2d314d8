package org.forkscape.web.run;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.springframework.test.web.servlet.request.MockMvcRequestBuilders.get;
import static org.springframework.test.web.servlet.request.MockMvcRequestBuilders.post;
import static org.springframework.test.web.servlet.result.MockMvcResultMatchers.status;

import java.nio.file.Files;
import java.nio.file.Path;
import org.forkscape.run.Workspace;
import org.forkscape.web.CivicTestData;
import org.forkscape.web.WebTest;
import org.forkscape.web.system.MemoryBudget;
import org.junit.jupiter.api.Test;
import org.springframework.beans.factory.annotation.Autowired;
import org.springframework.http.MediaType;
import tools.jackson.databind.JsonNode;

/**
 * A run counts in the memory budget the uploads being read share: while they hold all of it, a run that
 * starts waits (and says so in its log) without fitting anything, and it runs to its end once they are done.
 */
class RunMemoryWaitTest extends WebTest {
    @Autowired
    MemoryBudget budget;
    @Autowired
    Workspace workspace;

    @Test
    void aRunWaitsForTheMemoryUploadsHoldThenFinishes() throws Exception {
        String analysis = upload("wards.csv", CivicTestData.csv(160, 41));
        MemoryBudget.Reservation uploads = budget.awaitRoom("uploads", Long.MAX_VALUE, () -> false);
        String run;
        Path log;
        try {
            String body = mvc.perform(post("/api/analyses/" + analysis + "/runs")
                    .contentType(MediaType.APPLICATION_JSON).content(CivicTestData.plan()))
                    .andExpect(status().isAccepted()).andReturn().getResponse().getContentAsString();
            run = json(body).path("id").asString();
            log = workspace.runFolder(analysis, run).resolve(Workspace.LOG);
            for (int i = 0; i < 600 && !logSays(log, "waiting for memory"); i++) {
                Thread.sleep(50);
            }
            assertTrue(logSays(log, "waiting for memory: uploads being read hold what this run needs"));
            JsonNode waiting = runStatus(analysis, run);
            assertEquals("running", waiting.path("state").asString());
            assertEquals(0, waiting.path("done").asLong(), "nothing fitted while it waits");
        } finally {
            uploads.close();
        }
        String state = "";
        for (int i = 0; i < 600; i++) {
            state = runStatus(analysis, run).path("state").asString();
            if (!state.equals("queued") && !state.equals("running")) {
                break;
            }
            Thread.sleep(50);
        }
        assertEquals("finished", state);
        assertEquals(0, budget.held(), "the run's reservation was released");
    }

    private static boolean logSays(Path log, String words) throws java.io.IOException {
        return Files.exists(log) && Files.readString(log).contains(words);
    }

    private JsonNode runStatus(String analysis, String run) throws Exception {
        return json(mvc.perform(get("/api/analyses/" + analysis + "/runs/" + run)).andReturn().getResponse()
                .getContentAsString());
    }
}
