package org.forkscape.web.explore;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.springframework.test.web.servlet.request.MockMvcRequestBuilders.get;
import static org.springframework.test.web.servlet.result.MockMvcResultMatchers.jsonPath;
import static org.springframework.test.web.servlet.result.MockMvcResultMatchers.status;

import java.io.StringReader;
import java.util.HashMap;
import java.util.Map;
import org.apache.commons.csv.CSVFormat;
import org.apache.commons.csv.CSVRecord;
import org.apache.commons.math3.stat.descriptive.rank.Percentile;
import org.forkscape.web.CivicTestData;
import org.forkscape.web.WebTest;
import org.junit.jupiter.api.BeforeEach;
import org.junit.jupiter.api.Test;
import tools.jackson.databind.JsonNode;

/**
 * The explorer's API over a run whose model decision fits a 0/1 outcome by least squares and by a logit:
 * one model at a time as fitted, both on the average-marginal-effect scale, the logit specifications left
 * out of the scales defined for least squares only, and a logit's full fit. Values are checked against the
 * run's own specifications.csv, read with Commons CSV; quantiles against Commons Math's {@link Percentile}
 * (type 7).
 */
class ExploreModelsApiTest extends WebTest {
    private String base;
    private final Map<Long, CSVRecord> csv = new HashMap<>();

    @BeforeEach
    void run() throws Exception {
        String analysis = upload("follow-up.csv", CivicTestData.csvWithFollowUp(300, 21));
        String run = runToEnd(analysis, CivicTestData.modelPlan());
        base = "/api/analyses/" + analysis + "/runs/" + run;
        String file = mvc.perform(get(base.replace("/api/", "/") + "/files/specifications.csv")).andExpect(status().isOk())
                .andReturn().getResponse().getContentAsString();
        for (CSVRecord r : CSVFormat.RFC4180.builder().setHeader().setSkipHeaderRecord(true).get()
                .parse(new StringReader(file))) {
            csv.put(Long.parseLong(r.get("spec")), r);
        }
        assertEquals(8, csv.values().stream().filter(r -> r.get("model").equals("logit") && r.get("status").equals("ok"))
                .count(), "the logit specifications were fitted");
    }

    @Test
    void asFittedOneModelAtATimeAndTheEffectsTogether() throws Exception {
        mvc.perform(get(base + "/layout")).andExpect(status().isOk())
                .andExpect(jsonPath("$.unitsDiffer").value(true))
                .andExpect(jsonPath("$.groups.length()").value(2))
                .andExpect(jsonPath("$.groups[1].model").value("logit"))
                .andExpect(jsonPath("$.groups[1].unit").value("log-odds of follow-up per unit of outreach (hours)"))
                .andExpect(jsonPath("$.modelFactor").value(5))
                .andExpect(jsonPath("$.scales[1].id").value("effect"))
                .andExpect(jsonPath("$.scales[1].unitFree").value(false))
                .andExpect(jsonPath("$.scales[1].groups.length()").value(1))
                .andExpect(jsonPath("$.scales[1].unitsDiffer").value(false))
                .andExpect(jsonPath("$.scales[2].id").value("standardized"))
                .andExpect(jsonPath("$.scales[2].leftOut").value(8))
                .andExpect(jsonPath("$.summary.median_mixes_units").value(true));
        JsonNode logit = curve(Map.of("group", "1"));
        assertEquals(8, logit.path("summary").path("count").asInt());
        JsonNode points = logit.path("curve").path("points");
        for (int i = 0; i < 8; i++) {
            assertEquals("logit", csv.get(points.path("spec").get(i).asLong()).get("model"));
        }
        JsonNode effect = curve(Map.of("scale", "effect"));
        assertEquals("change in the probability of follow-up per unit of outreach (hours)", effect.path("unit").asString());
        assertEquals(16, effect.path("summary").path("count").asInt());
        assertEquals(0, effect.path("group").asInt());
        double[] values = new double[16];
        JsonNode e = effect.path("curve").path("points");
        for (int i = 0; i < 16; i++) {
            CSVRecord row = csv.get(e.path("spec").get(i).asLong());
            values[i] = e.path("estimate").get(i).asDouble();
            assertEquals(Double.parseDouble(row.get("effect")), values[i], 0, "the effect as specifications.csv has it");
            if (row.get("model").equals("ols")) {
                assertEquals(Double.parseDouble(row.get("ci_low")), e.path("low").get(i).asDouble(),
                        1e-12 * Math.abs(values[i]), "for least squares the effect's interval is the coefficient's");
            }
        }
        double median = new Percentile().withEstimationType(Percentile.EstimationType.R_7).evaluate(values, 50);
        assertEquals(median, effect.path("summary").path("median").asDouble(), 1e-12 * Math.abs(median));
        assertNotEquals(logit.path("summary").path("median").asDouble(), median, "the effect is not the log-odds");
    }

