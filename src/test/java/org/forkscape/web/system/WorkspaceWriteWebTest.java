package org.forkscape.web.system;

import static org.hamcrest.Matchers.containsString;
import static org.hamcrest.Matchers.not;
import static org.springframework.test.web.servlet.request.MockMvcRequestBuilders.get;
import static org.springframework.test.web.servlet.request.MockMvcRequestBuilders.multipart;
import static org.springframework.test.web.servlet.request.MockMvcRequestBuilders.post;
import static org.springframework.test.web.servlet.request.MockMvcRequestBuilders.put;
import static org.springframework.test.web.servlet.result.MockMvcResultMatchers.content;
import static org.springframework.test.web.servlet.result.MockMvcResultMatchers.jsonPath;
import static org.springframework.test.web.servlet.result.MockMvcResultMatchers.status;

import java.io.IOException;
import java.io.UncheckedIOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.concurrent.atomic.AtomicLong;
import org.forkscape.run.FreeSpace;
import org.forkscape.run.Json;
import org.forkscape.run.Workspace;
import org.forkscape.web.CivicTestData;
import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.BeforeEach;
import org.junit.jupiter.api.Test;
import org.springframework.beans.factory.annotation.Autowired;
import org.springframework.boot.test.context.SpringBootTest;
import org.springframework.boot.test.context.TestConfiguration;
import org.springframework.boot.webmvc.test.autoconfigure.AutoConfigureMockMvc;
import org.springframework.context.annotation.Bean;
import org.springframework.http.MediaType;
import org.springframework.mock.web.MockMultipartFile;
import org.springframework.test.context.DynamicPropertyRegistry;
import org.springframework.test.context.DynamicPropertySource;
import org.springframework.test.web.servlet.MockMvc;

/**
 * What the server answers when the workspace cannot keep a write: a full disk 507, a workspace that cannot
 * be written 503, each in words that say what was not kept and that earlier work is intact, in the JSON
 * problem and on the error page, never with a path of the server. A write is made to fail portably (also
 * for a process that may write anywhere, as root may) by a folder standing where the plan file goes; the
 * disk's free space is this test's probe.
 */
@SpringBootTest
@AutoConfigureMockMvc
class WorkspaceWriteWebTest {
    private static final Path WORKSPACE = temp();
    private static final AtomicLong FREE = new AtomicLong(Long.MAX_VALUE);
    private static final String PLAN_NOT_SAVED = "the plan was not saved; earlier analyses and runs are intact";

    @Autowired
    MockMvc mvc;
    @Autowired
    Workspace workspace;
    private String analysis;

    @TestConfiguration
    static class Disk {
        @Bean
        FreeSpace freeSpace() {
            return folder -> FREE.get();
        }
    }

    @DynamicPropertySource
    static void settings(DynamicPropertyRegistry registry) {
        registry.add("forkscape.workspace", WORKSPACE::toString);
        registry.add("forkscape.demo.enabled", () -> "false");
    }

    @BeforeEach
    void upload() throws Exception {
        FREE.set(Long.MAX_VALUE);
        MockMultipartFile file = new MockMultipartFile("file", "w.csv", "text/csv",
                CivicTestData.csv(120, 3).getBytes(StandardCharsets.UTF_8));
        String body = mvc.perform(multipart("/api/analyses").file(file)).andExpect(status().isCreated()).andReturn()
                .getResponse().getContentAsString();
        analysis = Json.MAPPER.readTree(body).path("analysis").path("id").asString();
    }

    @AfterEach
    void spaceAgain() {
        FREE.set(Long.MAX_VALUE);
    }

    @Test
    void aWorkspaceThatCannotBeWrittenAnswers503InWords() throws Exception {
        blockThePlanFile();
        mvc.perform(put("/api/analyses/" + analysis + "/plan").contentType(MediaType.APPLICATION_JSON)
                .content(CivicTestData.plan())).andExpect(status().isServiceUnavailable())
                .andExpect(jsonPath("$.message").value("the workspace cannot be written (the file system refused the "
                        + "write); " + PLAN_NOT_SAVED))
                .andExpect(content().string(not(containsString(WORKSPACE.toString()))));
        mvc.perform(post("/analyses/" + analysis + "/plan").param("plan", CivicTestData.plan()))
                .andExpect(status().isServiceUnavailable()).andExpect(content().string(containsString(PLAN_NOT_SAVED)))
                .andExpect(content().string(not(containsString(WORKSPACE.toString()))));
    }

    @Test
    void aFullDiskAnswers507InWords() throws Exception {
        blockThePlanFile();
        FREE.set(0);
        mvc.perform(put("/api/analyses/" + analysis + "/plan").contentType(MediaType.APPLICATION_JSON)
                .content(CivicTestData.plan())).andExpect(status().isInsufficientStorage())
                .andExpect(jsonPath("$.message").value("the workspace's disk is full; " + PLAN_NOT_SAVED))
                .andExpect(content().string(not(containsString(WORKSPACE.toString()))));
    }

    @Test
    void aRunTooLargeForTheFreeSpaceIsRefusedWith507AndNotRecorded() throws Exception {
        FREE.set(Workspace.MIN_FREE + 100_000);
        mvc.perform(post("/api/analyses/" + analysis + "/runs").contentType(MediaType.APPLICATION_JSON)
                .content(CivicTestData.plan())).andExpect(status().isInsufficientStorage())
                .andExpect(jsonPath("$.message").value(containsString("this run was not started; earlier analyses "
                        + "and runs are intact")))
                .andExpect(content().string(not(containsString(WORKSPACE.toString()))));
        mvc.perform(get("/api/analyses/" + analysis + "/runs")).andExpect(status().isOk())
                .andExpect(jsonPath("$.length()").value(0));
    }

    /** A non-empty folder where plan.json goes: no file can be moved over it, whoever the process is. */
    private void blockThePlanFile() throws IOException {
        Path in = Files.createDirectories(workspace.analysisFolder(analysis).resolve(Workspace.PLAN));
        Files.writeString(in.resolve("in-the-way"), "x");
    }

    private static Path temp() {
        try {
            return Files.createTempDirectory("forkscape-disk-");
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
    }
}
