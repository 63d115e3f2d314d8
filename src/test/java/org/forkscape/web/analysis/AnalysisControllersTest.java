package org.forkscape.web.analysis;

import static org.hamcrest.Matchers.containsString;
import static org.hamcrest.Matchers.not;
import static org.hamcrest.Matchers.nullValue;
import static org.hamcrest.Matchers.startsWith;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.springframework.test.web.servlet.request.MockMvcRequestBuilders.get;
import static org.springframework.test.web.servlet.request.MockMvcRequestBuilders.multipart;
import static org.springframework.test.web.servlet.result.MockMvcResultMatchers.content;
import static org.springframework.test.web.servlet.result.MockMvcResultMatchers.jsonPath;
import static org.springframework.test.web.servlet.result.MockMvcResultMatchers.model;
import static org.springframework.test.web.servlet.result.MockMvcResultMatchers.redirectedUrlPattern;
import static org.springframework.test.web.servlet.result.MockMvcResultMatchers.status;
import static org.springframework.test.web.servlet.result.MockMvcResultMatchers.view;

import java.nio.charset.StandardCharsets;
import org.forkscape.run.Workspace;
import org.forkscape.web.CivicTestData;
import org.forkscape.web.WebTest;
import org.junit.jupiter.api.Test;
import org.springframework.beans.factory.annotation.Autowired;
import org.springframework.mock.web.MockMultipartFile;

/** The home page, the upload form, the data page and their JSON API. */
class AnalysisControllersTest extends WebTest {
    @Autowired
    Workspace workspace;

    @Test
    void homePageListsTheAnalyses() throws Exception {
        upload("listed.csv", CivicTestData.csv(30, 1));
        mvc.perform(get("/")).andExpect(status().isOk()).andExpect(view().name("home/index"))
                .andExpect(model().attributeExists("cards")).andExpect(content().string(containsString("listed.csv")))
                .andExpect(content().string(containsString("<label for=\"upload-file\">")));
    }

    @Test
    void anUploadBecomesAnAnalysisAndItsDataPageShowsEveryColumn() throws Exception {
        MockMultipartFile file = new MockMultipartFile("file", "C:\\fakepath\\turnout.csv", "text/csv",
                CivicTestData.csv(50, 2).getBytes(StandardCharsets.UTF_8));
        String location = mvc.perform(multipart("/analyses").file(file).param("title", "Turnout"))
                .andExpect(status().is3xxRedirection()).andExpect(redirectedUrlPattern("/analyses/*"))
                .andReturn().getResponse().getRedirectedUrl();
        String id = location.substring("/analyses/".length());
        assertEquals("turnout.csv", workspace.analysis(id).orElseThrow().dataName(), "only the last name segment is kept");
        mvc.perform(get(location)).andExpect(status().isOk()).andExpect(view().name("data/overview"))
                .andExpect(model().attributeExists("columns"))
                .andExpect(content().string(containsString("outreach_hours")))
                .andExpect(content().string(containsString("<svg class=\"histogram\"")));
    }

    @Test
    void theDataPageWritesSummariesForPeople() throws Exception {
        // by hand: urban is 1 in every row, so its mean is 1, not 1.000; hours' mean (1200 + 4608 + 9000) / 3 =
        // 4936 takes a separator; budget's mean 2500000 is from 1e6 up, so a power of ten; change's minimum
        // -0.000013 is below 1e-4 in size, so a power of ten
        String id = upload("grants.csv", "urban,hours,budget,change\n1,1200,1500000,-0.000013\n1,4608,2500000,0.5\n"
                + "1,9000,3500000,0.25\n");
        mvc.perform(get("/analyses/" + id)).andExpect(status().isOk())
                .andExpect(content().string(containsString("<td class=\"num\">1</td>")))
                .andExpect(content().string(not(containsString("1.000"))))
                .andExpect(content().string(containsString("<td class=\"num\">4,936</td>")))
                .andExpect(content().string(containsString("<td class=\"num\">2.5\u00d710\u2076</td>")))
                .andExpect(content().string(containsString("<td class=\"num\">-1.3\u00d710\u207b\u2075</td>")));
    }

    /** A numeric column that two cells make text is said on the data page, with the cells and the fix. */
    @Test
    void theDataPageWarnsOfNumbersReadAsText() throws Exception {
        StringBuilder csv = new StringBuilder("station,rainfall\n");
        for (int i = 0; i < 12; i++) {
            csv.append("s").append(i).append(',').append(i == 3 ? "n/a" : i == 7 ? "missing" : String.valueOf(i * 1.5))
                    .append('\n');
        }
        String id = upload("rain.csv", csv.toString());
        mvc.perform(get("/analyses/" + id)).andExpect(status().isOk())
                .andExpect(content().string(containsString("Reads as text because of the values &quot;missing&quot;, "
                        + "&quot;n/a&quot;; if these mark missing cells, write them as an empty cell, NA, NaN or .")));
    }

