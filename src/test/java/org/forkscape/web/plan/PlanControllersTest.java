package org.forkscape.web.plan;

import static org.hamcrest.Matchers.containsString;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.springframework.test.web.servlet.request.MockMvcRequestBuilders.get;
import static org.springframework.test.web.servlet.request.MockMvcRequestBuilders.post;
import static org.springframework.test.web.servlet.request.MockMvcRequestBuilders.put;
import static org.springframework.test.web.servlet.result.MockMvcResultMatchers.content;
import static org.springframework.test.web.servlet.result.MockMvcResultMatchers.jsonPath;
import static org.springframework.test.web.servlet.result.MockMvcResultMatchers.model;
import static org.springframework.test.web.servlet.result.MockMvcResultMatchers.redirectedUrl;
import static org.springframework.test.web.servlet.result.MockMvcResultMatchers.status;
import static org.springframework.test.web.servlet.result.MockMvcResultMatchers.view;

import org.forkscape.plan.Plan;
import org.forkscape.plan.PlanReader;
import org.forkscape.web.CivicTestData;
import org.forkscape.web.WebTest;
import org.junit.jupiter.api.BeforeEach;
import org.junit.jupiter.api.Test;
import org.springframework.http.MediaType;
import org.springframework.test.web.servlet.ResultActions;

/** The plan page and its JSON API: every problem comes back with the JSON path of its field. */
class PlanControllersTest extends WebTest {
    private String analysis;

    @BeforeEach
    void data() throws Exception {
        analysis = upload("plan.csv", CivicTestData.csv(120, 8));
    }

    @Test
    void aNewAnalysisStartsFromAPlanToFillIn() throws Exception {
        mvc.perform(get("/api/analyses/" + analysis + "/plan")).andExpect(status().isOk())
                .andExpect(jsonPath("$.saved").value(false))
                .andExpect(jsonPath("$.plan.data").value("data.csv"))
                .andExpect(jsonPath("$.plan.decisions[0].kind").value("outcome"))
                .andExpect(jsonPath("$.check.valid").value(false))
                .andExpect(jsonPath("$.check.where").value("decisions[0].alternatives[0].label"))
                // the fresh plan's four empty fields, all found by one check
                .andExpect(jsonPath("$.check.problems.length()").value(4))
                .andExpect(jsonPath("$.check.problems[0].where").value("decisions[0].alternatives[0].label"))
                .andExpect(jsonPath("$.check.problems[3].where").value("decisions[1].alternatives[0].column"))
                .andExpect(jsonPath("$.plan.confidence").doesNotExist())
                // the defaults the form shows in the empty settings are the plan reader's
                .andExpect(jsonPath("$.defaults.confidence").value(PlanReader.DEFAULT_CONFIDENCE))
                .andExpect(jsonPath("$.defaults.seed").value(PlanReader.DEFAULT_SEED))
                .andExpect(jsonPath("$.defaults.maxSpecifications").value(Plan.DEFAULT_MAX_SPECIFICATIONS))
                .andExpect(jsonPath("$.defaults.nullMethod").value(PlanReader.DEFAULT_NULL_METHOD))
                .andExpect(jsonPath("$.defaults.missing").value("per-specification"));
        mvc.perform(get("/analyses/" + analysis + "/plan")).andExpect(status().isOk())
                .andExpect(view().name("plan/edit")).andExpect(model().attributeExists("check"))
                .andExpect(content().string(containsString("<label for=\"plan-json\">")));
    }

    @Test
    void checkCountsAValidPlan() throws Exception {
        check(CivicTestData.plan()).andExpect(jsonPath("$.valid").value(true))
                .andExpect(jsonPath("$.specifications").value(576)).andExpect(jsonPath("$.fitted").value(576));
        check(CivicTestData.plan().replace("\"seed\": 7,", "\"seed\": 7, \"sample\": 100,"))
                .andExpect(jsonPath("$.fitted").value(100));
    }

