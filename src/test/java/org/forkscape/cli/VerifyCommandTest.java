package org.forkscape.cli;

import static org.forkscape.cli.CommandLineTest.run;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.security.MessageDigest;
import java.security.NoSuchAlgorithmException;
import java.util.ArrayList;
import java.util.HexFormat;
import java.util.List;
import java.util.SplittableRandom;
import java.util.stream.Stream;
import org.forkscape.cli.CommandLineTest.Outcome;
import org.junit.jupiter.api.BeforeEach;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** {@code verify RUN_DIR} on folders the batch command wrote, intact and altered, called in-process. */
class VerifyCommandTest {
    private static final String NL = System.lineSeparator();
    @TempDir
    Path dir;
    Path plan;
    Path data;

    /** A seeded invented scenario: turnout in 80 wards against the distance to the polling station. */
    @BeforeEach
    void writeDataAndPlan() throws IOException {
        SplittableRandom random = new SplittableRandom(17);
        StringBuilder csv = new StringBuilder("turnout,distance,age,density,district\n");
        for (int i = 0; i < 80; i++) {
            double distance = random.nextDouble(0.2, 6);
            double age = random.nextGaussian() + 0.2 * distance;
            double density = random.nextGaussian();
            double turnout = 60 - 2 * distance + age + 0.5 * density + 3 * random.nextGaussian();
            csv.append(turnout).append(',').append(distance).append(',').append(age).append(',').append(density)
                    .append(',').append("d").append(i % 5).append('\n');
        }
        data = dir.resolve("wards.csv");
        Files.writeString(data, csv);
        plan = dir.resolve("plan.json");
        Files.writeString(plan, "{\"data\": \"wards.csv\", \"decisions\": ["
                + "{\"name\": \"outcome\", \"kind\": \"outcome\", \"alternatives\": [{\"label\": \"turnout\", \"column\": \"turnout\"}]},"
                + "{\"name\": \"key\", \"kind\": \"predictor\", \"alternatives\": [{\"label\": \"distance\", \"column\": \"distance\"}]},"
                + "{\"name\": \"controls\", \"kind\": \"controls\", \"optional\": [\"age\", \"density\"]},"
                + "{\"name\": \"errors\", \"kind\": \"errors\", \"alternatives\": [\"classical\", \"HC1\"]}]}");
    }

    private Path runInto(String name, String... options) {
        Path out = dir.resolve(name);
        List<String> args = new ArrayList<>(List.of("run", plan.toString(), "--out", out.toString()));
        args.addAll(List.of(options));
        Outcome o = run(args.toArray(String[]::new));
        assertEquals(0, o.code(), o.err());
        return out;
    }

    @Test
    void aFreshRunIsVerifiedIdentical() {
        Path out = runInto("results", "--threads", "1");
        Outcome o = run("verify", out.toString());
        assertEquals(0, o.code(), o.err());
        assertEquals("verified: 8 specifications identical" + NL, o.out());
        assertEquals("", o.err());
    }

    @Test
    void aSampledRunWithNullDrawsIsVerifiedIdentical() {
        Path out = runInto("sampled", "--sample", "5", "--seed", "23", "--threads", "2", "--null-draws", "19");
        assertTrue(Files.exists(out.resolve("null-draws.csv")));
        Outcome o = run("verify", out.toString());
        assertEquals(0, o.code(), o.err());
        assertEquals("verified: 5 specifications identical" + NL, o.out());
    }

    @Test
    void aDataFileInTheRunFolderIsFoundFirst() throws IOException {
        Path out = runInto("results");
        Files.copy(data, out.resolve("wards.csv"));
        Files.delete(data);
        Outcome o = run("verify", out.toString());
        assertEquals(0, o.code(), o.err());
    }

    @Test
    void oneAlteredDigitInSpecificationsCsvIsNamedWithItsRowAndColumn() throws IOException {
        Path copy = copyOf(runInto("results"), "copy");
        Path csv = copy.resolve("specifications.csv");
        List<String> lines = new ArrayList<>(Files.readAllLines(csv, StandardCharsets.UTF_8));
        List<String> cells = RecordedResults.cells(lines.get(3));
        String estimate = cells.get(5);
        char last = estimate.charAt(estimate.length() - 1);
        String altered = estimate.substring(0, estimate.length() - 1) + (last == '9' ? '8' : (char) (last + 1));
        lines.set(3, lines.get(3).replace("," + estimate + ",", "," + altered + ","));
        Files.write(csv, lines, StandardCharsets.UTF_8);
        Outcome o = run("verify", copy.toString());
        assertEquals(3, o.code(), o.err());
        assertEquals("forkscape: specifications.csv line 4 (specification 3), estimate: recorded " + altered
                + ", recomputed " + estimate, o.line());
        assertEquals("", o.out());
    }

    @Test
    void anAlteredNumberInSummaryJsonIsNamedByItsKey() throws IOException {
        Path out = runInto("results");
        Path summary = out.resolve("summary.json");
        String text = Files.readString(summary);
        assertTrue(text.contains("\"data_rows\" : 80,"), text);
        Files.writeString(summary, text.replace("\"data_rows\" : 80,", "\"data_rows\" : 81,"));
        Outcome o = run("verify", out.toString());
        assertEquals(3, o.code(), o.err());
        assertEquals("forkscape: summary.json data_rows: recorded 81, recomputed 80", o.line());
    }

    @Test
    void changedDataAreRefusedWithBothHashes() throws IOException, NoSuchAlgorithmException {
        Path out = runInto("results");
        String before = sha256(data);
        Files.writeString(data, Files.readString(data).replaceFirst("\n.", "\n9"));
        Outcome o = run("verify", out.toString());
        // java.security.MessageDigest's SHA-256, outside the project
        CommandLineTest.refused(o, data + ": the data file's SHA-256 is " + sha256(data) + ", the run recorded "
                + before);
    }

    @Test
    void aFolderWithoutSummaryJsonOrWithAnOptionIsRefused() throws IOException {
        Path copy = copyOf(runInto("results"), "copy");
        Files.delete(copy.resolve("summary.json"));
        CommandLineTest.refused(run("verify", copy.toString()), copy + ": has no summary.json");
        CommandLineTest.refused(run("verify", dir.resolve("absent").toString()), "is not a folder");
        CommandLineTest.refused(run("verify"), "verify needs a run folder");
        CommandLineTest.refused(run("verify", copy.toString(), "--threads", "2"), "verify takes no options; found "
                + "--threads; usage: verify RUN_DIR");
    }

    private Path copyOf(Path folder, String name) throws IOException {
        Path copy = Files.createDirectory(dir.resolve(name));
        try (Stream<Path> files = Files.list(folder)) {
            for (Path f : files.toList()) {
                Files.copy(f, copy.resolve(f.getFileName()));
            }
        }
        return copy;
    }

    private static String sha256(Path file) throws IOException, NoSuchAlgorithmException {
        return HexFormat.of().formatHex(MessageDigest.getInstance("SHA-256").digest(Files.readAllBytes(file)));
    }
}
