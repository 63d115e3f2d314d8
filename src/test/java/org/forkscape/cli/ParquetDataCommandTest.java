package org.forkscape.cli;

import static org.forkscape.cli.CommandLineTest.refused;
import static org.forkscape.cli.CommandLineTest.run;
import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNotEquals;
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
import org.forkscape.cli.CommandLineTest.Outcome;
import org.forkscape.data.CsvTableReader;
import org.forkscape.data.DataFiles;
import org.forkscape.data.ParquetFiles;
import org.forkscape.data.Table;
import org.forkscape.bench.ParquetCopy;
import org.forkscape.run.Json;
import org.junit.jupiter.api.BeforeEach;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import tools.jackson.databind.JsonNode;

/**
 * The batch commands on Parquet data: the demo plan run on a Parquet copy of the demo data (one file, and a
 * folder of three part files) writes the very bytes of specifications.csv that the CSV run writes; the data
 * hash of a file is its bytes' SHA-256 and of a folder the SHA-256 of {@code sha256sum}'s listing of its
 * parts, both recomputed here with java.security.MessageDigest (FIPS 180-4) and, where coreutils are
 * installed, with {@code sha256sum} itself; lock and verify follow the folder; a corrupt file or an
 * unsupported column is one line, exit 2, nothing written.
 */
class ParquetDataCommandTest {
    private static final Path DEMO = Path.of("sample-data");
    @TempDir
    Path dir;
    Table demo;

    @BeforeEach
    void copyTheDemo() throws IOException {
        Files.copy(DEMO.resolve("civic-demo.csv"), dir.resolve("civic-demo.csv"));
        demo = new CsvTableReader().read(dir.resolve("civic-demo.csv"));
    }

    private Path plan(String name, String data) throws IOException {
        String text = Files.readString(DEMO.resolve("civic-demo.plan.json"), StandardCharsets.UTF_8)
                .replace("\"data\": \"civic-demo.csv\"", "\"data\": \"" + data + "\"");
        assertTrue(text.contains("\"data\": \"" + data + "\""), "the plan names " + data);
        return Files.writeString(dir.resolve(name), text);
    }

    /** The demo's rows cut into three parts, each a Parquet file of its own. */
    private Path folderCopy(String name) throws IOException {
        Path folder = Files.createDirectory(dir.resolve(name));
        Path whole = ParquetCopy.write(demo, dir.resolve("whole-for-parts.parquet"));
        Table all = DataFiles.read(whole);
        int[] cuts = {0, 700, 1900, all.rowCount()};
        for (int p = 0; p < 3; p++) {
            ParquetCopy.write(Rows.slice(all, cuts[p], cuts[p + 1]), folder.resolve("part-0000" + p + ".parquet"));
        }
        Files.delete(whole);
        return folder;
    }

    @Test
    void theDemoPlanOnAParquetCopyWritesTheCsvRunsSpecificationsByteForByte() throws Exception {
        Path csvPlan = plan("csv.plan.json", "civic-demo.csv");
        Path file = ParquetCopy.write(demo, dir.resolve("civic-demo.parquet"));
        Path parquetPlan = plan("parquet.plan.json", "civic-demo.parquet");
        Path folder = folderCopy("civic-demo-parts");
        Path folderPlan = plan("parts.plan.json", "civic-demo-parts");

        Outcome csv = run("run", csvPlan.toString(), "--out", dir.resolve("out-csv").toString());
        assertEquals(0, csv.code(), csv.err());
        Outcome parquet = run("run", parquetPlan.toString(), "--out", dir.resolve("out-parquet").toString());
        assertEquals(0, parquet.code(), parquet.err());
        Outcome parts = run("run", folderPlan.toString(), "--out", dir.resolve("out-parts").toString());
        assertEquals(0, parts.code(), parts.err());

        byte[] expected = Files.readAllBytes(dir.resolve("out-csv/specifications.csv"));
        assertTrue(expected.length > 100_000, "a real run: " + expected.length + " bytes");
        assertArrayEquals(expected, Files.readAllBytes(dir.resolve("out-parquet/specifications.csv")));
        assertArrayEquals(expected, Files.readAllBytes(dir.resolve("out-parts/specifications.csv")));

        // the route taken: each run recorded the hash of the data it was given, not of the CSV file
        assertEquals(sha256(Files.readAllBytes(dir.resolve("civic-demo.csv"))), dataHash("out-csv"));
        assertEquals(sha256(Files.readAllBytes(file)), dataHash("out-parquet"));
        assertEquals(folderHash(folder), dataHash("out-parts"));
        assertNotEquals(dataHash("out-parquet"), dataHash("out-parts"));
    }

    private String dataHash(String out) throws IOException {
        JsonNode summary = Json.MAPPER.readTree(Files.readAllBytes(dir.resolve(out).resolve("summary.json")));
        return summary.path("provenance").path("data_sha256").asString();
    }

