package org.forkscape.web.explore;

import static org.hamcrest.Matchers.containsString;
import static org.hamcrest.Matchers.nullValue;
import static org.springframework.test.web.servlet.request.MockMvcRequestBuilders.get;
import static org.springframework.test.web.servlet.result.MockMvcResultMatchers.jsonPath;
import static org.springframework.test.web.servlet.result.MockMvcResultMatchers.status;

import org.forkscape.web.CivicTestData;
import org.forkscape.web.WebTest;
import org.junit.jupiter.api.Test;

/**
 * The null draws of a run made through the web: the unit they resampled and, when they split up the
 * clusters of the errors, the warning, in the explorer's layout (the run's summary.json).
 */
class NullDrawWarningWebTest extends WebTest {
    /** The civic plan with one optional control (144 specifications, errors clustered on district). */
    private String layout(String nullKeys) throws Exception {
        String analysis = upload("draws.csv", CivicTestData.csv(160, 12));
        String plan = CivicTestData.plan(1).replace("\"seed\": 7,", "\"seed\": 7, \"nullDraws\": 20," + nullKeys);
        return "/api/analyses/" + analysis + "/runs/" + runToEnd(analysis, plan) + "/layout";
    }

    @Test
    void byDefaultTheDistrictsAreResampledWithoutAWarning() throws Exception {
        mvc.perform(get(layout(""))).andExpect(status().isOk())
                .andExpect(jsonPath("$.summary.null.draws").value(20))
                .andExpect(jsonPath("$.summary.null.cluster").value("district"))
                .andExpect(jsonPath("$.summary.null.resampled").value("clusters"))
                .andExpect(jsonPath("$.summary.null.warning").value(nullValue()));
    }

    @Test
    void singleRowsAskedForComeWithTheWarning() throws Exception {
        mvc.perform(get(layout(" \"nullCluster\": \"rows\","))).andExpect(status().isOk())
                .andExpect(jsonPath("$.summary.null.resampled").value("rows"))
                .andExpect(jsonPath("$.summary.null.cluster").value(nullValue()))
                .andExpect(jsonPath("$.summary.null.warning").value(containsString(
                        "resample single rows, as asked, so they split up the clusters of \"district\"")));
    }
}
