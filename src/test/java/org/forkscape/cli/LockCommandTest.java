package org.forkscape.cli;

import static org.forkscape.cli.CommandLineTest.run;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.security.MessageDigest;
import java.security.NoSuchAlgorithmException;
import java.time.Instant;
import java.util.HexFormat;
import java.util.SplittableRandom;
import org.forkscape.cli.CommandLineTest.Outcome;
import org.forkscape.run.Json;
import org.junit.jupiter.api.BeforeEach;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import tools.jackson.databind.JsonNode;

/**
 * {@code lock PLAN} and the runs of a locked plan, called in-process. The hashes are recomputed here with
 * java.security.MessageDigest (SHA-256 as FIPS 180-4 defines it), outside the code under test.
 */
class LockCommandTest {
    private static final String NL = System.lineSeparator();
    @TempDir
    Path dir;
    Path plan;
    Path data;

    /** A seeded invented scenario: library visits in 60 towns against opening hours. */
    @BeforeEach
    void writeDataAndPlan() throws IOException {
        SplittableRandom random = new SplittableRandom(5);
        StringBuilder csv = new StringBuilder("visits,hours,income\n");
        for (int i = 0; i < 60; i++) {
            double hours = random.nextDouble(20, 60);
            double income = random.nextGaussian();
            csv.append(100 + 2 * hours + 5 * income + 10 * random.nextGaussian()).append(',').append(hours)
                    .append(',').append(income).append('\n');
        }
        data = dir.resolve("towns.csv");
        Files.writeString(data, csv);
        plan = dir.resolve("study.plan.json");
        Files.writeString(plan, planText("HC1"));
    }

    private static String planText(String errors) {
        return "{\"data\": \"towns.csv\", \"decisions\": ["
                + "{\"name\": \"outcome\", \"kind\": \"outcome\", \"alternatives\": [{\"label\": \"visits\", \"column\": \"visits\"}]},"
                + "{\"name\": \"key\", \"kind\": \"predictor\", \"alternatives\": [{\"label\": \"hours\", \"column\": \"hours\"}]},"
                + "{\"name\": \"controls\", \"kind\": \"controls\", \"optional\": [\"income\"]},"
                + "{\"name\": \"errors\", \"kind\": \"errors\", \"alternatives\": [\"classical\", \"" + errors + "\"]}]}";
    }

    private static String sha256(byte[] bytes) throws NoSuchAlgorithmException {
        return HexFormat.of().formatHex(MessageDigest.getInstance("SHA-256").digest(bytes));
    }

    private Path lockFile() {
        return dir.resolve("study.plan.lock.json");
    }

    @Test
    void theLockHoldsBothHashesTheTimeAndAFingerprintOverThem() throws Exception {
        Instant before = Instant.now().minusSeconds(1);
        Outcome o = run("lock", plan.toString());
        assertEquals(0, o.code(), o.err());
        assertEquals("", o.err());
        assertTrue(Files.isRegularFile(lockFile()), "study.plan.json locks into study.plan.lock.json");
        JsonNode lock = Json.MAPPER.readTree(Files.readAllBytes(lockFile()));
        assertEquals(sha256(Files.readAllBytes(plan)), lock.path("plan_sha256").asString());
        assertEquals(sha256(Files.readAllBytes(data)), lock.path("data_sha256").asString());
        Instant locked = Instant.parse(lock.path("locked").asString());
        assertFalse(locked.isBefore(before) || locked.isAfter(Instant.now().plusSeconds(1)), locked.toString());
        String hex = sha256((lock.path("plan_sha256").asString() + "\n" + lock.path("data_sha256").asString() + "\n"
                + lock.path("locked").asString() + "\n").getBytes(StandardCharsets.UTF_8));
        String fingerprint = hex.substring(0, 4) + "-" + hex.substring(4, 8) + "-" + hex.substring(8, 12) + "-"
                + hex.substring(12, 16);
        assertEquals(fingerprint, lock.path("fingerprint").asString());
        assertTrue(o.out().contains("fingerprint " + fingerprint), o.out());
    }

    @Test
    void aPlanNamedPlanJsonLocksIntoPlanLockJson() throws IOException {
        Path other = dir.resolve("plan.json");
        Files.copy(plan, other);
        assertEquals(0, run("lock", other.toString()).code());
        assertTrue(Files.isRegularFile(dir.resolve("plan.lock.json")));
    }

