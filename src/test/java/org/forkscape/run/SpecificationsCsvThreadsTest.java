package org.forkscape.run;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;

import java.io.ByteArrayOutputStream;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import org.forkscape.data.CsvTableReader;
import org.forkscape.plan.Plan;
import org.forkscape.plan.PlanReader;
import org.forkscape.web.CivicTestData;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * specifications.csv written from several threads, a block of rows per task, is the file one thread
 * writes, byte for byte, and its progress counts the rows written up to all of them.
 */
class SpecificationsCsvThreadsTest {
    @TempDir
    Path folder;

    @Test
    void theBytesDoNotDependOnTheThreadsAndProgressReachesEveryRow() throws Exception {
        Files.writeString(folder.resolve("data.csv"), CivicTestData.csv(200, 3));
        // six error types: 9,216 specifications, three blocks of rows
        String json = CivicTestData.plan(6).replace("[\"classical\", \"HC1\", \"cluster:district\"]",
                "[\"classical\", \"HC0\", \"HC1\", \"HC2\", \"HC3\", \"cluster:district\"]");
        Plan plan = new PlanReader(true).read(json, folder);
        RunResult run = new MultiverseRunner(2).run(plan, new CsvTableReader().read(plan.dataFile()),
                RunProgress.SILENT, null);
        assertEquals(9_216, run.results().size());

        ByteArrayOutputStream one = new ByteArrayOutputStream();
        SpecificationsCsv.write(run, one);
        for (int threads : new int[] {2, 3}) {
            Path file = folder.resolve("specifications-" + threads + ".csv");
            List<Long> reported = new ArrayList<>();
            SpecificationsCsv.write(run, file, threads, (done, total) -> {
                assertEquals(9_216, total);
                reported.add(done);
            });
            assertArrayEquals(one.toByteArray(), Files.readAllBytes(file), threads + " threads");
            assertEquals(List.of(4_096L, 8_192L, 9_216L), reported);
        }
        assertEquals(9_217, one.toString(java.nio.charset.StandardCharsets.UTF_8).split("\n").length);
    }
}
