package org.forkscape.web.explore;

import static org.hamcrest.Matchers.containsString;
import static org.hamcrest.Matchers.startsWith;
import static org.springframework.test.web.servlet.request.MockMvcRequestBuilders.get;
import static org.springframework.test.web.servlet.result.MockMvcResultMatchers.jsonPath;
import static org.springframework.test.web.servlet.result.MockMvcResultMatchers.status;

import org.forkscape.web.CivicTestData;
import org.forkscape.web.WebTest;
import org.junit.jupiter.api.BeforeEach;
import org.junit.jupiter.api.Test;
import tools.jackson.databind.JsonNode;

/** The explorer's JSON API over a finished run of 576 specifications. */
class ExploreApiControllerTest extends WebTest {
    private String base;

    @BeforeEach
    void run() throws Exception {
        String analysis = upload("explore.csv", CivicTestData.csv(160, 12));
        String run = runToEnd(analysis, CivicTestData.plan());
        base = "/api/analyses/" + analysis + "/runs/" + run;
    }

    @Test
    void layoutDescribesFactorsGridAndSummary() throws Exception {
        mvc.perform(get(base + "/layout")).andExpect(status().isOk()).andExpect(jsonPath("$.fitted").value(576))
                .andExpect(jsonPath("$.factors.length()").value(8))
                .andExpect(jsonPath("$.factors[2].name").value("median_age"))
                .andExpect(jsonPath("$.factors[2].control").value(true))
                .andExpect(jsonPath("$.factors[2].counts[1]").value(288))
                .andExpect(jsonPath("$.gridRows.length()").value(2 + 2 + 3 + 3 + 3 + 2))
                .andExpect(jsonPath("$.summary.specifications").value(576))
                .andExpect(jsonPath("$.keyPredictor").value("outreach"));
    }

    @Test
    void curveFollowsTheFilterAndTheOrder() throws Exception {
        mvc.perform(get(base + "/curve")).andExpect(status().isOk()).andExpect(jsonPath("$.summary.count").value(576))
                .andExpect(jsonPath("$.curve.mode").value("points"))
                .andExpect(jsonPath("$.curve.points.spec.length()").value(576))
                .andExpect(jsonPath("$.influence.factors.length()").value(8))
                .andExpect(jsonPath("$.influence.sentence").value(startsWith("Significant in the dominant sign")));
        mvc.perform(get(base + "/curve").param("drop", "0.1,5.2").param("sort", "factor:5"))
                .andExpect(status().isOk()).andExpect(jsonPath("$.summary.count").value(576 / 2 / 3 * 2))
                .andExpect(jsonPath("$.drop").value("0.1,5.2"))
                .andExpect(jsonPath("$.groups.length()").value(2))
                .andExpect(jsonPath("$.groups[0].label").value("all"));
    }

    @Test
    void theSpecificationAtAPositionAndItsFullFitAgree() throws Exception {
        String at = mvc.perform(get(base + "/at").param("position", "10").param("drop", "1.1"))
                .andExpect(status().isOk()).andExpect(jsonPath("$.choices[1].label").value("hours"))
                .andReturn().getResponse().getContentAsString();
        JsonNode s = json(at);
        JsonNode fit = json(mvc.perform(get(base + "/specifications/" + s.path("spec").asLong() + "/fit"))
                .andExpect(status().isOk()).andExpect(jsonPath("$.fit.status").value("ok"))
                .andExpect(jsonPath("$.fit.nObs").value(s.path("nObs").asInt()))
                .andReturn().getResponse().getContentAsString()).path("fit");
        JsonNode key = null;
        for (JsonNode c : fit.path("coefficients")) {
            if (c.path("role").asString().equals("key")) {
                key = c;
            }
        }
        org.junit.jupiter.api.Assertions.assertNotNull(key);
        double estimate = s.path("estimate").asDouble();
        org.junit.jupiter.api.Assertions.assertEquals(estimate, key.path("estimate").asDouble(), 1e-10 * Math.abs(estimate));
        org.junit.jupiter.api.Assertions.assertEquals(s.path("stdError").asDouble(), key.path("stdError").asDouble(),
                1e-10 * s.path("stdError").asDouble());
    }

    @Test
    void badParametersAreNamed() throws Exception {
        mvc.perform(get(base + "/curve").param("drop", "0.7")).andExpect(status().isBadRequest())
                .andExpect(jsonPath("$.where").value("drop"));
        mvc.perform(get(base + "/curve").param("sort", "factor:99")).andExpect(status().isBadRequest())
                .andExpect(jsonPath("$.where").value("sort"));
        mvc.perform(get(base + "/curve").param("sort", "by magic")).andExpect(status().isBadRequest())
                .andExpect(jsonPath("$.where").value("sort"));
        mvc.perform(get(base + "/at").param("position", "576")).andExpect(status().isBadRequest())
                .andExpect(jsonPath("$.where").value("position"));
        mvc.perform(get(base + "/at")).andExpect(status().isBadRequest()).andExpect(jsonPath("$.where").value("position"));
        mvc.perform(get(base + "/at").param("position", "x")).andExpect(status().isBadRequest())
                .andExpect(jsonPath("$.where").value("position"));
        mvc.perform(get(base + "/specifications/0/fit")).andExpect(status().isBadRequest())
                .andExpect(jsonPath("$.where").value("spec"))
                .andExpect(jsonPath("$.message").value(containsString("not among the 576")));
    }
}
