package org.forkscape.web.system;

import static org.hamcrest.Matchers.allOf;
import static org.hamcrest.Matchers.containsString;
import static org.hamcrest.Matchers.startsWith;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.springframework.test.web.servlet.request.MockMvcRequestBuilders.multipart;
import static org.springframework.test.web.servlet.result.MockMvcResultMatchers.jsonPath;
import static org.springframework.test.web.servlet.result.MockMvcResultMatchers.model;
import static org.springframework.test.web.servlet.result.MockMvcResultMatchers.status;
import static org.springframework.test.web.servlet.result.MockMvcResultMatchers.view;

import java.io.IOException;
import java.io.UncheckedIOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.stream.Stream;
import org.forkscape.data.ParquetFiles;
import org.forkscape.run.Workspace;
import org.junit.jupiter.api.Test;
import org.springframework.beans.factory.annotation.Autowired;
import org.springframework.boot.test.context.SpringBootTest;
import org.springframework.boot.webmvc.test.autoconfigure.AutoConfigureMockMvc;
import org.springframework.mock.web.MockMultipartFile;
import org.springframework.test.context.DynamicPropertyRegistry;
import org.springframework.test.context.DynamicPropertySource;
import org.springframework.test.web.servlet.MockMvc;
import org.springframework.test.web.servlet.ResultActions;

/**
 * A server whose memory limit (setting {@code forkscape.runs.max-memory}) is 1 MB: an upload priced above
 * it before parsing is refused with the estimate, the limit and the setting, 507 like a full disk, and
 * nothing is kept; one whose text levels pass it while it is read is stopped there; one within it reads.
 */
@SpringBootTest
@AutoConfigureMockMvc
class UploadMemoryTest {
    private static final Path WORKSPACE = temp();

    @Autowired
    MockMvc mvc;
    @Autowired
    Workspace workspace;
    @Autowired
    MemoryBudget budget;

    @DynamicPropertySource
    static void settings(DynamicPropertyRegistry registry) {
        registry.add("forkscape.workspace", WORKSPACE::toString);
        registry.add("forkscape.demo.enabled", () -> "false");
        registry.add("forkscape.runs.max-memory", () -> "1MB");
    }

    /**
     * 60,000 rows of 4 numbers: 4 columns of 4 blocks of 16,384 doubles (131,088 bytes each) and one final
     * array of 60,000 (480,016 bytes), 2.5 MiB, which the message rounds to 2 MB. Its first data row has 3
     * fields, which the parser refuses at once: a refusal about memory shows that the file was priced and
     * refused before the parser ran.
     */
    @Test
    void anUploadPricedAboveTheLimitIsRefusedBeforeItIsParsed() throws Exception {
        StringBuilder csv = new StringBuilder("turnout,age,distance,rainfall\n1,2,3\n");
        for (int i = 1; i < 60_000; i++) {
            csv.append(i % 97).append(',').append(i % 89).append(',').append(i % 7).append(".5,").append(i % 3)
                    .append('\n');
        }
        int before = workspace.analyses().size();
        upload("wards.csv", csv.toString()).andExpect(status().isInsufficientStorage())
                .andExpect(jsonPath("$.where").value("file"))
                .andExpect(jsonPath("$.message").value(allOf(
                        startsWith("reading wards.csv would take about 2 MB of memory (60,000 rows by 4 columns at "
                                + "up to 8 bytes a cell, before its text levels), above the limit of 1 MB that one "
                                + "run or upload may hold (setting forkscape.runs.max-memory"),
                        containsString("the upload was not kept"))));
        mvc.perform(multipart("/analyses").file(file("wards.csv", csv.toString())))
                .andExpect(status().isInsufficientStorage()).andExpect(view().name("home/index"))
                .andExpect(model().attribute("uploadProblem", startsWith("reading wards.csv would take about 2 MB")));
        assertEquals(before, workspace.analyses().size());
        assertEquals(0, budget.held(), "the reservation was released");
        try (Stream<Path> left = Files.list(workspace.root().resolve(".incoming"))) {
            assertEquals(0, left.filter(Files::isRegularFile).count(), "the incoming copy was removed");
        }
    }