    @Test
    void scalesForLeastSquaresOnlyLeaveTheLogitsOutAndCountThem() throws Exception {
        JsonNode standardized = curve(Map.of("scale", "standardized"));
        assertEquals(8, standardized.path("summary").path("count").asInt());
        assertEquals(8, standardized.path("leftOut").asInt());
        assertEquals(16, standardized.path("total").asInt());
        JsonNode partial = curve(Map.of("scale", "partial"));
        assertEquals(8, partial.path("leftOut").asInt());
        JsonNode p = partial.path("curve").path("points");
        for (int i = 0; i < 8; i++) {
            CSVRecord row = csv.get(p.path("spec").get(i).asLong());
            assertEquals("ols", row.get("model"));
            double t = Double.parseDouble(row.get("statistic"));
            assertEquals(t / Math.sqrt(t * t + Double.parseDouble(row.get("df"))), p.path("estimate").get(i).asDouble(),
                    1e-12);
        }
        // dropping the logit alternative (factor 5, level 1) leaves nothing out
        assertEquals(0, curve(Map.of("scale", "partial", "drop", "5.1")).path("leftOut").asInt());
        assertEquals(16, curve(Map.of("scale", "t")).path("summary").path("count").asInt());
    }

    @Test
    void aLogitsFullFitHasItsModelZTheLikelihoodRatioTestTheDevianceAndTheEffect() throws Exception {
        long spec = csv.values().stream().filter(r -> r.get("model").equals("logit")).mapToLong(r -> Long.parseLong(
                r.get("spec"))).findFirst().orElseThrow();
        CSVRecord row = csv.get(spec);
        JsonNode fit = json(mvc.perform(get(base + "/specifications/" + spec + "/fit")).andExpect(status().isOk())
                .andReturn().getResponse().getContentAsString());
        assertEquals("logit", fit.path("model").asString());
        assertEquals("logistic regression", fit.path("modelTitle").asString());
        assertTrue(fit.path("fit").path("df").isNull(), "no degrees of freedom on the standard normal reference");
        assertTrue(fit.path("fit").path("modelF").isNull());
        assertEquals(Double.parseDouble(row.get("effect")), fit.path("effect").asDouble(), 0);
        assertEquals(Double.parseDouble(row.get("effect_std_error")), fit.path("effectStdError").asDouble(), 0);
        assertEquals(Double.parseDouble(row.get("deviance")), fit.path("deviance").asDouble(), 0);
        assertEquals(Double.parseDouble(row.get("r2")), fit.path("fit").path("r2").asDouble(), 1e-9);
        assertEquals(Double.parseDouble(row.get("model_p_value")), fit.path("fit").path("modelPValue").asDouble(),
                1e-9 * Double.parseDouble(row.get("model_p_value")));
        JsonNode key = null;
        for (JsonNode c : fit.path("fit").path("coefficients")) {
            if (c.path("role").asString().equals("key")) {
                key = c;
            }
        }
        assertEquals(Double.parseDouble(row.get("estimate")), key.path("estimate").asDouble(),
                1e-8 * Math.abs(key.path("estimate").asDouble()), "the full fit's key coefficient is the run's");
    }

    private JsonNode curve(Map<String, String> params) throws Exception {
        var request = get(base + "/curve");
        params.forEach(request::param);
        return json(mvc.perform(request).andExpect(status().isOk()).andReturn().getResponse().getContentAsString());
    }
}
