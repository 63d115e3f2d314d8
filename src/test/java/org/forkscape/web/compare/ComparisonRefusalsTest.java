package org.forkscape.web.compare;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.springframework.test.web.servlet.request.MockMvcRequestBuilders.get;
import static org.springframework.test.web.servlet.request.MockMvcRequestBuilders.multipart;
import static org.springframework.test.web.servlet.request.MockMvcRequestBuilders.post;
import static org.springframework.test.web.servlet.result.MockMvcResultMatchers.status;
import static org.springframework.test.web.servlet.result.MockMvcResultMatchers.view;

import java.io.ByteArrayInputStream;
import java.io.ByteArrayOutputStream;
import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.zip.ZipEntry;
import java.util.zip.ZipOutputStream;
import org.forkscape.InputException;
import org.forkscape.run.Workspace;
import org.forkscape.web.CivicTestData;
import org.forkscape.web.WebTest;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.springframework.beans.factory.annotation.Autowired;
import org.springframework.mock.web.MockMultipartFile;
import org.springframework.test.web.servlet.MvcResult;

/**
 * What the compare page refuses, each in one sentence naming the field or file, with nothing kept: a run that
 * is not finished or not of the analysis, a file that is no zip, a zip with a file twice, and a zip that
 * unpacks beyond the upload limit (its entries never used as paths).
 */
class ComparisonRefusalsTest extends WebTest {
    @TempDir
    Path dir;
    @Autowired
    Workspace workspace;

    private static byte[] zip(String... namesAndTexts) throws IOException {
        ByteArrayOutputStream bytes = new ByteArrayOutputStream();
        try (ZipOutputStream out = new ZipOutputStream(bytes)) {
            for (int i = 0; i < namesAndTexts.length; i += 2) {
                out.putNextEntry(new ZipEntry(namesAndTexts[i]));
                out.write(namesAndTexts[i + 1].getBytes(StandardCharsets.UTF_8));
                out.closeEntry();
            }
        }
        return bytes.toByteArray();
    }

    private String problemOf(MvcResult r) {
        return r.getModelAndView().getModel().get("problemWhere") + ": " + r.getModelAndView().getModel().get("problem");
    }

    @Test
    void runsThatCannotBeComparedAndFilesThatAreNoRunFolderAreRefusedAndNothingIsKept() throws Exception {
        String analysis = upload("civic.csv", CivicTestData.csv(120, 4));
        String run = runToEnd(analysis, CivicTestData.plan(1));
        MvcResult noSuchRun = mvc.perform(post("/analyses/" + analysis + "/comparisons").param("a", run)
                .param("b", "20200101-000000-aaaaaa")).andExpect(status().isBadRequest())
                .andExpect(view().name(CompareController.PICK)).andReturn();
        assertEquals("b: analysis " + analysis + " has no run \"20200101-000000-aaaaaa\"", problemOf(noSuchRun));

        MvcResult notZip = mvc.perform(multipart("/analyses/" + analysis + "/comparisons/upload")
                .file(new MockMultipartFile("file", "run.csv", "text/csv", "spec,estimate\n1,2\n".getBytes()))
                .param("a", run)).andExpect(status().isBadRequest()).andReturn();
        assertEquals("run.csv: is not a zip file, or is an empty one; zip a run folder's specifications.csv, "
                + "summary.json, plan.json", problemOf(notZip));

        MvcResult twice = mvc.perform(multipart("/analyses/" + analysis + "/comparisons/upload")
                .file(new MockMultipartFile("file", "b.zip", "application/zip", zip("x/plan.json", "{}", "y/plan.json",
                        "{}"))).param("a", run)).andExpect(status().isBadRequest()).andReturn();
        assertEquals("b.zip: holds two files named plan.json (x/plan.json and y/plan.json); zip the files of one "
                + "run folder", problemOf(twice));

        MvcResult badJson = mvc.perform(multipart("/analyses/" + analysis + "/comparisons/upload")
                .file(new MockMultipartFile("file", "c.zip", "application/zip", zip("plan.json", "{", "summary.json",
                        "{}", "specifications.csv", "spec\n"))).param("a", run)).andExpect(status().isBadRequest())
                .andReturn();
        assertEquals("c.zip/plan.json: is not valid JSON", problemOf(badJson).replaceAll(": Unexpected.*", ""));

        try (var kept = Files.list(workspace.analysisFolder(analysis).resolve(Workspace.COMPARISONS))) {
            assertEquals(0, kept.count(), "a refused comparison leaves no folder");
        }
        mvc.perform(get("/analyses/" + analysis + "/comparisons/20200101-000000-aaaaaa")).andExpect(status().isNotFound());
    }

    @Test
    void aZipThatUnpacksBeyondTheLimitIsStoppedAndItsEntryPathsAreNeverUsed() throws IOException {
        byte[] big = zip("../../escape/specifications.csv", "x".repeat(10_000), "specifications.csv", "y".repeat(5000));
        InputException e = assertThrows(InputException.class, () -> UploadedRun.unpack(new ByteArrayInputStream(big),
                "big.zip", dir, 4096));
        assertEquals("big.zip", e.where());
        assertEquals("unpacks to more than this server accepts for an upload (" + org.forkscape.run.MemoryEstimate.format(4096) + ", setting forkscape.data.max-upload)",
                e.problem());
        assertEquals(false, Files.exists(dir.resolve("../../escape")), "an entry deeper than one folder is skipped");
    }
}
