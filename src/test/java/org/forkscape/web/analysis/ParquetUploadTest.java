package org.forkscape.web.analysis;

import static org.forkscape.data.SameTable.assertSameTable;
import static org.hamcrest.Matchers.containsString;
import static org.hamcrest.Matchers.startsWith;
import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.springframework.test.web.servlet.request.MockMvcRequestBuilders.get;
import static org.springframework.test.web.servlet.request.MockMvcRequestBuilders.multipart;
import static org.springframework.test.web.servlet.request.MockMvcRequestBuilders.put;
import static org.springframework.test.web.servlet.result.MockMvcResultMatchers.content;
import static org.springframework.test.web.servlet.result.MockMvcResultMatchers.jsonPath;
import static org.springframework.test.web.servlet.result.MockMvcResultMatchers.model;
import static org.springframework.test.web.servlet.result.MockMvcResultMatchers.redirectedUrlPattern;
import static org.springframework.test.web.servlet.result.MockMvcResultMatchers.status;

import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.Arrays;
import org.forkscape.data.CsvTableReader;
import org.forkscape.bench.ParquetCopy;
import org.forkscape.run.Workspace;
import org.forkscape.web.CivicTestData;
import org.forkscape.web.WebTest;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.springframework.beans.factory.annotation.Autowired;
import org.springframework.http.MediaType;
import org.springframework.mock.web.MockMultipartFile;

/**
 * A Parquet file uploaded where a CSV file is: kept byte for byte as data.parquet, read into the same table
 * as the CSV of the same cells, named by the plans of its analysis, run to the same specifications.csv as
 * the CSV analysis; a corrupt one refused naming the uploaded file, with nothing kept.
 */
class ParquetUploadTest extends WebTest {
    @Autowired
    Workspace workspace;
    @Autowired
    AnalysisService analyses;
    @TempDir
    Path dir;

    private byte[] parquetOf(String csv) throws Exception {
        Path file = Files.writeString(dir.resolve("cells.csv"), csv);
        return Files.readAllBytes(ParquetCopy.write(new CsvTableReader().read(file), dir.resolve("cells.parquet")));
    }

    @Test
    void aParquetUploadIsKeptAsDataParquetAndReadAsItsCsvWouldBe() throws Exception {
        String csv = CivicTestData.csv(60, 3);
        byte[] parquet = parquetOf(csv);
        MockMultipartFile file = new MockMultipartFile("file", "turnout.parquet", "application/octet-stream", parquet);
        String location = mvc.perform(multipart("/analyses").file(file))
                .andExpect(status().is3xxRedirection()).andExpect(redirectedUrlPattern("/analyses/*"))
                .andReturn().getResponse().getRedirectedUrl();
        String id = location.substring("/analyses/".length());
        Path stored = workspace.analysisFolder(id).resolve(Workspace.DATA_PARQUET);
        assertEquals(stored, workspace.dataFile(id));
        assertArrayEquals(parquet, Files.readAllBytes(stored), "kept byte for byte");
        assertFalse(Files.exists(workspace.analysisFolder(id).resolve(Workspace.DATA)));
        assertEquals("turnout", workspace.analysis(id).orElseThrow().title());
        assertSameTable(new CsvTableReader().read(Files.writeString(dir.resolve("t.csv"), csv)),
                analyses.table(workspace.analysis(id).orElseThrow()));
        mvc.perform(get(location)).andExpect(status().isOk()).andExpect(model().attributeExists("columns"))
                .andExpect(content().string(containsString("outreach_hours")));
        mvc.perform(get(location + "/plan")).andExpect(status().isOk())
                .andExpect(content().string(containsString("data-data-file=\"data.parquet\"")))
                .andExpect(content().string(containsString("<code>data.parquet</code>")));
    }

    @Test
    void aPlanOnTheParquetAnalysisRunsToTheCsvAnalysisSpecifications() throws Exception {
        String csv = CivicTestData.csv(80, 4);
        String csvId = upload("districts.csv", csv);
        MockMultipartFile file = new MockMultipartFile("file", "districts.parquet", "application/octet-stream",
                parquetOf(csv));
        String body = mvc.perform(multipart("/api/analyses").file(file)).andExpect(status().isCreated())
                .andExpect(jsonPath("$.analysis.dataName").value("districts.parquet"))
                .andExpect(jsonPath("$.analysis.rows").value(80)).andReturn().getResponse().getContentAsString();
        String parquetId = json(body).path("analysis").path("id").asString();

        String plan = CivicTestData.plan();
        assertTrue(plan.contains("\"data\": \"data.csv\""), plan);
        String parquetPlan = plan.replace("\"data\": \"data.csv\"", "\"data\": \"data.parquet\"");
        mvc.perform(put("/api/analyses/" + parquetId + "/plan").contentType(MediaType.APPLICATION_JSON).content(plan))
                .andExpect(status().isBadRequest()).andExpect(jsonPath("$.where").value("data"))
                .andExpect(jsonPath("$.message").value(containsString("the plan must name it (\"data\": \"data.parquet\")")));

        String csvRun = runToEnd(csvId, plan);
        String parquetRun = runToEnd(parquetId, parquetPlan);
        byte[] expected = Files.readAllBytes(runFile(csvId, csvRun, "specifications.csv"));
        assertTrue(expected.length > 1_000, "a real run");
        assertArrayEquals(expected, Files.readAllBytes(runFile(parquetId, parquetRun, "specifications.csv")));
        String summary = Files.readString(runFile(parquetId, parquetRun, "summary.json"), StandardCharsets.UTF_8);
        assertTrue(summary.contains(org.forkscape.run.Provenance.sha256(workspace.dataFile(parquetId))),
                "the run recorded the Parquet file's hash");
    }

    private Path runFile(String analysis, String run, String name) {
        return workspace.analysisFolder(analysis).resolve("runs").resolve(run).resolve(name);
    }

    @Test
    void aCorruptParquetUploadIsRefusedNamingTheFileAndNothingIsKept() throws Exception {
        byte[] good = parquetOf(CivicTestData.csv(30, 5));
        int before = workspace.analyses().size();
        MockMultipartFile cut = new MockMultipartFile("file", "cut.parquet", "application/octet-stream",
                Arrays.copyOf(good, good.length - 30));
        mvc.perform(multipart("/api/analyses").file(cut)).andExpect(status().isBadRequest())
                .andExpect(jsonPath("$.where").value("cut.parquet"))
                .andExpect(jsonPath("$.message").value(startsWith("is not a Parquet file: it does not begin and end with PAR1")));
        mvc.perform(multipart("/analyses").file(cut)).andExpect(status().isBadRequest())
                .andExpect(model().attribute("uploadProblem", startsWith("cut.parquet: is not a Parquet file")));
        assertEquals(before, workspace.analyses().size());
    }
}