    /** The plan form's live check: HC2 and HC3 beside two absorbed columns are valid (their leverages are exact). */
    @Test
    void checkAcceptsHc2AndHc3BesideTwoAbsorbedColumns() throws Exception {
        String plan = CivicTestData.plan().replace("[\"classical\", \"HC1\", \"cluster:district\"]", "[\"HC2\", \"HC3\"]")
                .replace("{\"label\": \"region\", \"columns\": [\"region\"]}",
                        "{\"label\": \"district and urban\", \"columns\": [\"district\", \"urban\"]}");
        assertTrue(plan.contains("[\"HC2\", \"HC3\"]")
                && plan.contains("[\"district\", \"urban\"]"), plan);
        check(plan).andExpect(jsonPath("$.valid").value(true));
    }

    @Test
    void checkNamesTheFieldOfEachProblem() throws Exception {
        problem(CivicTestData.plan().replace("\"column\": \"turnout\"", "\"column\": \"turnot\""),
                "decisions[0].alternatives[0].column", "did you mean \"turnout\"?");
        problem(CivicTestData.plan().replace("urban == 1", "urban = 1"), "decisions[3].alternatives[1].keep",
                "is not an operator");
        // found only in the data: the log of a change that can be negative
        problem(CivicTestData.plan().replace("{\"label\": \"turnout change\", \"column\": \"turnout_change\"}",
                "{\"label\": \"turnout change\", \"column\": \"turnout_change\", \"transform\": \"log\"}"),
                "decisions[0].alternatives[1].transform", "log of \"turnout_change\" is undefined");
        problem(CivicTestData.plan().replace("\"data\": \"data.csv\"", "\"data\": \"../../other/data.csv\""), "data",
                "leaves the analysis folder");
        problem(CivicTestData.plan().replace("\"data\": \"data.csv\"", "\"data\": \"/etc/passwd\""), "data",
                "leaves the analysis folder");
        problem(CivicTestData.plan().replace("\"data\": \"data.csv\"", "\"data\": \"plan.json\""), "data",
                "this analysis's data file is data.csv");
        problem("{\"data\": ", "line 1, column 10", "is not valid JSON");
        problem("", "", "the plan is empty");
        problem(CivicTestData.plan().replace("\"kind\": \"errors\"", "\"kind\": \"errrors\""), "decisions[4].kind",
                "did you mean \"errors\"?");
        // found only in the data: a logit of an outcome that is not coded 0/1, at the model alternative
        problem(CivicTestData.plan().replace("\"alternatives\": [\"classical\", \"HC1\", \"cluster:district\"]}",
                "\"alternatives\": [\"classical\", \"HC1\", \"cluster:district\"]},\n{\"name\": \"model\", \"kind\": "
                        + "\"model\", \"alternatives\": [\"ols\", \"logit\"]}"),
                "decisions[5].alternatives[1]", "logit needs an outcome coded 0/1; \"turnout\" has other values");
    }

    @Test
    void checkListsEveryColumnProblemOfTheData() throws Exception {
        check(CivicTestData.plan().replace("\"column\": \"turnout\"", "\"column\": \"turnot\"")
                .replace("\"column\": \"turnout_change\"", "\"column\": \"turnout_chnge\""))
                .andExpect(jsonPath("$.valid").value(false))
                .andExpect(jsonPath("$.where").value("decisions[0].alternatives[0].column"))
                .andExpect(jsonPath("$.problems.length()").value(3))
                .andExpect(jsonPath("$.problems[1].where").value("decisions[0].alternatives[1].column"))
                .andExpect(jsonPath("$.problems[1].message").value(containsString("did you mean \"turnout_change\"?")))
                // the trim rule names the outcome's column too
                .andExpect(jsonPath("$.problems[2].where").value("decisions[3].alternatives[2].trim.column"));
        // the page without scripts lists them all beside the JSON too
        String twoTypos = CivicTestData.plan().replace("\"column\": \"turnout\"", "\"column\": \"turnot\"")
                .replace("\"column\": \"turnout_change\"", "\"column\": \"turnout_chnge\"");
        mvc.perform(post("/analyses/" + analysis + "/plan").param("plan", twoTypos)).andExpect(status().isBadRequest())
                .andExpect(content().string(containsString("<code>decisions[0].alternatives[0].column</code>")))
                .andExpect(content().string(containsString("<code>decisions[0].alternatives[1].column</code>")))
                .andExpect(content().string(containsString("<code>decisions[3].alternatives[2].trim.column</code>")));
    }

