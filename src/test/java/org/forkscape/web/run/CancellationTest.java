package org.forkscape.web.run;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.ByteArrayInputStream;
import java.lang.management.ManagementFactory;
import java.lang.management.MemoryMXBean;
import java.lang.ref.WeakReference;
import java.nio.charset.StandardCharsets;
import java.nio.file.Path;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.SplittableRandom;
import java.util.concurrent.CountDownLatch;
import java.util.concurrent.TimeUnit;
import org.forkscape.data.CsvLimits;
import org.forkscape.run.RunResult;
import org.forkscape.run.RunState;
import org.forkscape.run.StoredAnalysis;
import org.forkscape.run.StoredRun;
import org.forkscape.run.Workspace;
import org.forkscape.web.analysis.AnalysisService;
import org.forkscape.web.plan.PlanService;
import org.forkscape.web.system.ForkscapeSettings;
import org.forkscape.web.system.ServerLimits;
import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * Cancelling a run gives back what it held: its fitting and null-draw threads have ended by the time it is
 * recorded as cancelled (only the queue's own idle thread is left), the heap it filled is free again, and
 * its result objects become unreachable.
 */
class CancellationTest {
    private static final int OPTIONAL = 17;

    @TempDir
    Path root;
    private RunQueue queue;

    @AfterEach
    void stop() {
        if (queue != null) {
            queue.stop();
        }
    }

    @Test
    void cancellingWhileFittingEndsTheWorkersAndFreesTheHeap() throws Exception {
        Workspace workspace = new Workspace(root);
        AnalysisService analyses = new AnalysisService(workspace, CsvLimits.DEFAULT);
        StoredAnalysis analysis = analyses.create("streams", "streams.csv",
                new ByteArrayInputStream(csv(400).getBytes(StandardCharsets.UTF_8)), false);
        analyses.table(analysis);
        queue = queue(workspace, analyses, (run, progress, cancel) -> RunQueueTest.sections(Map.of()));
        MemoryMXBean memory = ManagementFactory.getMemoryMXBean();
        long before = liveHeap(memory);

        // 2 x 2 x 2^17 = 524,288 specifications: a result table of about 29 MB from the start
        StoredRun run = queue.submit(analysis, plan(OPTIONAL));
        long held = 0;
        for (int i = 0; i < 1200 && held == 0; i++) {
            RunStatus s = queue.status(analysis.id(), run.id()).orElseThrow();
            if (s.state().equals("running") && s.done() > 0) {
                held = liveHeap(memory) - before;
            } else {
                Thread.sleep(10);
            }
        }
        assertTrue(held > 20L << 20, "the running fit holds its result table: " + held + " bytes");
        assertEquals("running", queue.cancel(analysis.id(), run.id()).orElseThrow().state());
        assertEquals(RunState.CANCELLED, waitForEnd(workspace, analysis, run).state());

        assertOnlyTheIdleQueueThreadIsLeft();
        long after = liveHeap(memory) - before;
        assertTrue(after < held / 4, "the cancelled run still holds " + after + " of the " + held + " bytes");
    }

    @Test
    void aRunCancelledDuringItsInferenceStageLeavesItsResultsUnreachable() throws Exception {
        Workspace workspace = new Workspace(root);
        AnalysisService analyses = new AnalysisService(workspace, CsvLimits.DEFAULT);
        StoredAnalysis analysis = analyses.create("streams", "streams.csv",
                new ByteArrayInputStream(csv(200).getBytes(StandardCharsets.UTF_8)), false);
        CountDownLatch inSections = new CountDownLatch(1);
        CountDownLatch release = new CountDownLatch(1);
        WeakReference<?>[] refs = new WeakReference<?>[2];
        queue = queue(workspace, analyses, (result, progress, cancel) -> {
            refs[0] = new WeakReference<RunResult>(result);
            refs[1] = new WeakReference<Object>(result.results());
            inSections.countDown();
            try {
                release.await(30, TimeUnit.SECONDS);
            } catch (InterruptedException e) {
                Thread.currentThread().interrupt();
            }
            return RunQueueTest.sections(Map.of());
        });
        StoredRun run = queue.submit(analysis, plan(10));
        assertTrue(inSections.await(60, TimeUnit.SECONDS));
        queue.cancel(analysis.id(), run.id());
        release.countDown();
        assertEquals(RunState.CANCELLED, waitForEnd(workspace, analysis, run).state());
        assertOnlyTheIdleQueueThreadIsLeft();
        for (int i = 0; i < 50 && (refs[0].get() != null || refs[1].get() != null); i++) {
            System.gc();
            Thread.sleep(20);
        }
        assertNull(refs[0].get(), "the cancelled run's result is still reachable");
        assertNull(refs[1].get(), "the cancelled run's result table is still reachable");
    }

    private static RunQueue queue(Workspace workspace, AnalysisService analyses, SummarySections sections) {
        ForkscapeSettings.Runs runs = new ForkscapeSettings.Runs(1, 4, 2, 1_000_000, 10_000, null);
        PlanService plans = new PlanService(workspace, analyses, ServerLimits.of(runs));
        return new RunQueue(workspace, analyses, plans, sections, event -> { },
                new ForkscapeSettings(workspace.root(), null, null, runs, null));
    }

    /** The heap in use after a full collection. */
    private static long liveHeap(MemoryMXBean memory) {
        System.gc();
        return memory.getHeapMemoryUsage().getUsed();
    }

    /**
     * The runner's and the null draws' threads have ended; a thread of the queue may remain, waiting for
     * the next run (it is checked until its last bookkeeping after the run is done).
     */
    private static void assertOnlyTheIdleQueueThreadIsLeft() throws InterruptedException {
        List<Thread> busy = List.of();
        for (int i = 0; i < 100; i++) {
            busy = Thread.getAllStackTraces().keySet().stream().filter(t -> t.getName().startsWith("forkscape-"))
                    .filter(t -> !t.getName().equals("forkscape-run") || t.getState() == Thread.State.RUNNABLE)
                    .toList();
            if (busy.isEmpty()) {
                return;
            }
            Thread.sleep(20);
        }
        throw new AssertionError("threads left after the cancel: " + busy);
    }

    private StoredRun waitForEnd(Workspace workspace, StoredAnalysis analysis, StoredRun run) throws InterruptedException {
        for (int i = 0; i < 1200; i++) {
            StoredRun r = workspace.run(analysis.id(), run.id()).orElseThrow();
            if (r.state().ended()
                    && queue.status(analysis.id(), run.id()).orElseThrow().state().equals(r.state().word())) {
                return r;
            }
            Thread.sleep(25);
        }
        throw new AssertionError("the run did not end");
    }

    /** 2 outcomes x 2 codings of the key predictor x every subset of {@code controls} controls. */
    private static String plan(int controls) {
        StringBuilder optional = new StringBuilder();
        for (int j = 1; j <= controls; j++) {
            optional.append(j > 1 ? ", " : "").append(String.format(Locale.ROOT, "\"c%d\"", j));
        }
        return """
                {"data": "data.csv", "decisions": [
                  {"name": "outcome", "kind": "outcome", "alternatives": [
                    {"label": "nitrate", "column": "nitrate"}, {"label": "phosphate", "column": "phosphate"}]},
                  {"name": "buffer", "kind": "predictor", "alternatives": [
                    {"label": "metres", "column": "buffer_width"},
                    {"label": "log metres", "column": "buffer_width", "transform": "log"}]},
                  {"name": "controls", "kind": "controls", "optional": [%s]}
                ]}
                """.formatted(optional);
    }

    /**
     * Invented river-monitoring stations: nitrate and phosphate against the width of the planted buffer
     * along the bank, with 17 measured site conditions.
     */
    private static String csv(int rows) {
        SplittableRandom random = new SplittableRandom(rows);
        StringBuilder b = new StringBuilder("nitrate,phosphate,buffer_width");
        for (int j = 1; j <= OPTIONAL; j++) {
            b.append(",c").append(j);
        }
        b.append('\n');
        for (int i = 0; i < rows; i++) {
            double width = 2 + 40 * random.nextDouble();
            b.append(String.format(Locale.ROOT, "%.3f,%.3f,%.2f", 8 - 0.05 * width + random.nextGaussian(),
                    1 - 0.01 * width + 0.3 * random.nextGaussian(), width));
            for (int j = 1; j <= OPTIONAL; j++) {
                b.append(String.format(Locale.ROOT, ",%.4f", random.nextGaussian()));
            }
            b.append('\n');
        }
        return b.toString();
    }
}
