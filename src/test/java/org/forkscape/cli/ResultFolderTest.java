package org.forkscape.cli;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.junit.jupiter.api.Assumptions.assumeFalse;

import java.io.BufferedReader;
import java.io.IOException;
import java.io.InputStreamReader;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import java.util.SplittableRandom;
import java.util.TreeMap;
import java.util.stream.Stream;
import org.junit.jupiter.api.BeforeEach;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * The batch command's output folder as a whole: a stopped run leaves the earlier result set or the new
 * one and no staged or temporary file, two runs cannot write into one folder, and an unusable folder is
 * refused before any work. The stop is a real SIGTERM to a child process.
 */
class ResultFolderTest {
    @TempDir
    Path dir;
    Path plan;
    Path out;

    /** Reading scores against tutoring hours in invented school districts, with two optional controls. */
    @BeforeEach
    void writeDataAndPlan() throws IOException {
        SplittableRandom random = new SplittableRandom(8);
        StringBuilder csv = new StringBuilder("score,tutoring,class_size,attendance\n");
        for (int i = 0; i < 80; i++) {
            double tutoring = random.nextGaussian();
            csv.append(50 + 2 * tutoring + random.nextGaussian()).append(',').append(tutoring).append(',')
                    .append(random.nextGaussian()).append(',').append(random.nextGaussian()).append('\n');
        }
        Files.writeString(dir.resolve("districts.csv"), csv);
        plan = dir.resolve("plan.json");
        Files.writeString(plan, "{\"data\": \"districts.csv\", \"decisions\": ["
                + "{\"name\": \"y\", \"kind\": \"outcome\", \"alternatives\": [{\"label\": \"score\", \"column\": \"score\"}]},"
                + "{\"name\": \"x\", \"kind\": \"predictor\", \"alternatives\": [{\"label\": \"tutoring\", "
                + "\"column\": \"tutoring\"}]},"
                + "{\"name\": \"c\", \"kind\": \"controls\", \"optional\": [\"class_size\", \"attendance\"]},"
                + "{\"name\": \"se\", \"kind\": \"errors\", \"alternatives\": [\"classical\", \"HC1\"]}]}");
        out = dir.resolve("results");
    }

    @Test
    void aStopBeforeTheSwapLeavesTheEarlierResultWholeAndNothingStaged() throws Exception {
        assertEquals(0, CommandLineTest.run("run", plan.toString(), "--out", out.toString(), "--null-draws", "9").code());
        Files.writeString(out.resolve("notes.txt"), "kept\n");
        Map<String, String> before = contents(out);
        Process child = pausedRun();
        child.destroy();
        child.waitFor();
        assertEquals(before, contents(out), "the earlier result set, whole");
        assertEquals(List.of("districts.csv", "plan.json", "results"), entries(dir), "nothing staged beside it");
    }

    @Test
    void aSecondRunIntoAFolderInUseIsRefusedWithOneLine() throws Exception {
        Process first = pausedRun();
        try {
            CommandLineTest.Outcome second = CommandLineTest.run("run", plan.toString(), "--out", out.toString());
            CommandLineTest.refused(second, "--out " + out + ": another Forkscape run is writing into this folder");
        } finally {
            first.destroy();
            first.waitFor();
        }
        assertFalse(Files.exists(out), "the stopped first run wrote nothing");
        assertEquals(List.of("districts.csv", "plan.json"), entries(dir));
        assertEquals(0, CommandLineTest.run("run", plan.toString(), "--out", out.toString()).code(),
                "the lock ends with the process that held it");
    }

    @Test
    void aRerunReplacesTheSetKeepsTheUsersEntriesAndLeavesNothingBeside() throws Exception {
        assertEquals(0, CommandLineTest.run("run", plan.toString(), "--out", out.toString(), "--null-draws", "9").code());
        Files.createDirectories(out.resolve("drafts"));
        Files.writeString(out.resolve("drafts").resolve("summary.json"), "a draft\n");
        assertEquals(0, CommandLineTest.run("run", plan.toString(), "--out", out.toString()).code());
        assertEquals(List.of("drafts", "overfitting.csv", "plan.json", "specifications.csv", "summary.json"),
                entries(out));
        assertEquals("a draft\n", Files.readString(out.resolve("drafts").resolve("summary.json")));
        assertEquals(List.of("districts.csv", "plan.json", "results"), entries(dir));
    }

    @Test
    void aFolderUnderProcIsRefusedBeforeAnyWork() {
        CommandLineTest.refused(CommandLineTest.run("run", dir.resolve("missing.json").toString(), "--out",
                "/proc/forkscape-results"), "--out /proc/forkscape-results is under /proc");
    }

    @Test
    void aFolderThatCannotBeWrittenIsRefusedBeforeAnyWork() throws IOException {
        assumeFalse("root".equals(System.getProperty("user.name")), "the superuser can write anywhere");
        Path locked = Files.createDirectories(dir.resolve("locked"));
        assertTrue(locked.toFile().setWritable(false, false));
        CommandLineTest.refused(CommandLineTest.run("run", dir.resolve("missing.json").toString(), "--out",
                locked.resolve("results").toString()), "is not writable here");
    }

    /** A child JVM running the batch command into {@link #out}, paused with every file staged. */
    private Process pausedRun() throws IOException {
        List<String> command = new ArrayList<>(List.of(Path.of(System.getProperty("java.home"), "bin", "java")
                .toString(), "-cp", System.getProperty("java.class.path"), "-D" + RunCommand.PAUSE_BEFORE_SWAP
                + "=600000", "org.forkscape.ForkscapeApplication", "run", plan.toString(), "--out", out.toString()));
        Process child = new ProcessBuilder(command).redirectErrorStream(true).start();
        BufferedReader lines = new BufferedReader(new InputStreamReader(child.getInputStream(), StandardCharsets.UTF_8));
        List<String> seen = new ArrayList<>();
        for (String line = lines.readLine(); line != null; line = lines.readLine()) {
            if (line.equals("forkscape: staged, pausing before the swap")) {
                return child;
            }
            seen.add(line);
        }
        throw new AssertionError("the run ended before staging its files: " + seen);
    }

    private static Map<String, String> contents(Path folder) throws IOException {
        Map<String, String> m = new TreeMap<>();
        for (String name : entries(folder)) {
            m.put(name, Files.readString(folder.resolve(name)));
        }
        return m;
    }

    private static List<String> entries(Path folder) throws IOException {
        try (Stream<Path> s = Files.list(folder)) {
            return s.map(p -> p.getFileName().toString()).sorted().toList();
        }
    }
}