    @Test
    void savingKeepsThePlanTextAsSent() throws Exception {
        String plan = CivicTestData.plan();
        mvc.perform(put("/api/analyses/" + analysis + "/plan").contentType(MediaType.APPLICATION_JSON).content(plan))
                .andExpect(status().isOk()).andExpect(jsonPath("$.valid").value(true));
        mvc.perform(get("/api/analyses/" + analysis + "/plan")).andExpect(jsonPath("$.saved").value(true))
                .andExpect(jsonPath("$.plan.title").value("Outreach and turnout"));
        mvc.perform(get("/analyses/" + analysis + "/plan")).andExpect(model().attribute("planText", plan));
        mvc.perform(put("/api/analyses/" + analysis + "/plan").contentType(MediaType.APPLICATION_JSON)
                .content(plan.replace("\"HC1\"", "\"HC9\""))).andExpect(status().isBadRequest())
                .andExpect(jsonPath("$.where").value("decisions[4].alternatives[1]"))
                .andExpect(jsonPath("$.message").value(containsString("unknown standard error type \"HC9\"")));
    }

    @Test
    void thePlainFormSavesOrShowsTheProblem() throws Exception {
        mvc.perform(post("/analyses/" + analysis + "/plan").param("plan", CivicTestData.plan()))
                .andExpect(status().is3xxRedirection()).andExpect(redirectedUrl("/analyses/" + analysis + "/plan?saved"));
        mvc.perform(post("/analyses/" + analysis + "/plan").param("plan", "{\"decisions\": []}"))
                .andExpect(status().isBadRequest()).andExpect(view().name("plan/edit"))
                .andExpect(content().string(containsString("plan-json-problem")))
                .andExpect(content().string(containsString("is required: the path of the data (a CSV file, a Parquet file")));
    }

    /** The time is measured on this machine, so only its form is checked; a plan that cannot run is a 400. */
    @Test
    void estimateSaysWhatARunWouldTakeOnThisServer() throws Exception {
        mvc.perform(post("/api/analyses/" + analysis + "/plan/estimate").contentType(MediaType.APPLICATION_JSON)
                .content(CivicTestData.plan())).andExpect(status().isOk())
                .andExpect(jsonPath("$.seconds").isNumber())
                .andExpect(jsonPath("$.time").value(containsString("of the 576 specifications fitted on this machine")))
                .andExpect(jsonPath("$.memory").value(containsString("of this server's limit of")));
        mvc.perform(post("/api/analyses/" + analysis + "/plan/estimate").contentType(MediaType.APPLICATION_JSON)
                .content(CivicTestData.plan().replace("\"column\": \"turnout\"", "\"column\": \"turnot\"")))
                .andExpect(status().isBadRequest());
    }

    private ResultActions check(String plan) throws Exception {
        return mvc.perform(post("/api/analyses/" + analysis + "/plan/check").contentType(MediaType.APPLICATION_JSON)
                .content(plan)).andExpect(status().isOk());
    }

    private void problem(String plan, String where, String message) throws Exception {
        check(plan).andExpect(jsonPath("$.valid").value(false)).andExpect(jsonPath("$.where").value(where))
                .andExpect(jsonPath("$.message").value(containsString(message)));
    }
}
