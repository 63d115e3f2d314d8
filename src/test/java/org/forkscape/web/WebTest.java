package org.forkscape.web;

import static org.springframework.test.web.servlet.request.MockMvcRequestBuilders.get;
import static org.springframework.test.web.servlet.request.MockMvcRequestBuilders.multipart;
import static org.springframework.test.web.servlet.request.MockMvcRequestBuilders.post;
import static org.springframework.test.web.servlet.result.MockMvcResultMatchers.status;

import java.io.IOException;
import java.io.UncheckedIOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import org.forkscape.run.Json;
import org.springframework.beans.factory.annotation.Autowired;
import org.springframework.boot.test.context.SpringBootTest;
import org.springframework.boot.webmvc.test.autoconfigure.AutoConfigureMockMvc;
import org.springframework.http.MediaType;
import org.springframework.mock.web.MockMultipartFile;
import org.springframework.test.context.DynamicPropertyRegistry;
import org.springframework.test.context.DynamicPropertySource;
import org.springframework.test.web.servlet.MockMvc;
import tools.jackson.databind.JsonNode;

/**
 * The application with its real services over a workspace in a temporary folder, reached through
 * MockMvc. Every controller test extends this class, so they share one application context.
 */
@SpringBootTest
@AutoConfigureMockMvc
public abstract class WebTest {
    static final Path WORKSPACE = temp();

    @Autowired
    protected MockMvc mvc;

    @DynamicPropertySource
    static void settings(DynamicPropertyRegistry registry) {
        registry.add("forkscape.workspace", WORKSPACE::toString);
        registry.add("forkscape.demo.enabled", () -> "false");
        registry.add("forkscape.allowed-hosts", () -> "forkscape.example.org");
    }

    /** Uploads a CSV through the JSON API and returns the new analysis's id. */
    protected String upload(String fileName, String csv) throws Exception {
        MockMultipartFile file = new MockMultipartFile("file", fileName, "text/csv", csv.getBytes(StandardCharsets.UTF_8));
        String body = mvc.perform(multipart("/api/analyses").file(file)).andExpect(status().isCreated()).andReturn()
                .getResponse().getContentAsString();
        return json(body).path("analysis").path("id").asString();
    }

    /** Starts a run of {@code plan} and waits until it has ended; returns the run's id. */
    protected String runToEnd(String analysis, String plan) throws Exception {
        String body = mvc.perform(post("/api/analyses/" + analysis + "/runs").contentType(MediaType.APPLICATION_JSON)
                .content(plan)).andExpect(status().isAccepted()).andReturn().getResponse().getContentAsString();
        String run = json(body).path("id").asString();
        for (int i = 0; i < 600; i++) {
            JsonNode s = json(mvc.perform(get("/api/analyses/" + analysis + "/runs/" + run)).andReturn().getResponse()
                    .getContentAsString());
            String state = s.path("state").asString();
            if (!state.equals("queued") && !state.equals("running")) {
                return run;
            }
            Thread.sleep(50);
        }
        throw new AssertionError("run " + run + " did not end");
    }

    protected static JsonNode json(String text) {
        return Json.MAPPER.readTree(text);
    }

    private static Path temp() {
        try {
            return Files.createTempDirectory("forkscape-web-");
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
    }
}
