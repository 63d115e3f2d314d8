package org.forkscape.web.run;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.ByteArrayInputStream;
import java.io.IOException;
import java.io.UncheckedIOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import java.util.Map;
import java.util.concurrent.atomic.AtomicLong;
import org.forkscape.data.CsvLimits;
import org.forkscape.infer.InferenceSections;
import org.forkscape.plan.PlanReader;
import org.forkscape.run.InferenceStage;
import org.forkscape.run.RunOutputs;
import org.forkscape.run.RunState;
import org.forkscape.run.StoredAnalysis;
import org.forkscape.run.StoredRun;
import org.forkscape.run.Workspace;
import org.forkscape.run.WorkspaceWriteException;
import org.forkscape.web.CivicTestData;
import org.forkscape.web.analysis.AnalysisService;
import org.forkscape.web.plan.PlanService;
import org.forkscape.web.system.ForkscapeSettings;
import org.forkscape.web.system.ServerLimits;
import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.BeforeEach;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * A workspace whose disk is full: a run whose results would not fit is refused before it fits, and a run
 * whose results cannot be written says so in words, keeps none of them, and names no server path in its
 * record or its downloadable log. The free space is the workspace's probe, set by the test.
 */
class FullDiskRunTest {
    private static final String FULL = "the workspace's disk is full; this run's results were not kept; "
            + "earlier analyses and runs are intact";

    @TempDir
    Path root;
    private final AtomicLong free = new AtomicLong(Long.MAX_VALUE);
    private Workspace workspace;
    private StoredAnalysis analysis;
    private AnalysisService analyses;
    private PlanService plans;
    private ForkscapeSettings settings;
    private RunQueue queue;

    @BeforeEach
    void setUp() {
        workspace = new Workspace(root, folder -> free.get());
        analyses = new AnalysisService(workspace, CsvLimits.DEFAULT);
        analysis = analyses.create("t", "t.csv", new ByteArrayInputStream(CivicTestData.csv(120, 4)
                .getBytes(StandardCharsets.UTF_8)), false);
        ForkscapeSettings.Runs runs = new ForkscapeSettings.Runs(1, 1, 2, 1_000_000, 10_000, null);
        plans = new PlanService(workspace, analyses, ServerLimits.of(runs));
        settings = new ForkscapeSettings(root, null, null, runs, null);
    }

    @AfterEach
    void tearDown() {
        if (queue != null) {
            queue.stop();
        }
    }

    @Test
    void aRunWhoseResultsWouldNotFitIsRefusedBeforeItIsRecorded() {
        queue = new RunQueue(workspace, analyses, plans, (run, progress, cancel) -> RunQueueTest.sections(Map.of()),
                event -> { }, settings);
        free.set(Workspace.MIN_FREE + 100_000);
        WorkspaceWriteException e = assertThrows(WorkspaceWriteException.class,
                () -> queue.submit(analysis, CivicTestData.plan()));
        assertTrue(e.diskFull());
        assertTrue(e.getMessage().startsWith("the workspace's disk is full: this needs about "), e.getMessage());
        assertTrue(e.getMessage().endsWith("; this run was not started; earlier analyses and runs are intact"),
                e.getMessage());
        assertFalse(e.getMessage().contains(root.toString()));
        assertEquals(0, workspace.runs(analysis.id()).size(), "nothing recorded");
    }

    /** The case reported: overfitting.csv, the last file, fails with the operating system's words and its path. */
    @Test
    void aRunWhoseResultsCannotBeWrittenKeepsNoneAndNamesNoPath() throws Exception {
        queue = new RunQueue(workspace, analyses, plans, (run, progress, cancel) -> new InferenceStage.Outcome() {
            @Override
            public Map<String, Object> sections() {
                return Map.of();
            }

            @Override
            public void writeFiles(Path folder) {
                free.set(0);
                Path file = folder.toAbsolutePath().resolve("overfitting.csv");
                throw new UncheckedIOException("cannot write " + file + ": No space left on device",
                        new IOException("No space left on device"));
            }

            @Override
            public List<String> warnings() {
                return List.of();
            }
        }, event -> { }, settings);
        StoredRun run = queue.submit(analysis, CivicTestData.plan());
        StoredRun ended = waitForEnd(run);
        assertEquals(RunState.FAILED, ended.state());
        assertEquals(FULL, ended.problem());
        assertEquals(FULL, queue.status(analysis.id(), run.id()).orElseThrow().problem());
        Path folder = workspace.runFolder(analysis.id(), run.id());
        String log = Files.readString(folder.resolve(Workspace.LOG));
        assertTrue(log.contains("failed: " + FULL), log);
        for (String file : new String[] {Workspace.LOG, Workspace.RUN_RECORD}) {
            assertFalse(Files.readString(folder.resolve(file)).contains(root.toString()), file);
        }
        assertFalse(Files.exists(folder.resolve(RunOutputs.SPECIFICATIONS)));
        assertFalse(Files.exists(folder.resolve(RunOutputs.SUMMARY)));
        for (String name : InferenceSections.FILE_NAMES) {
            assertFalse(Files.exists(folder.resolve(name)), name);
        }
        assertTrue(Files.exists(folder.resolve(Workspace.PLAN)), "the run's plan is kept, to run it again");
    }

    /**
     * The expected size leans high but not absurdly: for a finished run with null draws, between the size of
     * its result files and four times it (the files are the reference, README "Results").
     */
    @Test
    void theExpectedSizeBoundsTheFilesARunWrites() throws Exception {
        queue = new RunQueue(workspace, analyses, plans, new InferenceSummary(settings), event -> { }, settings);
        String plan = CivicTestData.plan().replace("\"seed\": 7,", "\"seed\": 7, \"nullDraws\": 50,");
        StoredRun run = queue.submit(analysis, plan);
        assertEquals(RunState.FINISHED, waitForEnd(run).state());
        Path folder = workspace.runFolder(analysis.id(), run.id());
        long written = 0;
        for (String name : new String[] {RunOutputs.SPECIFICATIONS, RunOutputs.SUMMARY, "null-draws.csv",
                "overfitting.csv"}) {
            written += Files.size(folder.resolve(name));
        }
        long expected = ExpectedOutput.bytes(new PlanReader(true).read(plan, workspace.analysisFolder(analysis.id())),
                576);
        assertTrue(expected >= written, expected + " < " + written);
        // without the fixed megabyte for summary.json, the plan's copy and the run's record and log
        assertTrue(expected - (1L << 20) <= 4 * written, expected + " > 4 x " + written + " + 1 MiB");
    }

    private StoredRun waitForEnd(StoredRun run) throws InterruptedException {
        for (int i = 0; i < 600; i++) {
            StoredRun r = workspace.run(analysis.id(), run.id()).orElseThrow();
            if (r.state().ended() && queue.status(analysis.id(), run.id()).orElseThrow().state().equals(r.state().word())) {
                return r;
            }
            Thread.sleep(50);
        }
        throw new AssertionError("run " + run.id() + " did not end");
    }
}