    /** 6,000 distinct texts of 300 characters: priced at 0.1 MB, their levels hold about 2 MB. */
    @Test
    void anUploadWhoseTextLevelsPassTheLimitIsStoppedWhileItIsRead() throws Exception {
        StringBuilder csv = new StringBuilder("remark\n");
        for (int i = 0; i < 6_000; i++) {
            csv.append(i).append(" ").append("x".repeat(300)).append('\n');
        }
        upload("remarks.csv", csv.toString()).andExpect(status().isInsufficientStorage())
                .andExpect(jsonPath("$.message").value(allOf(startsWith("reading remarks.csv needs more than "),
                        containsString("the distinct texts of its text columns"),
                        containsString("above the limit of 1 MB"), containsString("forkscape.runs.max-memory"))));
        assertEquals(0, budget.held());
    }

    @Test
    void anUploadWithinTheLimitIsKept() throws Exception {
        StringBuilder csv = new StringBuilder("ward,turnout\n");
        for (int i = 0; i < 2_000; i++) {
            csv.append("w").append(i % 12).append(',').append(i % 61).append('\n');
        }
        upload("small.csv", csv.toString()).andExpect(status().isCreated())
                .andExpect(jsonPath("$.analysis.rows").value(2_000));
        assertEquals(0, budget.held());
    }

    /**
     * A Parquet file is priced from its footer: 60,000 rows of 4 doubles are 4 final arrays of 480,016 bytes
     * (1.8 MiB) before its row group, above the limit; 2,000 rows of the same columns read within it.
     */
    @Test
    void aParquetUploadIsPricedFromItsFooterAgainstTheSameLimit() throws Exception {
        Path dir = Files.createTempDirectory(WORKSPACE, "parquet-");
        String schema = "message m { required double turnout; required double age; required double distance; "
                + "required double rainfall; }";
        java.util.List<java.util.List<Object>> rows = new java.util.ArrayList<>();
        for (int i = 0; i < 60_000; i++) {
            rows.add(java.util.List.of(i % 97.0, i % 89.0, i % 7 + 0.5, i % 3.0));
        }
        byte[] large = Files.readAllBytes(ParquetFiles.write(dir.resolve("large.parquet"), schema, rows));
        byte[] small = Files.readAllBytes(ParquetFiles.write(dir.resolve("small.parquet"), schema, rows.subList(0, 2_000)));
        int before = workspace.analyses().size();
        mvc.perform(multipart("/api/analyses").file(new MockMultipartFile("file", "wards.parquet",
                "application/octet-stream", large))).andExpect(status().isInsufficientStorage())
                .andExpect(jsonPath("$.message").value(startsWith("reading wards.parquet would take about 2 MB of "
                        + "memory (60,000 rows by 4 columns")));
        assertEquals(before, workspace.analyses().size());
        assertEquals(0, budget.held(), "the reservation was released");
        mvc.perform(multipart("/api/analyses").file(new MockMultipartFile("file", "few.parquet",
                "application/octet-stream", small))).andExpect(status().isCreated())
                .andExpect(jsonPath("$.analysis.rows").value(2_000));
        assertEquals(0, budget.held(), "the reservation was released");
    }

    private ResultActions upload(String name, String csv) throws Exception {
        return mvc.perform(multipart("/api/analyses").file(file(name, csv)));
    }

    private static MockMultipartFile file(String name, String csv) {
        return new MockMultipartFile("file", name, "text/csv", csv.getBytes(StandardCharsets.UTF_8));
    }

    private static Path temp() {
        try {
            return Files.createTempDirectory("forkscape-upload-memory-");
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
    }
}