    /** The folder's hash as README defines it, computed here part by part. */
    private static String folderHash(Path folder) throws Exception {
        List<Path> parts = new ArrayList<>();
        try (var listing = Files.list(folder)) {
            listing.filter(p -> p.getFileName().toString().endsWith(".parquet")).sorted().forEach(parts::add);
        }
        StringBuilder text = new StringBuilder();
        for (Path p : parts) {
            text.append(sha256(Files.readAllBytes(p))).append("  ").append(p.getFileName()).append('\n');
        }
        return sha256(text.toString().getBytes(StandardCharsets.UTF_8));
    }

    private static String sha256(byte[] bytes) throws NoSuchAlgorithmException {
        return HexFormat.of().formatHex(MessageDigest.getInstance("SHA-256").digest(bytes));
    }

    @Test
    void aFoldersHashIsWhatSha256sumGivesForItsPartsAndLockAndVerifyFollowIt() throws Exception {
        Path folder = folderCopy("parts");
        Files.writeString(folder.resolve("_SUCCESS"), "");
        Path planFile = plan("parts.plan.json", "parts");
        Outcome lock = run("lock", planFile.toString());
        assertEquals(0, lock.code(), lock.err());
        JsonNode locked = Json.MAPPER.readTree(Files.readAllBytes(dir.resolve("parts.plan.lock.json")));
        String hash = folderHash(folder);
        assertEquals(hash, locked.path("data_sha256").asString());
        Path sha256sum = Path.of("/usr/bin/sha256sum");
        if (Files.isExecutable(sha256sum)) {
            // source: GNU coreutils' sha256sum, outside the project, as README tells a user to check it
            Process p = new ProcessBuilder("sh", "-c", "LC_ALL=C ls *.parquet | xargs sha256sum | sha256sum")
                    .directory(folder.toFile()).redirectErrorStream(true).start();
            String printed = new String(p.getInputStream().readAllBytes(), StandardCharsets.UTF_8);
            assertEquals(0, p.waitFor(), printed);
            assertEquals(hash, printed.split(" ")[0]);
        }

        Path out = dir.resolve("out");
        Outcome ran = run("run", planFile.toString(), "--out", out.toString(), "--sample", "300");
        assertEquals(0, ran.code(), ran.err());
        JsonNode summary = Json.MAPPER.readTree(Files.readAllBytes(out.resolve("summary.json")));
        assertTrue(summary.path("provenance").path("lock").path("data_matches").asBoolean(false),
                summary.path("provenance").toString());
        Outcome verified = run("verify", out.toString());
        assertEquals(0, verified.code(), verified.err());
        assertTrue(verified.out().startsWith("verified: 300 specifications identical"), verified.out());

        // a changed part changes the folder's hash: verify refuses with both hashes
        Table last = DataFiles.read(folder.resolve("part-00002.parquet"));
        ParquetCopy.write(Rows.slice(last, 1, last.rowCount()), folder.resolve("part-00002.parquet"));
        Outcome changed = run("verify", out.toString());
        refused(changed, "the data changed since the run");
        assertTrue(changed.line().contains(hash), changed.err());
    }

    @Test
    void aCorruptFileOrAnUnsupportedColumnIsOneLineExitTwoAndNothingWritten() throws IOException {
        byte[] good = Files.readAllBytes(ParquetCopy.write(demo, dir.resolve("good.parquet")));
        Files.write(dir.resolve("cut.parquet"), java.util.Arrays.copyOf(good, good.length - 40));
        Path cutPlan = plan("cut.plan.json", "cut.parquet");
        for (String command : List.of("run", "estimate")) {
            List<String> args = new ArrayList<>(List.of(command, cutPlan.toString()));
            if (command.equals("run")) {
                args.addAll(List.of("--out", dir.resolve("out-cut").toString()));
            }
            Outcome o = run(args.toArray(String[]::new));
            refused(o, "cut.parquet: is not a Parquet file: it does not begin and end with PAR1");
            assertFalse(o.err().contains(dir.toString()), o.err());
        }
        assertFalse(Files.exists(dir.resolve("out-cut")), "nothing written");

        ParquetFiles.write(dir.resolve("dated.parquet"), "message m { optional double reading_score; "
                + "optional int32 visit (DATE); }", List.of(java.util.Arrays.asList(1.0, 19_000)));
        Outcome dated = run("run", plan("dated.plan.json", "dated.parquet").toString(), "--out",
                dir.resolve("out-dated").toString());
        refused(dated, "dated.parquet, column \"visit\": has the Parquet type INT32 (DATE), which Forkscape does not read");
        assertFalse(Files.exists(dir.resolve("out-dated")), "nothing written");
    }
}