    @Test
    void anExistingLockIsKeptUnlessReplacedAndBadInputGetsOneLineAndExitTwo() throws IOException {
        assertEquals(0, run("lock", plan.toString()).code());
        byte[] first = Files.readAllBytes(lockFile());
        Outcome again = run("lock", plan.toString());
        assertOneLine(again, "forkscape: " + lockFile() + " exists; the plan was locked before and nothing was written");
        assertTrue(again.err().contains("--replace yes"), again.err());
        assertEquals(new String(first, StandardCharsets.UTF_8), Files.readString(lockFile()));
        assertEquals(0, run("lock", plan.toString(), "--replace", "yes").code());

        assertOneLine(run("lock", dir.resolve("absent.json").toString()), "forkscape: no plan file at ");
        assertOneLine(run("lock"), "forkscape: lock needs a plan file");
        assertOneLine(run("lock", plan.toString(), "--replace", "maybe"), "forkscape: --replace must be yes or no");
        Files.delete(lockFile());
        Files.delete(data);
        assertOneLine(run("lock", plan.toString()), "forkscape: study.plan.json, data: no data file or folder at ");
        assertFalse(Files.exists(lockFile()));
    }

    @Test
    void aRunOfTheLockedPlanRecordsThatItMatchesAndAnEditedPlanIsWarnedAbout() throws IOException {
        assertEquals(0, run("lock", plan.toString()).code());
        JsonNode lock = Json.MAPPER.readTree(Files.readAllBytes(lockFile()));
        Outcome matching = run("run", plan.toString(), "--out", dir.resolve("a").toString(), "--threads", "1");
        assertEquals(0, matching.code(), matching.err());
        assertFalse(matching.err().contains("warning"), matching.err());
        JsonNode recorded = provenanceLock(dir.resolve("a"));
        assertEquals(lock.path("fingerprint").asString(), recorded.path("fingerprint").asString());
        assertEquals(lock.path("locked").asString(), recorded.path("locked").asString());
        assertTrue(recorded.path("plan_matches").asBoolean(false));
        assertTrue(recorded.path("data_matches").asBoolean(false));
        Outcome verified = run("verify", dir.resolve("a").toString());
        assertEquals(0, verified.code(), verified.err());

        Files.writeString(plan, planText("HC3"));
        Outcome edited = run("run", plan.toString(), "--out", dir.resolve("b").toString(), "--threads", "1");
        assertEquals(0, edited.code(), edited.err());
        assertTrue(edited.err().contains("forkscape: warning: the plan has changed since the plan was locked ("
                + lock.path("locked").asString() + ", fingerprint " + lock.path("fingerprint").asString() + ")"),
                edited.err());
        JsonNode changed = provenanceLock(dir.resolve("b"));
        assertFalse(changed.path("plan_matches").asBoolean(true));
        assertTrue(changed.path("data_matches").asBoolean(false));
    }

    @Test
    void aRunOfAnUnlockedPlanRecordsNoLockAndAnEditedLockFileIsRefused() throws IOException {
        assertEquals(0, run("run", plan.toString(), "--out", dir.resolve("a").toString()).code());
        assertTrue(Json.MAPPER.readTree(Files.readAllBytes(dir.resolve("a/summary.json"))).path("provenance")
                .path("lock").isMissingNode());
        assertEquals(0, run("lock", plan.toString()).code());
        Files.writeString(lockFile(), Files.readString(lockFile()).replace("\"locked\" : \"2", "\"locked\" : \"1"));
        assertOneLine(run("run", plan.toString(), "--out", dir.resolve("b").toString()),
                "forkscape: " + lockFile() + ", fingerprint: does not match the lock's other fields");
    }

    private static JsonNode provenanceLock(Path runFolder) throws IOException {
        return Json.MAPPER.readTree(Files.readAllBytes(runFolder.resolve("summary.json"))).path("provenance")
                .path("lock");
    }

    private static void assertOneLine(Outcome o, String start) {
        assertEquals(2, o.code(), o.err());
        assertEquals("", o.out());
        assertTrue(o.err().startsWith(start), o.err());
        assertTrue(o.err().endsWith(NL) && o.err().indexOf(NL) == o.err().length() - NL.length(), o.err());
    }
}
