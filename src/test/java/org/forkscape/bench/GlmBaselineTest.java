package org.forkscape.bench;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;

import java.io.IOException;
import java.io.Reader;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import org.apache.commons.csv.CSVFormat;
import org.apache.commons.csv.CSVParser;
import org.apache.commons.csv.CSVRecord;
import org.forkscape.data.CsvTableReader;
import org.forkscape.data.Table;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * The benchmark's logit baseline against R's {@code glm} and {@code sandwich::vcovHC(type = "HC1")},
 * values written by {@code src/test/r/glm-baseline-reference.R} (R and sandwich versions in
 * {@code src/test/resources/reference/glm-baseline-versions.txt}), on data written by the benchmark's own generator.
 */
class GlmBaselineTest {
    private static final Path FOLDER = Path.of("src/test/resources/reference");
    private static final Path DATA = FOLDER.resolve("glm-baseline-data.csv");

    @TempDir
    Path work;

    @Test
    void committedDataIsWhatTheGeneratorWrites() throws IOException {
        Path fresh = work.resolve("fresh.csv");
        GlmBenchData.write(fresh, 400, 20261202L);
        assertArrayEquals(Files.readAllBytes(DATA), Files.readAllBytes(fresh));
    }

    @Test
    void everySubsetOfSixControlsMatchesRGlmWithSandwich() throws IOException {
        Table table = new CsvTableReader().read(DATA);
        GlmBaseline baseline = new GlmBaseline(table);
        List<CSVRecord> expected;
        try (Reader in = Files.newBufferedReader(FOLDER.resolve("glm-baseline-expected.csv"));
                CSVParser parser = CSVFormat.DEFAULT.builder().setHeader().setSkipHeaderRecord(true).get().parse(in)) {
            expected = parser.getRecords();
        }
        assertEquals(64, expected.size());
        for (CSVRecord r : expected) {
            GlmBaseline.Fit fit = baseline.fit(Long.parseLong(r.get("mask")));
            String where = "mask " + r.get("mask");
            // R glm + sandwich (glm-baseline-reference.R): both sides take the same IRLS steps from the same
            // start to the same criterion, so they differ by rounding only (measured: 3e-15); 1e-12 relative
            // leaves room for QR and summation order
            assertEquals(Integer.parseInt(r.get("iterations")), fit.iterations(), where);
            assertRelative(Double.parseDouble(r.get("estimate")), fit.estimate(), where);
            assertRelative(Double.parseDouble(r.get("std_error")), fit.stdError(), where);
        }
    }

    private static void assertRelative(double expected, double actual, String where) {
        assertEquals(expected, actual, 1e-12 * Math.abs(expected), where);
    }
}
