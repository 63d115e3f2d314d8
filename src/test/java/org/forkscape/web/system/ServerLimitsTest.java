package org.forkscape.web.system;

import static org.hamcrest.Matchers.containsString;
import static org.hamcrest.Matchers.not;
import static org.hamcrest.Matchers.startsWith;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.springframework.test.web.servlet.request.MockMvcRequestBuilders.multipart;
import static org.springframework.test.web.servlet.request.MockMvcRequestBuilders.post;
import static org.springframework.test.web.servlet.request.MockMvcRequestBuilders.put;
import static org.springframework.test.web.servlet.result.MockMvcResultMatchers.content;
import static org.springframework.test.web.servlet.result.MockMvcResultMatchers.jsonPath;
import static org.springframework.test.web.servlet.result.MockMvcResultMatchers.model;
import static org.springframework.test.web.servlet.result.MockMvcResultMatchers.status;
import static org.springframework.test.web.servlet.result.MockMvcResultMatchers.view;

import java.io.IOException;
import java.io.UncheckedIOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import org.forkscape.run.Json;
import org.forkscape.run.Workspace;
import org.forkscape.web.CivicTestData;
import org.junit.jupiter.api.BeforeEach;
import org.junit.jupiter.api.Test;
import org.springframework.beans.factory.annotation.Autowired;
import org.springframework.boot.test.context.SpringBootTest;
import org.springframework.boot.webmvc.test.autoconfigure.AutoConfigureMockMvc;
import org.springframework.http.MediaType;
import org.springframework.mock.web.MockMultipartFile;
import org.springframework.test.context.DynamicPropertyRegistry;
import org.springframework.test.context.DynamicPropertySource;
import org.springframework.test.web.servlet.MockMvc;
import org.springframework.test.web.servlet.ResultActions;

/**
 * A server with small limits, set through its {@code forkscape.*} settings: each limit refuses what goes
 * beyond it with the number, the limit and the setting's name, at the field concerned, before anything is
 * kept or fitted; what stays within runs. (The upload size limit needs the real server's multipart
 * parsing and is tested by {@code ServerRestartTest}.)
 */
@SpringBootTest
@AutoConfigureMockMvc
class ServerLimitsTest {
    private static final Path WORKSPACE = temp();

    @Autowired
    MockMvc mvc;
    @Autowired
    Workspace workspace;
    private String analysis;

    @DynamicPropertySource
    static void settings(DynamicPropertyRegistry registry) {
        registry.add("forkscape.workspace", WORKSPACE::toString);
        registry.add("forkscape.demo.enabled", () -> "false");
        registry.add("forkscape.data.max-columns", () -> "11");
        registry.add("forkscape.data.max-cells", () -> "4000");
        registry.add("forkscape.runs.max-specifications", () -> "600");
        registry.add("forkscape.runs.max-null-draws", () -> "20");
        registry.add("forkscape.runs.max-memory", () -> "1MB");
        registry.add("forkscape.runs.threads", () -> "2");
    }

    @BeforeEach
    void data() throws Exception {
        analysis = upload("turnout.csv", CivicTestData.csv(300, 3)).andExpect(status().isCreated()).andReturn()
                .getResponse().getContentAsString();
        analysis = Json.MAPPER.readTree(analysis).path("analysis").path("id").asString();
    }

    @Test
    void tablesAboveTheColumnOrCellLimitAreRefusedAndNotKept() throws Exception {
        int before = workspace.analyses().size();
        String wide = CivicTestData.csv(20, 4).replace("\n", ",1\n").replaceFirst(",1\n", ",extra\n");
        upload("wide.csv", wide).andExpect(status().isBadRequest())
                .andExpect(jsonPath("$.where").value("wide.csv, line 1"))
                .andExpect(jsonPath("$.message").value("the header has 12 columns; at most 11 are accepted"));
        upload("long.csv", CivicTestData.csv(400, 5)).andExpect(status().isBadRequest())
                .andExpect(jsonPath("$.where").value("long.csv"))
                .andExpect(jsonPath("$.message").value(startsWith("has more than 4,000 cells (rows times columns)")));
        MockMultipartFile form = new MockMultipartFile("file", "long.csv", "text/csv",
                CivicTestData.csv(400, 5).getBytes(StandardCharsets.UTF_8));
        mvc.perform(multipart("/analyses").file(form)).andExpect(status().isBadRequest())
                .andExpect(view().name("home/index"))
                .andExpect(model().attribute("uploadProblem", startsWith("long.csv: has more than 4,000 cells")));
        assertEquals(before, workspace.analyses().size());
    }

