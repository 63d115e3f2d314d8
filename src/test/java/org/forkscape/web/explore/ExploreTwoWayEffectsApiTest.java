package org.forkscape.web.explore;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.springframework.test.web.servlet.request.MockMvcRequestBuilders.get;
import static org.springframework.test.web.servlet.result.MockMvcResultMatchers.status;

import java.io.Reader;
import java.io.StringReader;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.HashMap;
import java.util.Map;
import org.apache.commons.csv.CSVFormat;
import org.apache.commons.csv.CSVRecord;
import org.forkscape.web.WebTest;
import org.junit.jupiter.api.Test;
import tools.jackson.databind.JsonNode;

/**
 * The reference plan {@code school-panel-plan.json} (pupil and term effects absorbed together) run through the
 * web door, and the explorer's full fit of a specification with both absorbed: its key coefficient and K are
 * R's (lm with factor() dummies, {@code school-panel-expected.csv} from
 * {@code src/test/r/two-way-effects-reference.R}), and it says what the two columns count in K.
 */
class ExploreTwoWayEffectsApiTest extends WebTest {
    private static Path reference(String name) throws Exception {
        return Path.of(ExploreTwoWayEffectsApiTest.class.getResource("/reference/" + name).toURI());
    }

    private static Map<String, CSVRecord> bySpec(Reader in) throws Exception {
        Map<String, CSVRecord> out = new HashMap<>();
        for (CSVRecord r : CSVFormat.RFC4180.builder().setHeader().setSkipHeaderRecord(true).get().parse(in)) {
            out.put(r.get("spec"), r);
        }
        return out;
    }

    /** A run's API address, its specifications.csv and R's reference rows, each by spec number. */
    private record Ran(String base, Map<String, CSVRecord> written, Map<String, CSVRecord> expected) {
    }

    /** Uploads {@code name}.csv, runs {@code name}-plan.json on it through the web door, and reads the results. */
    private Ran run(String name) throws Exception {
        String analysis = upload(name + ".csv", Files.readString(reference(name + ".csv")));
        String plan = Files.readString(reference(name + "-plan.json")).replace("\"" + name + ".csv\"", "\"data.csv\"");
        String base = "/api/analyses/" + analysis + "/runs/" + runToEnd(analysis, plan);
        String file = mvc.perform(get(base.replace("/api/", "/") + "/files/specifications.csv")).andExpect(status().isOk())
                .andReturn().getResponse().getContentAsString();
        try (Reader in = Files.newBufferedReader(reference(name + "-expected.csv"), StandardCharsets.UTF_8)) {
            return new Ran(base, bySpec(new StringReader(file)), bySpec(in));
        }
    }

    @Test
    void theFullFitOfASpecificationWithBothEffectsAbsorbedIsLmsWithDummies() throws Exception {
        Ran ran = run("school-panel");
        String base = ran.base();
        Map<String, CSVRecord> written = ran.written();
        Map<String, CSVRecord> expected = ran.expected();
        // spec 18: score on hours, no controls, both schools, pupil and term effects, HC1
        CSVRecord r = expected.get("18");
        assertEquals("pupil and term", r.get("effects"));
        assertEquals("HC1", r.get("errors"));
        JsonNode fit = json(mvc.perform(get(base + "/specifications/18/fit")).andExpect(status().isOk())
                .andReturn().getResponse().getContentAsString()).path("fit");
        assertEquals("pupil, term", fit.path("absorbed").asString());
        assertEquals(2, fit.path("absorbedDimensions").asInt());
        assertEquals(Integer.parseInt(r.get("effects_rank")), fit.path("absorbedLevels").asInt(),
                "rank of R's model.matrix of the factors");
        assertEquals(Integer.parseInt(r.get("n_params")), fit.path("nParams").asInt(), "R lm() rank");
        JsonNode key = null;
        for (JsonNode c : fit.path("coefficients")) {
            if (c.path("role").asString().equals("key")) {
                key = c;
            }
        }
        double estimate = Double.parseDouble(r.get("estimate"));
        assertEquals(estimate, key.path("estimate").asDouble(), 1e-9 * Math.abs(estimate), "R lm() coefficient");
        double se = Double.parseDouble(r.get("std_error"));
        assertEquals(se, key.path("stdError").asDouble(), 1e-9 * se, "sandwich::vcovHC HC1");
        assertEquals(Double.parseDouble(written.get("18").get("estimate")), key.path("estimate").asDouble(),
                1e-12 * Math.abs(estimate), "the run's own estimate");
    }

