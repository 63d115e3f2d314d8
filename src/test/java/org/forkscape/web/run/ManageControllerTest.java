package org.forkscape.web.run;

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
import static org.springframework.test.web.servlet.result.MockMvcResultMatchers.view;

import java.nio.file.Files;
import java.nio.file.Path;
import org.forkscape.run.RunState;
import org.forkscape.run.StoredRun;
import org.forkscape.run.Workspace;
import org.forkscape.web.CivicTestData;
import org.forkscape.web.WebTest;
import org.junit.jupiter.api.Test;
import org.springframework.beans.factory.annotation.Autowired;

/**
 * Renaming, archiving and deleting analyses and runs through the pages: each change is seen where the
 * user looks for it, a deletion is confirmed on a page first and leaves no folder behind (nor anything in
 * the trash), a queued run is not deleted, and a change from another origin is refused.
 */
class ManageControllerTest extends WebTest {
    @Autowired
    Workspace workspace;

    @Test
    void anAnalysisIsRenamedArchivedRestoredAndDeletedAfterAConfirmation() throws Exception {
        String analysis = upload("rainfall.csv", CivicTestData.csv(60, 2));
        mvc.perform(post("/analyses/" + analysis + "/rename").param("title", "  Rain and turnout  "))
                .andExpect(redirectedUrl("/analyses/" + analysis + "/manage"));
        assertEquals("Rain and turnout", workspace.analysis(analysis).orElseThrow().title());
        mvc.perform(post("/analyses/" + analysis + "/rename").param("title", " ")).andExpect(status().isBadRequest())
                .andExpect(content().string(containsString("an analysis needs a title")));

        mvc.perform(post("/analyses/" + analysis + "/archive").param("archived", "true"));
        String home = mvc.perform(get("/")).andReturn().getResponse().getContentAsString();
        String archived = home.substring(home.indexOf("id=\"archived-analyses\""));
        assertTrue(archived.contains("Rain and turnout"), "listed with the archived analyses");
        assertFalse(home.substring(0, home.indexOf("id=\"archived-analyses\"")).contains("Rain and turnout"),
                "not among the analyses in use");
        mvc.perform(post("/analyses/" + analysis + "/archive").param("archived", "false"));
        mvc.perform(get("/")).andExpect(content().string(not(containsString("id=\"archived-analyses\""))));

        String run = runToEnd(analysis, CivicTestData.plan());
        mvc.perform(get("/analyses/" + analysis + "/delete")).andExpect(view().name(ManageController.CONFIRM))
                .andExpect(content().string(containsString("Delete the analysis <span>Rain and turnout</span>?")))
                .andExpect(content().string(containsString("id=\"confirm-delete\"")));
        assertTrue(Files.isDirectory(workspace.runFolder(analysis, run)), "asking removes nothing");
        // from another origin, the deletion is refused like every other change
        mvc.perform(post("/analyses/" + analysis + "/delete").header("Origin", "https://elsewhere.example"))
                .andExpect(status().isForbidden());
        Path folder = workspace.analysisFolder(analysis);
        mvc.perform(post("/analyses/" + analysis + "/delete")).andExpect(redirectedUrl("/"));
        assertFalse(Files.exists(folder));
        try (var left = Files.list(workspace.root().resolve(Workspace.TRASH))) {
            assertEquals(0, left.count(), "nothing is left in the trash");
        }
        mvc.perform(get("/analyses/" + analysis)).andExpect(status().isNotFound());
    }

    @Test
    void aRunIsRenamedArchivedAndDeletedButNotWhileItIsQueued() throws Exception {
        String analysis = upload("wards.csv", CivicTestData.csv(60, 3));
        String run = runToEnd(analysis, CivicTestData.plan());
        mvc.perform(post("/analyses/" + analysis + "/runs/" + run + "/rename").param("name", "before the review"));
        mvc.perform(get("/analyses/" + analysis)).andExpect(content().string(containsString("before the review")));
        mvc.perform(post("/analyses/" + analysis + "/runs/" + run + "/archive").param("archived", "true"));
        StoredRun archived = workspace.run(analysis, run).orElseThrow();
        assertTrue(archived.archived());
        assertEquals("before the review", archived.name());
        assertEquals(RunState.FINISHED, archived.state(), "labels leave the record as it was");
        mvc.perform(get("/analyses/" + analysis)).andExpect(content().string(not(containsString("before the review"))));
        mvc.perform(get("/analyses/" + analysis + "/manage")).andExpect(content().string(containsString("before the review")));

        // a queued run (recorded, never started here) is neither deleted nor is its analysis
        StoredRun queued = workspace.createRun(analysis, CivicTestData.plan());
        mvc.perform(post("/analyses/" + analysis + "/runs/" + queued.id() + "/delete")).andExpect(status().isBadRequest())
                .andExpect(content().string(containsString("is queued and cannot be deleted; cancel it first")));
        mvc.perform(post("/analyses/" + analysis + "/delete")).andExpect(status().isBadRequest());
        assertTrue(Files.isDirectory(workspace.runFolder(analysis, queued.id())));

        mvc.perform(get("/analyses/" + analysis + "/runs/" + run + "/delete"))
                .andExpect(content().string(containsString("Delete the run for good")));
        mvc.perform(post("/analyses/" + analysis + "/runs/" + run + "/delete"))
                .andExpect(redirectedUrl("/analyses/" + analysis + "/manage"));
        assertFalse(Files.exists(workspace.runFolder(analysis, run)));
        mvc.perform(get("/analyses/" + analysis + "/runs/" + run)).andExpect(status().isNotFound());
    }
}