    @Test
    void moreSpecificationsThanTheServerFitsInOneRunAreRefusedWhateverThePlansOwnCap() throws Exception {
        // 2 x 2 x 2^4 x 3 x 3 x 2 = 1,152, and the plan raises its own cap: the server's still holds
        String plan = CivicTestData.plan(4).replace("\"seed\": 7,", "\"seed\": 7, \"maxSpecifications\": 5000000,");
        check(plan).andExpect(jsonPath("$.valid").value(false)).andExpect(jsonPath("$.where").value("decisions"))
                .andExpect(jsonPath("$.message").value(startsWith("the plan has 1,152 specifications, above this "
                        + "server's limit of 600 per run (setting forkscape.runs.max-specifications); fit a seeded "
                        + "random sample instead (the plan page's fields \"Fit a random sample of\" and \"Seed\"")))
                .andExpect(jsonPath("$.message").value(not(containsString("--"))));
        // the plan's own cap: the way out names the form's fields, never the batch command's options
        check(CivicTestData.plan(4).replace("\"seed\": 7,", "\"seed\": 7, \"maxSpecifications\": 100,"))
                .andExpect(jsonPath("$.where").value("decisions"))
                .andExpect(jsonPath("$.message").value("the plan has 1,152 specifications, above the cap of 100; fit a "
                        + "seeded random sample instead with the plan page's fields \"Fit a random sample of\" and "
                        + "\"Seed\" (under \"How the run is made\"), or raise the cap with the plan page's field "
                        + "\"Largest number of specifications\""));
        startRun(plan).andExpect(status().isBadRequest()).andExpect(jsonPath("$.where").value("decisions"));
        String sampled = plan.replace("\"seed\": 7,", "\"seed\": 7, \"sample\": 700,");
        check(sampled).andExpect(jsonPath("$.where").value("sample"))
                .andExpect(jsonPath("$.message").value(containsString("a sample of 700 specifications is above this "
                        + "server's limit of 600 per run")));
        check(plan.replace("\"seed\": 7,", "\"seed\": 7, \"sample\": 500,")).andExpect(jsonPath("$.valid").value(true));
        assertEquals(0, workspace.runs(analysis).size(), "nothing was recorded");
    }

    @Test
    void moreNullDrawsThanTheServerAllowsAreRefusedAtTheirKey() throws Exception {
        String plan = CivicTestData.plan().replace("\"seed\": 7,", "\"seed\": 7, \"nullDraws\": 50,");
        check(plan).andExpect(jsonPath("$.where").value("nullDraws"))
                .andExpect(jsonPath("$.message").value("50 null draws are above this server's limit of 20 per run "
                        + "(setting forkscape.runs.max-null-draws); ask for fewer"));
        mvc.perform(put("/api/analyses/" + analysis + "/plan").contentType(MediaType.APPLICATION_JSON).content(plan))
                .andExpect(status().isBadRequest()).andExpect(jsonPath("$.where").value("nullDraws"));
        check(plan.replace("\"nullDraws\": 50", "\"nullDraws\": 20")).andExpect(jsonPath("$.valid").value(true));
    }

    @Test
    void aRunWhoseMemoryEstimateIsAboveTheLimitIsRefusedBeforeItStartsWithTheEstimateAndTheLimit() throws Exception {
        String plan = CivicTestData.plan(6).replace("\"seed\": 7,", "\"seed\": 7, \"sample\": 600, \"nullDraws\": 20,");
        String expected = "this run would need about ";
        check(plan).andExpect(jsonPath("$.valid").value(false)).andExpect(jsonPath("$.where").value(""))
                .andExpect(jsonPath("$.message").value(startsWith(expected)))
                .andExpect(jsonPath("$.message").value(containsString("above the limit of 1 MB")))
                .andExpect(jsonPath("$.message").value(containsString("setting forkscape.runs.max-memory")));
        startRun(plan).andExpect(status().isBadRequest()).andExpect(jsonPath("$.where").value(""))
                .andExpect(jsonPath("$.message").value(startsWith(expected)));
        // a plan saved before the limit was lowered: the run form shows the refusal beside it, and nothing is recorded
        workspace.savePlan(analysis, plan);
        mvc.perform(post("/analyses/" + analysis + "/runs")).andExpect(status().isBadRequest())
                .andExpect(view().name("plan/edit")).andExpect(content().string(containsString(expected)))
                .andExpect(content().string(not(containsString("Exception"))));
        assertEquals(0, workspace.runs(analysis).size());
        // a plan within every limit runs
        startRun(CivicTestData.plan()).andExpect(status().isAccepted());
    }

    private ResultActions upload(String name, String csv) throws Exception {
        MockMultipartFile file = new MockMultipartFile("file", name, "text/csv", csv.getBytes(StandardCharsets.UTF_8));
        return mvc.perform(multipart("/api/analyses").file(file));
    }

    private ResultActions check(String plan) throws Exception {
        return mvc.perform(post("/api/analyses/" + analysis + "/plan/check").contentType(MediaType.APPLICATION_JSON)
                .content(plan)).andExpect(status().isOk());
    }

    private ResultActions startRun(String plan) throws Exception {
        return mvc.perform(post("/api/analyses/" + analysis + "/runs").contentType(MediaType.APPLICATION_JSON)
                .content(plan));
    }

    private static Path temp() {
        try {
            return Files.createTempDirectory("forkscape-limits-");
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
    }
}