    /**
     * Three absorbed columns through the web door ({@code three-way-panel-plan.json}): the explorer's full fit of
     * HC3 specifications absorbing pupil, term and teacher, unweighted and weighted, has R's K, the dummies' rank
     * ({@code qr()} on the factors' model matrix, not the levels less one per connected component), and sandwich's
     * vcovHC HC3 on lm with factor() dummies ({@code three-way-panel-expected.csv} from
     * {@code src/test/r/three-way-effects-reference.R}).
     */
    @Test
    void theFullFitWithThreeEffectsAbsorbedIsLmsWithDummies() throws Exception {
        Ran ran = run("three-way-panel");
        // specs 173 and 180: no controls, the steady pupils, pupil, term and teacher effects, unweighted and survey
        // weights, HC3
        for (String spec : new String[] {"173", "180"}) {
            CSVRecord r = ran.expected().get(spec);
            assertEquals("pupil, term and teacher", r.get("effects"));
            assertEquals("HC3", r.get("errors"));
            JsonNode fit = json(mvc.perform(get(ran.base() + "/specifications/" + spec + "/fit"))
                    .andExpect(status().isOk()).andReturn().getResponse().getContentAsString()).path("fit");
            assertEquals("pupil, term, teacher", fit.path("absorbed").asString());
            assertEquals(3, fit.path("absorbedDimensions").asInt());
            assertEquals(Integer.parseInt(r.get("effects_rank")), fit.path("absorbedLevels").asInt(),
                    "rank of R's model.matrix of the factors");
            assertEquals(Integer.parseInt(r.get("n_params")), fit.path("nParams").asInt(), "R lm() rank");
            JsonNode key = null;
            for (JsonNode c : fit.path("coefficients")) {
                if (c.path("role").asString().equals("key")) {
                    key = c;
                }
            }
            double estimate = Double.parseDouble(r.get("estimate"));
            assertEquals(estimate, key.path("estimate").asDouble(), 1e-9 * Math.abs(estimate), "R lm() coefficient");
            double se = Double.parseDouble(r.get("std_error"));
            assertEquals(se, key.path("stdError").asDouble(), 1e-9 * se, "sandwich::vcovHC HC3");
            assertEquals(Double.parseDouble(ran.written().get(spec).get("std_error")), key.path("stdError").asDouble(),
                    1e-12 * se, "the run's own standard error");
        }
    }

    /**
     * The explorer's full fit of HC3 specifications with both effects absorbed ({@code school-panel-leverage-plan.json}):
     * unweighted and weighted, the key coefficient's standard error is sandwich's vcovHC HC3 on R's lm with factor()
     * dummies ({@code school-panel-leverage-expected.csv} from {@code src/test/r/two-way-leverage-reference.R}), as in
     * the run's specifications.csv; with a singleton pupil among the rows the fit has the leverage status R's
     * hatvalues of 1 give.
     */
    @Test
    void theFullFitOfAnHc3SpecificationWithBothEffectsAbsorbedIsSandwichs() throws Exception {
        Ran ran = run("school-panel-leverage");
        String base = ran.base();
        Map<String, CSVRecord> written = ran.written();
        Map<String, CSVRecord> expected = ran.expected();
        // specs 20, 22, 24: no controls, pupils seen twice or more, pupil and term effects, unweighted, design and
        // survey weights, HC3
        for (String spec : new String[] {"20", "22", "24"}) {
            CSVRecord r = expected.get(spec);
            assertEquals("pupil and term", r.get("effects"));
            assertEquals("HC3", r.get("errors"));
            assertEquals("ok", r.get("status"));
            JsonNode key = keyOf(json(mvc.perform(get(base + "/specifications/" + spec + "/fit")).andExpect(status().isOk())
                    .andReturn().getResponse().getContentAsString()).path("fit"));
            double se = Double.parseDouble(r.get("std_error"));
            assertEquals(se, key.path("stdError").asDouble(), 1e-9 * se, "spec " + spec + ": sandwich::vcovHC HC3");
            assertEquals(Double.parseDouble(written.get(spec).get("std_error")), key.path("stdError").asDouble(),
                    1e-12 * se, "spec " + spec + ": the run's own standard error");
        }
        // spec 8: every pupil (singletons among them), pupil and term effects, unweighted, HC3
        assertEquals("undefined: leverage 1", expected.get("8").get("status"));
        JsonNode undefined = json(mvc.perform(get(base + "/specifications/8/fit")).andExpect(status().isOk())
                .andReturn().getResponse().getContentAsString()).path("fit");
        assertEquals("undefined: leverage 1 for HC3 (a row fits perfectly, such as a fixed-effect level with one row)",
                undefined.path("status").asString(), undefined.toString());
        assertEquals(written.get("8").get("status"), undefined.path("status").asString());
    }

    private static JsonNode keyOf(JsonNode fit) {
        for (JsonNode c : fit.path("coefficients")) {
            if (c.path("role").asString().equals("key")) {
                return c;
            }
        }
        throw new AssertionError("no key coefficient in " + fit);
    }
}