    @Test
    void aBadFileIsRefusedWithItsLineAndNothingIsKept() throws Exception {
        int before = workspace.analyses().size();
        MockMultipartFile file = new MockMultipartFile("file", "ragged.csv", "text/csv",
                "a,b\n1,2\n3\n".getBytes(StandardCharsets.UTF_8));
        mvc.perform(multipart("/analyses").file(file)).andExpect(status().isBadRequest())
                .andExpect(view().name("home/index"))
                .andExpect(model().attribute("uploadProblem", "ragged.csv, line 3: expected 2 fields as in the header, found 1"))
                .andExpect(content().string(containsString("role=\"alert\"")));
        mvc.perform(multipart("/analyses")).andExpect(status().isBadRequest())
                .andExpect(model().attribute("uploadProblem", "Choose a CSV or Parquet file to upload."));
        assertEquals(before, workspace.analyses().size());
    }

    @Test
    void columnNamesAndTitlesAreEscapedInPages() throws Exception {
        MockMultipartFile file = new MockMultipartFile("file", "x.csv", "text/csv",
                "<img src=x onerror=alert(1)>,b\n1,2\n3,4\n".getBytes(StandardCharsets.UTF_8));
        String location = mvc.perform(multipart("/analyses").file(file).param("title", "<script>alert(2)</script>"))
                .andReturn().getResponse().getRedirectedUrl();
        mvc.perform(get(location)).andExpect(status().isOk())
                .andExpect(content().string(containsString("&lt;img src=x onerror=alert(1)&gt;")))
                .andExpect(content().string(not(containsString("<img src=x"))))
                .andExpect(content().string(containsString("&lt;script&gt;alert(2)&lt;/script&gt;")))
                .andExpect(content().string(not(containsString("<script>alert(2)"))));
        mvc.perform(get("/")).andExpect(content().string(not(containsString("<script>alert(2)"))));
    }

    @Test
    void unknownOrForgedIdentifiersFindNothing() throws Exception {
        for (String id : new String[] {"20990101-000000-zzzzzz", "..", "%2e%2e", "..%2f..%2fetc", "etc"}) {
            mvc.perform(get("/analyses/" + id)).andExpect(status().isNotFound()).andExpect(view().name("error"))
                    .andExpect(content().string(not(containsString("Exception"))));
            mvc.perform(get("/api/analyses/" + id)).andExpect(status().isNotFound())
                    .andExpect(jsonPath("$.message", startsWith("there is no analysis")));
        }
    }

    @Test
    void apiUploadsListsAndDescribesAnalyses() throws Exception {
        MockMultipartFile file = new MockMultipartFile("file", "api.csv", "text/csv",
                CivicTestData.csv(40, 3).getBytes(StandardCharsets.UTF_8));
        String body = mvc.perform(multipart("/api/analyses").file(file)).andExpect(status().isCreated())
                .andExpect(jsonPath("$.analysis.dataName").value("api.csv"))
                .andExpect(jsonPath("$.analysis.rows").value(40))
                .andExpect(jsonPath("$.columns[0].name").value("district"))
                .andExpect(jsonPath("$.columns[0].type").value("categorical"))
                .andExpect(jsonPath("$.columns[0].mean").value(nullValue()))
                .andExpect(jsonPath("$.columns[3].type").value("numeric"))
                .andReturn().getResponse().getContentAsString();
        String id = json(body).path("analysis").path("id").asString();
        mvc.perform(get("/api/analyses")).andExpect(status().isOk())
                .andExpect(content().string(containsString(id)));
        mvc.perform(get("/api/analyses/" + id)).andExpect(status().isOk()).andExpect(jsonPath("$.columns.length()").value(11));
    }

    @Test
    void apiRefusesBadUploadsWithWhereAndWhy() throws Exception {
        MockMultipartFile bad = new MockMultipartFile("file", "quote.csv", "text/csv",
                "a,b\n1,\"open\n".getBytes(StandardCharsets.UTF_8));
        mvc.perform(multipart("/api/analyses").file(bad)).andExpect(status().isBadRequest())
                .andExpect(jsonPath("$.where").value(startsWith("quote.csv")))
                .andExpect(jsonPath("$.message").value(containsString("closing quote never comes")));
        mvc.perform(multipart("/api/analyses")).andExpect(status().isBadRequest())
                .andExpect(jsonPath("$.where").value("file"));
    }
}
