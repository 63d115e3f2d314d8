package org.forkscape.web.run;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.ByteArrayInputStream;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import java.util.Map;
import java.util.concurrent.CountDownLatch;
import java.util.concurrent.TimeUnit;
import org.forkscape.data.CsvLimits;
import org.forkscape.run.InferenceStage;
import org.forkscape.run.RunState;
import org.forkscape.run.StoredAnalysis;
import org.forkscape.run.StoredRun;
import org.forkscape.run.Workspace;
import org.forkscape.web.CivicTestData;
import org.forkscape.web.analysis.AnalysisService;
import org.forkscape.web.plan.PlanService;
import org.forkscape.web.system.ForkscapeSettings;
import org.forkscape.web.system.ServerLimits;
import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.BeforeEach;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** The queue's order and limits, and cancellation before and during a run. */
class RunQueueTest {
    @TempDir
    Path root;
    private Workspace workspace;
    private StoredAnalysis analysis;
    private final CountDownLatch release = new CountDownLatch(1);
    private final CountDownLatch inSections = new CountDownLatch(1);
    private RunQueue queue;
    private AnalysisService analyses;
    private PlanService plans;
    private ForkscapeSettings settings;

    @BeforeEach
    void setUp() {
        workspace = new Workspace(root);
        analyses = new AnalysisService(workspace, CsvLimits.DEFAULT);
        analysis = analyses.create("t", "t.csv", new ByteArrayInputStream(CivicTestData.csv(120, 4)
                .getBytes(StandardCharsets.UTF_8)), false);
        ForkscapeSettings.Runs runs = new ForkscapeSettings.Runs(1, 1, 2, 1_000_000, 10_000, null);
        plans = new PlanService(workspace, analyses, ServerLimits.of(runs));
        // the first run's summary sections wait for the test, so the test decides when it ends
        SummarySections gated = (run, progress, cancel) -> {
            inSections.countDown();
            try {
                release.await(30, TimeUnit.SECONDS);
            } catch (InterruptedException e) {
                Thread.currentThread().interrupt();
            }
            return sections(Map.of());
        };
        settings = new ForkscapeSettings(root, null, null, runs, null);
        queue = new RunQueue(workspace, analyses, plans, gated, event -> { }, settings);
    }

    @AfterEach
    void tearDown() {
        release.countDown();
        queue.stop();
    }

    @Test
    void runsWaitInOrderAndCancellingStopsThemWithoutResults() throws Exception {
        StoredRun first = queue.submit(analysis, CivicTestData.plan());
        assertTrue(inSections.await(30, TimeUnit.SECONDS));
        // past the fit, the status names the phase under way, with its own (here empty) count
        RunStatus inferring = queue.status(analysis.id(), first.id()).orElseThrow();
        assertEquals(RunStatus.INFERENCE, inferring.phase());
        assertEquals(inferring.total(), inferring.done());
        assertEquals(0, inferring.phaseTotal());
        StoredRun second = queue.submit(analysis, CivicTestData.plan());
        RunStatus waiting = queue.status(analysis.id(), second.id()).orElseThrow();
        assertEquals("queued", waiting.state());
        assertEquals(1, waiting.queuePosition());
        // the queue holds one: a third run is refused with the reason
        RunQueueFullException full = assertThrows(RunQueueFullException.class,
                () -> queue.submit(analysis, CivicTestData.plan()));
        assertTrue(full.getMessage().contains("forkscape.runs.queue"), full.getMessage());

        assertEquals("cancelled", queue.cancel(analysis.id(), second.id()).orElseThrow().state());
        queue.cancel(analysis.id(), first.id());
        release.countDown();
        assertEquals(RunState.CANCELLED, waitForEnd(first).state());
        assertEquals(RunState.CANCELLED, waitForEnd(second).state());
        for (StoredRun r : new StoredRun[] {first, second}) {
            Path folder = workspace.runFolder(analysis.id(), r.id());
            assertFalse(Files.exists(folder.resolve("specifications.csv")));
            assertFalse(Files.exists(folder.resolve("summary.json")));
            assertEquals("cancelled\n", Files.readString(folder.resolve("status")));
        }
        assertTrue(Files.readString(workspace.runFolder(analysis.id(), second.id()).resolve("run.log"))
                .contains("cancelled before it started"));
        assertTrue(workspace.run(analysis.id(), second.id()).orElseThrow().started() == null);
    }

    @Test
    void aRunThatIsNotCancelledFinishesWithItsFiles() throws Exception {
        release.countDown();
        StoredRun run = queue.submit(analysis, CivicTestData.plan());
        assertEquals(RunState.FINISHED, waitForEnd(run).state());
        Path folder = workspace.runFolder(analysis.id(), run.id());
        assertTrue(Files.exists(folder.resolve("specifications.csv")));
        assertTrue(Files.exists(folder.resolve("summary.json")));
        assertEquals(576, queue.status(analysis.id(), run.id()).orElseThrow().done());
    }

    /**
     * A cancel that arrives after the inference stage has computed (here the stage sets the flag itself,
     * as a cancel in that moment would): the stage's files are written by the pipeline after the run's
     * own, so none of them is left in the cancelled run's folder.
     */
    @Test
    void aCancelAfterTheInferenceStageLeavesNoFiles() throws Exception {
        RunQueue late = new RunQueue(workspace, analyses, plans, (run, progress, cancel) -> {
            cancel.set(true);
            return new InferenceStage.Outcome() {
                @Override
                public Map<String, Object> sections() {
                    return Map.of();
                }

                @Override
                public void writeFiles(Path folder) {
                    try {
                        Files.writeString(folder.resolve("null-draws.csv"), "draw\n");
                    } catch (java.io.IOException e) {
                        throw new java.io.UncheckedIOException(e);
                    }
                }

                @Override
                public List<String> warnings() {
                    return List.of();
                }
            };
        }, event -> { }, settings);
        try {
            StoredRun run = late.submit(analysis, CivicTestData.plan());
            StoredRun ended = null;
            for (int i = 0; i < 600 && (ended == null || !ended.state().ended()); i++) {
                Thread.sleep(50);
                ended = workspace.run(analysis.id(), run.id()).orElseThrow();
            }
            assertEquals(RunState.CANCELLED, ended.state());
            Path folder = workspace.runFolder(analysis.id(), run.id());
            assertFalse(Files.exists(folder.resolve("null-draws.csv")));
            assertFalse(Files.exists(folder.resolve("specifications.csv")));
        } finally {
            late.stop();
        }
    }

    /** An inference stage's outcome with these sections, no files and no warnings. */
    static InferenceStage.Outcome sections(Map<String, Object> sections) {
        return new InferenceStage.Outcome() {
            @Override
            public Map<String, Object> sections() {
                return sections;
            }

            @Override
            public void writeFiles(Path folder) {
            }

            @Override
            public List<String> warnings() {
                return List.of();
            }
        };
    }

    private StoredRun waitForEnd(StoredRun run) throws InterruptedException {
        for (int i = 0; i < 600; i++) {
            StoredRun r = workspace.run(analysis.id(), run.id()).orElseThrow();
            if (r.state().ended() && queue.status(analysis.id(), run.id()).orElseThrow().state().equals(r.state().word())) {
                return r;
            }
            Thread.sleep(50);
        }
        throw new AssertionError("run did not end");
    }
}
