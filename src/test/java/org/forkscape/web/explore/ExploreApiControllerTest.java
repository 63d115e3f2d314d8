package org.forkscape.web.explore;

import static org.hamcrest.Matchers.containsString;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.hamcrest.Matchers.startsWith;
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
        mvc.perform(get(base + "/curve").param("scale", "standardized")).andExpect(status().isOk())
                .andExpect(jsonPath("$.summary.count").value(576))
                .andExpect(jsonPath("$.curve.mode").value("points"))
                .andExpect(jsonPath("$.curve.points.spec.length()").value(576))
                .andExpect(jsonPath("$.influence.factors.length()").value(8))
                .andExpect(jsonPath("$.influence.sentence").value(startsWith("Significant in the dominant sign")));
        mvc.perform(get(base + "/curve").param("drop", "0.1,5.2").param("sort", "factor:5").param("scale", "partial"))
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
    void aSpecificationIsFoundAtThePositionTheCurveShowsItAndNotFoundOutsideTheSet() throws Exception {
        for (int position : new int[] {0, 37, 143}) {
            long spec = json(mvc.perform(get(base + "/at").param("position", Integer.toString(position))
                    .param("sort", "factor:4")).andReturn().getResponse().getContentAsString()).path("spec").asLong();
            mvc.perform(get(base + "/specifications/" + spec + "/position").param("sort", "factor:4"))
                    .andExpect(status().isOk()).andExpect(jsonPath("$.spec").value(spec))
                    .andExpect(jsonPath("$.position").value(position));
        }
        // a specification of the second outcome is outside the first comparable group shown as fitted
        JsonNode other = json(mvc.perform(get(base + "/at").param("position", "0").param("group", "2"))
                .andReturn().getResponse().getContentAsString());
        mvc.perform(get(base + "/specifications/" + other.path("spec").asLong() + "/position"))
                .andExpect(status().isOk()).andExpect(jsonPath("$.position").value(-1));
    }

    @Test
    void badParametersAreNamed() throws Exception {
        mvc.perform(get(base + "/curve").param("drop", "0.7")).andExpect(status().isBadRequest())
                .andExpect(jsonPath("$.where").value("drop"));
        mvc.perform(get(base + "/curve").param("sort", "factor:99")).andExpect(status().isBadRequest())
                .andExpect(jsonPath("$.where").value("sort"));
        mvc.perform(get(base + "/curve").param("sort", "by magic")).andExpect(status().isBadRequest())
                .andExpect(jsonPath("$.where").value("sort"));
        mvc.perform(get(base + "/curve").param("scale", "percent")).andExpect(status().isBadRequest())
                .andExpect(jsonPath("$.where").value("scale"));
        mvc.perform(get(base + "/curve").param("group", "4")).andExpect(status().isBadRequest())
                .andExpect(jsonPath("$.where").value("group"));
        mvc.perform(get(base + "/at").param("position", "144")).andExpect(status().isBadRequest())
                .andExpect(jsonPath("$.where").value("position"));
        mvc.perform(get(base + "/at").param("position", "576").param("scale", "t")).andExpect(status().isBadRequest())
                .andExpect(jsonPath("$.where").value("position"));
        mvc.perform(get(base + "/at")).andExpect(status().isBadRequest()).andExpect(jsonPath("$.where").value("position"));
        mvc.perform(get(base + "/at").param("position", "x")).andExpect(status().isBadRequest())
                .andExpect(jsonPath("$.where").value("position"));
        mvc.perform(get(base + "/specifications/0/fit")).andExpect(status().isBadRequest())
                .andExpect(jsonPath("$.where").value("spec"))
                .andExpect(jsonPath("$.message").value(containsString("not among the 576")));
    }

    @Test
    void aMixedUnitRunShowsOneComparableGroupAsFittedAndEverythingOnACommonScale() throws Exception {
        mvc.perform(get(base + "/layout")).andExpect(status().isOk()).andExpect(jsonPath("$.unitsDiffer").value(true))
                .andExpect(jsonPath("$.groups.length()").value(4))
                .andExpect(jsonPath("$.groups[1].predictor").value("log hours"))
                .andExpect(jsonPath("$.groups[1].fitted").value(144))
                .andExpect(jsonPath("$.defaultScale").value("fitted"))
                .andExpect(jsonPath("$.defaultGroup").value(0))
                .andExpect(jsonPath("$.summary.median_mixes_units").value(true));
        JsonNode fitted = curve(Map.of());
        assertEquals("fitted", fitted.path("scale").asString());
        assertEquals(0, fitted.path("group").asInt());
        assertEquals("turnout per unit of outreach (hours)", fitted.path("unit").asString());
        assertEquals(144, fitted.path("summary").path("count").asInt());
        JsonNode levels = fitted.path("curve").path("points").path("levels");
        for (int i = 0; i < 144; i++) {
            assertEquals(0, levels.get(0).get(i).asInt(), "outcome of position " + i);
            assertEquals(0, levels.get(1).get(i).asInt(), "key-predictor coding of position " + i);
        }
        JsonNode last = curve(Map.of("group", "3", "drop", "5.1"));
        assertEquals("turnout change per unit of outreach (log hours)", last.path("unit").asString());
        assertEquals(144 / 3 * 2, last.path("summary").path("count").asInt());
        assertEquals(1, last.path("curve").path("points").path("levels").get(0).get(0).asInt());

        // the common scales against the run's own specifications.csv, read with Commons CSV
        Map<Long, double[]> csv = new HashMap<>();
        String file = mvc.perform(get(base.replace("/api/", "/") + "/files/specifications.csv")).andExpect(status().isOk())
                .andReturn().getResponse().getContentAsString();
        for (CSVRecord r : CSVFormat.RFC4180.builder().setHeader().setSkipHeaderRecord(true).get()
                .parse(new StringReader(file))) {
            csv.put(Long.parseLong(r.get("spec")), new double[] {Double.parseDouble(r.get("std_estimate")),
                    Double.parseDouble(r.get("statistic")), Double.parseDouble(r.get("df"))});
        }
        JsonNode standardized = curve(Map.of("scale", "standardized"));
        assertEquals(576, standardized.path("summary").path("count").asInt());
        assertEquals("standard deviations of outcome per standard deviation of outreach",
                standardized.path("unit").asString());
        assertEquals(-1, standardized.path("group").asInt());
        double[] values = new double[576];
        JsonNode points = standardized.path("curve").path("points");
        for (int i = 0; i < 576; i++) {
            values[i] = points.path("estimate").get(i).asDouble();
            assertEquals(csv.get(points.path("spec").get(i).asLong())[0], values[i], 1e-12 * Math.abs(values[i]));
            if (i > 0) {
                assertTrue(values[i - 1] <= values[i], "ranked by the standardized estimate at " + i);
            }
        }
        double median = new Percentile().withEstimationType(Percentile.EstimationType.R_7).evaluate(values, 50);
        assertEquals(median, standardized.path("summary").path("median").asDouble(), 1e-12 * Math.abs(median));
        assertNotEquals(fitted.path("summary").path("median").asDouble(), median);

        JsonNode partial = curve(Map.of("scale", "partial", "drop", "0.1"));
        assertEquals(288, partial.path("summary").path("count").asInt());
        JsonNode p = partial.path("curve").path("points");
        for (int i = 0; i < 288; i++) {
            double[] row = csv.get(p.path("spec").get(i).asLong());
            double r = row[1] / Math.sqrt(row[1] * row[1] + row[2]);
            assertEquals(r, p.path("estimate").get(i).asDouble(), 1e-12);
            assertTrue(p.path("low").get(i).asDouble() <= r && r <= p.path("high").get(i).asDouble());
        }
        JsonNode t = curve(Map.of("scale", "t"));
        assertTrue(t.path("summary").path("lowestBound").isNull(), "no interval, so no extreme bounds, on the t scale");
        assertTrue(t.path("curve").path("points").path("low").get(0).isNull());
        assertEquals(csv.get(t.path("curve").path("points").path("spec").get(0).asLong())[1],
                t.path("curve").path("points").path("estimate").get(0).asDouble(), 1e-12);
    }

    private JsonNode curve(Map<String, String> params) throws Exception {
        var request = get(base + "/curve");
        params.forEach(request::param);
        return json(mvc.perform(request).andExpect(status().isOk()).andReturn().getResponse().getContentAsString());
    }
}
