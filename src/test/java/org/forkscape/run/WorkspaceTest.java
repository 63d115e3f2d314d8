package org.forkscape.run;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Instant;
import java.util.List;
import java.util.Set;
import java.util.stream.Collectors;
import java.util.stream.Stream;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

class WorkspaceTest {
    @TempDir
    Path root;

    @Test
    void analysesAndRunsReadBackAfterTheWorkspaceIsOpenedAgain() throws Exception {
        Workspace w = new Workspace(root);
        Path upload = w.newIncomingFile();
        Files.writeString(upload, "a,b\n1,2\n");
        StoredAnalysis a = w.createAnalysis("Turnout study", "survey <2024>.csv", 1, 2, upload, false);
        assertTrue(Workspace.isId(a.id()), a.id());
        assertFalse(Files.exists(upload), "the upload is moved into the analysis");
        assertEquals("a,b\n1,2\n", Files.readString(w.dataFile(a.id())));
        w.savePlan(a.id(), "{\"data\": \"data.csv\"}");
        StoredRun run = w.createRun(a.id(), "{\"data\": \"data.csv\", \"decisions\": []}");
        StoredRun finished = run.starting(Instant.now(), 12).ending(RunState.FINISHED, Instant.now(), "", "");
        w.update(finished);
        w.log(finished, "finished");

        Workspace again = new Workspace(root);
        assertEquals(List.of(a), again.analyses());
        assertEquals("{\"data\": \"data.csv\"}", again.plan(a.id()).orElseThrow());
        StoredRun read = again.run(a.id(), run.id()).orElseThrow();
        assertEquals(RunState.FINISHED, read.state());
        assertEquals(12, read.specifications());
        assertEquals("finished\n", Files.readString(again.runFolder(a.id(), run.id()).resolve(Workspace.STATUS)));
        List<String> log = Files.readAllLines(again.runFolder(a.id(), run.id()).resolve(Workspace.LOG));
        assertEquals(2, log.size());
        assertTrue(log.get(0).endsWith(" queued") && log.get(1).endsWith(" finished"), log.toString());
        // atomic writes leave no temporary files behind
        try (Stream<Path> files = Files.list(again.runFolder(a.id(), run.id()))) {
            assertEquals(Set.of("plan.json", "run.json", "status", "run.log"),
                    files.map(p -> p.getFileName().toString()).collect(Collectors.toSet()));
        }
    }

    @Test
    void aComparisonIsKeptWholeUnderAnIdAndOneLeftHalfMadeIsGoneAtTheNextStart() throws Exception {
        Workspace w = new Workspace(root);
        Path upload = w.newIncomingFile();
        Files.writeString(upload, "a,b\n1,2\n");
        StoredAnalysis a = w.createAnalysis("Turnout study", "survey.csv", 1, 2, upload, false);
        Path staged = w.stageComparison(a.id());
        Files.writeString(staged.resolve("compare.json"), "{}");
        String id = w.keepComparison(a.id(), staged);
        assertTrue(Workspace.isId(id), id);
        assertEquals("{}", Files.readString(w.comparisonFolder(a.id(), id).orElseThrow().resolve("compare.json")));
        assertFalse(Files.exists(staged));
        assertTrue(w.comparisonFolder(a.id(), "../../x").isEmpty(), "an id of another shape finds nothing");

        Path halfMade = w.stageComparison(a.id());
        Files.writeString(halfMade.resolve("compare.csv"), "spec\n");
        new Workspace(root);
        assertFalse(Files.exists(halfMade), "a staged comparison is removed when the next server starts");
        assertTrue(Files.exists(w.comparisonFolder(a.id(), id).orElseThrow()), "a kept one stays");
    }

    @Test
    void runsLeftQueuedOrRunningAreMarkedInterruptedWhenTheNextServerStarts() throws Exception {
        Workspace w = new Workspace(root);
        Path upload = w.newIncomingFile();
        Files.writeString(upload, "a\n1\n");
        StoredAnalysis a = w.createAnalysis("t", "t.csv", 1, 1, upload, false);
        StoredRun queued = w.createRun(a.id(), "{}");
        StoredRun running = w.createRun(a.id(), "{}");
        w.update(running.starting(Instant.now(), 5));
        StoredRun done = w.createRun(a.id(), "{}");
        w.update(done.ending(RunState.FINISHED, Instant.now(), "", ""));

        assertEquals(2, new Workspace(root).markInterrupted());
        Workspace after = new Workspace(root);
        assertEquals(RunState.INTERRUPTED, after.run(a.id(), queued.id()).orElseThrow().state());
        assertEquals(RunState.INTERRUPTED, after.run(a.id(), running.id()).orElseThrow().state());
        assertEquals(RunState.FINISHED, after.run(a.id(), done.id()).orElseThrow().state());
        assertEquals(0, after.markInterrupted());
    }

    @Test
    void identifiersThatAreNotGeneratedNeverBecomePaths() {
        Workspace w = new Workspace(root);
        for (String bad : List.of("..", "../..", "../analyses", "/etc/passwd", "%2e%2e%2f", "..%2F..", "a/b", "",
                "20250101-000000-ABCDEF", "20250101-000000-abcdef/..", "20250101-000000-abcde", "C:\\x",
                "20250101-000000-abcdef\u0000")) {
            assertFalse(Workspace.isId(bad), bad);
            assertTrue(w.analysis(bad).isEmpty(), bad);
            assertTrue(w.run("20250101-000000-abcdef", bad).isEmpty(), bad);
            assertThrows(IllegalArgumentException.class, () -> w.analysisFolder(bad), bad);
        }
        assertTrue(w.analysis(null).isEmpty());
        assertTrue(Workspace.isId("20250101-000000-abc123"));
    }

    @Test
    void whatAnInterruptedUploadLeftIsClearedAtOpening() throws Exception {
        Workspace w = new Workspace(root);
        Path upload = w.newIncomingFile();
        Files.writeString(upload, "half");
        Path staging = root.resolve("analyses").resolve(".halfway");
        Files.createDirectories(staging);
        Files.writeString(staging.resolve("data.csv"), "half");
        new Workspace(root);
        assertFalse(Files.exists(upload));
        assertFalse(Files.exists(staging));
        assertTrue(new Workspace(root).analyses().isEmpty());
    }
}
