package org.forkscape.web.system;

import static org.hamcrest.Matchers.containsString;
import static org.springframework.test.web.servlet.request.MockMvcRequestBuilders.get;
import static org.springframework.test.web.servlet.request.MockMvcRequestBuilders.post;
import static org.springframework.test.web.servlet.request.MockMvcRequestBuilders.put;
import static org.springframework.test.web.servlet.result.MockMvcResultMatchers.content;
import static org.springframework.test.web.servlet.result.MockMvcResultMatchers.header;
import static org.springframework.test.web.servlet.result.MockMvcResultMatchers.status;

import org.forkscape.web.CivicTestData;
import org.forkscape.web.WebTest;
import org.junit.jupiter.api.Test;
import org.springframework.http.MediaType;

/** Headers on every page, no changes from other sites, no requests addressed to other hosts. */
class SecurityTest extends WebTest {
    @Test
    void everyResponseCarriesTheContentSecurityPolicy() throws Exception {
        mvc.perform(get("/")).andExpect(status().isOk())
                .andExpect(header().string("Content-Security-Policy", SecurityHeadersFilter.POLICY))
                .andExpect(header().string("X-Content-Type-Options", "nosniff"))
                .andExpect(header().string("X-Frame-Options", "DENY"));
        mvc.perform(get("/api/analyses")).andExpect(header().string("Content-Security-Policy", containsString("script-src 'self'")));
    }

    @Test
    void changesFromAnotherOriginAreRefused() throws Exception {
        String analysis = upload("origin.csv", CivicTestData.csv(40, 1));
        mvc.perform(put("/api/analyses/" + analysis + "/plan").header("Origin", "https://elsewhere.example")
                .contentType(MediaType.APPLICATION_JSON).content(CivicTestData.plan()))
                .andExpect(status().isForbidden()).andExpect(content().string(containsString("another site")));
        mvc.perform(post("/analyses/" + analysis + "/runs").header("Origin", "null")).andExpect(status().isForbidden());
        // a foreign Referer without an Origin is refused too; one of this server is not
        mvc.perform(post("/analyses/" + analysis + "/runs").header("Referer", "https://elsewhere.example/page"))
                .andExpect(status().isForbidden());
        mvc.perform(put("/api/analyses/" + analysis + "/plan").header("Referer", "http://localhost/analyses/" + analysis)
                .contentType(MediaType.APPLICATION_JSON).content(CivicTestData.plan())).andExpect(status().isOk());
        // the same origin is served
        mvc.perform(put("/api/analyses/" + analysis + "/plan").header("Origin", "http://localhost")
                .contentType(MediaType.APPLICATION_JSON).content(CivicTestData.plan())).andExpect(status().isOk());
        // reading needs no origin check
        mvc.perform(get("/api/analyses/" + analysis).header("Origin", "https://elsewhere.example"))
                .andExpect(status().isOk());
    }

    @Test
    void requestsTheFrameworkRefusesGetTheirStatusAndASentence() throws Exception {
        String analysis = upload("methods.csv", CivicTestData.csv(40, 2));
        mvc.perform(put("/api/analyses/" + analysis + "/plan").contentType(MediaType.TEXT_PLAIN).content("{}"))
                .andExpect(status().isUnsupportedMediaType())
                .andExpect(org.springframework.test.web.servlet.result.MockMvcResultMatchers.jsonPath("$.message")
                        .value(containsString("text/plain")));
        mvc.perform(org.springframework.test.web.servlet.request.MockMvcRequestBuilders.delete("/api/analyses/" + analysis))
                .andExpect(status().isMethodNotAllowed());
    }

    @Test
    void requestsForAnotherHostNameAreRefusedWhileListeningOnLoopback() throws Exception {
        mvc.perform(get("/").header("Host", "attacker.example")).andExpect(status().isForbidden());
        mvc.perform(get("/").header("Host", "127.0.0.1:8080")).andExpect(status().isOk());
        mvc.perform(get("/").header("Host", "[::1]:8080")).andExpect(status().isOk());
        // listed in forkscape.allowed-hosts for this test (the name a reverse proxy would pass)
        mvc.perform(get("/").header("Host", "forkscape.example.org")).andExpect(status().isOk());
    }
}
