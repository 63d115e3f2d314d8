package org.forkscape.web.run;

import jakarta.annotation.PreDestroy;
import java.io.IOException;
import java.io.UncheckedIOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.time.Instant;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import java.util.Optional;
import java.util.concurrent.ConcurrentHashMap;
import java.util.concurrent.LinkedBlockingQueue;
import java.util.concurrent.ThreadPoolExecutor;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.atomic.AtomicBoolean;
import java.util.concurrent.atomic.AtomicLong;
import org.forkscape.InputException;
import org.forkscape.data.Table;
import org.forkscape.infer.InferenceSections;
import org.forkscape.plan.Plan;
import org.forkscape.plan.PlanReader;
import org.forkscape.plan.SpecificationSpace;
import org.forkscape.run.CompletedRun;
import org.forkscape.run.InferenceStage;
import org.forkscape.run.RunCancelledException;
import org.forkscape.run.MemoryEstimate;
import org.forkscape.run.RunOrigin;
import org.forkscape.run.RunOutputs;
import org.forkscape.run.RunPipeline;
import org.forkscape.run.RunProgress;
import org.forkscape.run.RunState;
import org.forkscape.run.RunSummary;
import org.forkscape.run.StoredAnalysis;
import org.forkscape.run.StageListener;
import org.forkscape.run.StoredRun;
import org.forkscape.run.Workspace;
import org.forkscape.run.WorkspaceWriteException;
import org.forkscape.web.analysis.AnalysisService;
import org.forkscape.web.plan.PlanService;
import org.forkscape.web.system.ForkscapeSettings;
import org.forkscape.web.system.MemoryBudget;
import org.forkscape.web.system.FormFields;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;
import org.springframework.context.ApplicationEventPublisher;
import org.springframework.stereotype.Service;

/**
 * Runs plans in the background: at most {@code forkscape.runs.concurrent} at once, up to
 * {@code forkscape.runs.queue} waiting in order, each through the same {@link RunPipeline} the batch
 * command uses, with the {@link SummarySections} as its inference stage. A plan beyond this server's
 * limits, memory included, is refused at {@link #submit} ({@code PlanService}), so the queue's pipeline
 * sets no memory limit of its own. Progress is counted as the pipeline reports it; cancelling sets the
 * run's cancel flag, which stops the fitting workers at the next chunk and frees their threads. A run's
 * files are written only when it finishes, so a failed or cancelled run leaves its plan, record and log and
 * nothing else.
 */
@Service
public class RunQueue {
    private static final Logger LOG = LoggerFactory.getLogger(RunQueue.class);

    private final Workspace workspace;
    private final AnalysisService analyses;
    private final PlanService plans;
    private final SummarySections sections;
    private final ApplicationEventPublisher events;
    private final int threads;
    private final RunPipeline pipeline;
    private final int capacity;
    private final ThreadPoolExecutor executor;
    private final Map<String, Job> active = new ConcurrentHashMap<>();
    private final List<String> waiting = new ArrayList<>();

    public RunQueue(Workspace workspace, AnalysisService analyses, PlanService plans, SummarySections sections,
            ApplicationEventPublisher events, ForkscapeSettings settings) {
        this.workspace = workspace;
        this.analyses = analyses;
        this.plans = plans;
        this.sections = sections;
        this.events = events;
        this.threads = settings.runs().fittingThreads();
        this.pipeline = new RunPipeline(threads).naming(FormFields.SETTINGS);
        this.capacity = Math.max(0, settings.runs().queue());
        int concurrent = Math.max(1, settings.runs().concurrent());
        this.executor = new ThreadPoolExecutor(concurrent, concurrent, 0, TimeUnit.MILLISECONDS,
                new LinkedBlockingQueue<>(), r -> {
                    Thread t = new Thread(r, "forkscape-run");
                    t.setDaemon(true);
                    return t;
                });
        int interrupted = workspace.markInterrupted();
        if (interrupted > 0) {
            LOG.info("{} run(s) were left unfinished by the last server and are marked interrupted", interrupted);
        }
    }

    /**
     * Checks the plan and queues a run of it.
     *
     * @throws InputException        when the plan cannot run on the analysis's data
     * @throws RunQueueFullException when as many runs wait as the queue holds
     * @throws WorkspaceWriteException when the workspace's disk has too little room for the run's results, or
     *                                 the run cannot be recorded
     */
    public synchronized StoredRun submit(StoredAnalysis analysis, String planText) {
        Plan plan = plans.read(analysis, planText);
        if (waiting.size() >= capacity && active.size() >= executor.getCorePoolSize()) {
            throw new RunQueueFullException(waiting.size() + " runs are already waiting, the most this server queues "
                    + "(forkscape.runs.queue); start this one when another has ended");
        }
        long all = new SpecificationSpace(plan).size();
        long total = plan.sampleSize() > 0 ? Math.min(plan.sampleSize(), all) : all;
        workspace.requireSpace(ExpectedOutput.bytes(plan, total), "this run was not started");
        StoredRun run = workspace.createRun(analysis.id(), planText);
        Job job = new Job(analysis, run, planText, total);
        active.put(run.id(), job);
        waiting.add(run.id());
        executor.execute(job);
        return run;
    }

    /** The run's state and, while it is active, its progress. */
    public Optional<RunStatus> status(String analysisId, String runId) {
        Job job = active.get(runId);
        if (job != null && job.record.analysisId().equals(analysisId)) {
            return Optional.of(job.status());
        }
        return workspace.run(analysisId, runId).map(r -> RunStatus.of(r, "", r.state() == RunState.FINISHED
                ? r.specifications() : 0, r.specifications(), 0, 0, 0, 0, seconds(r.started(), r.ended()), null, 0));
    }

    /** Asks a queued or running run to stop; an ended run is left as it is. */
    public Optional<RunStatus> cancel(String analysisId, String runId) {
        Job job = active.get(runId);
        if (job != null && job.record.analysisId().equals(analysisId)) {
            job.cancel();
        }
        return status(analysisId, runId);
    }

    private synchronized int position(String runId) {
        return waiting.indexOf(runId) + 1;
    }

    private synchronized void started(String runId) {
        waiting.remove(runId);
    }

    /** On shutdown, active runs stop and are recorded as interrupted, as after a crash. */
    @PreDestroy
    void stop() {
        for (Job job : active.values()) {
            job.interrupt();
        }
        executor.shutdownNow();
    }

    private static double seconds(Instant from, Instant to) {
        if (from == null) {
            return 0;
        }
        return Duration.between(from, to == null ? Instant.now() : to).toMillis() / 1000.0;
    }

    private final class Job implements Runnable {
        private final StoredAnalysis analysis;
        private final String planText;
        private final AtomicBoolean cancel = new AtomicBoolean();
        private final AtomicBoolean ended = new AtomicBoolean();
        private final AtomicLong done = new AtomicLong();
        private final AtomicLong drawsDone = new AtomicLong();
        private final AtomicLong drawsTotal = new AtomicLong();
        private final long total;
        private volatile String phase = RunStatus.FITTING;
        /** The current phase's work done and its total (specifications, null draws, rows written). */
        private final AtomicLong phaseDone = new AtomicLong();
        private final AtomicLong phaseTotal = new AtomicLong();
        private volatile long phaseStart = System.nanoTime();
        private volatile StoredRun record;
        private volatile RunState stopAs = RunState.CANCELLED;
        /** The end is known here but could not be written: the job stays listed so that its status tells it. */
        private volatile boolean unrecorded;

        Job(StoredAnalysis analysis, StoredRun record, String planText, long total) {
            this.analysis = analysis;
            this.record = record;
            this.planText = planText;
            this.total = total;
        }

        RunStatus status() {
            StoredRun r = record;
            double elapsed = seconds(r.started(), null);
            long d = phaseDone.get();
            long t = phaseTotal.get();
            double inPhase = (System.nanoTime() - phaseStart) / 1e9;
            // the pace of the current phase only: each phase has its own unit and speed
            Double remaining = r.started() != null && d > 0 && d < t ? inPhase * (t - d) / d : null;
            return RunStatus.of(r, r.state().ended() ? "" : phase, done.get(), total, drawsDone.get(), drawsTotal.get(), d, t, elapsed,
                    remaining, position(r.id()));
        }

        void cancel() {
            cancel.set(true);
            synchronized (this) {
                if (record.state() == RunState.QUEUED) {
                    end(RunState.CANCELLED, "", "", "cancelled before it started");
                }
            }
        }

        /**
         * QUEUED to RUNNING, unless a cancel or a stop came first: the check and the transition hold the
         * job's lock, as every end does, so a cancel can never be overwritten by a late start.
         */
        private synchronized boolean start() {
            if (cancel.get() || ended.get() || record.state() != RunState.QUEUED) {
                return false;
            }
            record = record.starting(Instant.now(), total);
            workspace.update(record);
            workspace.log(record, String.format("started: %,d specifications on %d thread%s", total, threads,
                    threads == 1 ? "" : "s"));
            return true;
        }

        void interrupt() {
            stopAs = RunState.INTERRUPTED;
            cancel.set(true);
            end(RunState.INTERRUPTED, "", "", "interrupted: the server is stopping");
        }

        @Override
        public void run() {
            started(record.id());
            try {
                if (!start()) {
                    active.remove(record.id());
                    return;
                }
            } catch (WorkspaceWriteException e) {
                failed(e);
                return;
            }
            try {
                Plan plan = new PlanReader(true).read(planText, workspace.analysisFolder(analysis.id()));
                // the disk may have filled while the run waited: refuse before fitting, not after
                workspace.requireSpace(ExpectedOutput.bytes(plan, total), "this run was not fitted");
                Table table = analyses.table(analysis);
                Path folder = workspace.runFolder(analysis.id(), record.id());
                // the run's plan.json holds planText as UTF-8 (Workspace.createRun), so these are its bytes
                RunOrigin origin = new RunOrigin("web: run of analysis " + analysis.id(),
                        planText.getBytes(StandardCharsets.UTF_8), workspace.dataFile(analysis.id()),
                        workspace.planLock(analysis.id()).orElse(null));
                CompletedRun<InferenceStage.Outcome> completed;
                try (MemoryBudget.Reservation memory = memoryFor(plan, table)) {
                    completed = pipeline.run(plan, table, planText, origin, folder, sections::of, stages(plan), cancel);
                }
                RunSummary summary = completed.summary();
                if (completed.provenance().lock() != null) {
                    completed.provenance().lock().warning().ifPresent(w -> workspace.log(record, "warning: " + w));
                }
                if (end(RunState.FINISHED, "", "", String.format("finished: fitted %,d of %,d specifications in %.2f s",
                        summary.fitted(), summary.specifications(), completed.result().seconds()))) {
                    events.publishEvent(new RunFinished(analysis.id(), record.id(), completed.result()));
                }
            } catch (RunCancelledException e) {
                end(stopAs, "", "", stopAs == RunState.CANCELLED ? "cancelled" : "interrupted");
            } catch (WorkspaceWriteException e) {
                failed(e);
            } catch (UncheckedIOException e) {
                // the result files are written last: none of them is kept when one cannot be
                removeResults();
                failed(workspace.writeFailure(e, "this run's results were not kept"));
            } catch (InputException e) {
                end(RunState.FAILED, e.where(), e.problem(), "failed: " + e.getMessage());
            } catch (OutOfMemoryError e) {
                end(RunState.FAILED, "", "the server ran out of memory for this run; fit a random sample of the "
                        + "specifications (" + FormFields.SAMPLE + ") or give the server more memory",
                        "failed: out of memory");
            } catch (RuntimeException e) {
                LOG.error("run {} of analysis {} failed", record.id(), analysis.id(), e);
                String words = "internal error (" + e.getClass().getSimpleName() + "); the server log has the details";
                // the log is downloadable: the exception's own text, which may name server paths, stays in the server log
                end(RunState.FAILED, "", words, "failed: " + words);
            } finally {
                if (!unrecorded) {
                    active.remove(record.id());
                }
            }
        }

        /**
         * The run's memory estimate reserved in the budget it shares with the uploads being read, after
         * waiting while they hold what it needs (the plan check at submit kept the estimate within one run's
         * limit).
         */
        private MemoryBudget.Reservation memoryFor(Plan plan, Table table) {
            MemoryBudget budget = analyses.memoryBudget();
            long estimate = MemoryEstimate.of(plan, table, threads).bytes();
            if (budget.wouldWait(estimate)) {
                workspace.log(record, "waiting for memory: uploads being read hold what this run needs");
            }
            return budget.awaitRoom(record.id(), estimate, cancel::get);
        }

        /** Removes the result files written before one failed, so that a failed run holds none (its plan.json stays). */
        private void removeResults() {
            Path folder = workspace.runFolder(analysis.id(), record.id());
            List<String> names = new ArrayList<>(List.of(RunOutputs.SPECIFICATIONS, RunOutputs.SUMMARY));
            names.addAll(InferenceSections.FILE_NAMES);
            for (String name : names) {
                try {
                    Files.deleteIfExists(folder.resolve(name));
                } catch (IOException e) {
                    LOG.warn("run {} of analysis {}: a partial result file is left: {}", record.id(), analysis.id(),
                            e.getMessage());
                }
            }
        }

        /** Ends the run on a workspace that could not take its writes; the cause, with its paths, is logged here only. */
        private void failed(WorkspaceWriteException e) {
            LOG.error("run {} of analysis {}: {}", record.id(), analysis.id(), e.getMessage(), e.getCause());
            end(RunState.FAILED, "", e.getMessage(), "failed: " + e.getMessage());
            if (!unrecorded) {
                active.remove(record.id());
            }
        }

        /**
         * Counts each stage's progress for the status (fitting, inference with its null draws, writing the
         * files), and records the start of the later stages in the run's log.
         */
        private StageListener stages(Plan plan) {
            return new StageListener() {
                @Override
                public RunProgress started(Stage stage) {
                    phaseDone.set(0);
                    // the null draws are known from the plan before the first is made
                    phaseTotal.set(stage == Stage.FITTING ? total : stage == Stage.INFERENCE ? plan.nullDraws() : 0);
                    phaseStart = System.nanoTime();
                    switch (stage) {
                        case FITTING -> phase = RunStatus.FITTING;
                        case INFERENCE -> {
                            phase = RunStatus.INFERENCE;
                            workspace.log(record, plan.nullDraws() > 0
                                    ? String.format("inference: %,d null draws", plan.nullDraws()) : "inference");
                        }
                        case WRITING -> {
                            phase = RunStatus.WRITING;
                            workspace.log(record, "writing files");
                        }
                    }
                    return (d, t) -> {
                        phaseDone.set(d);
                        phaseTotal.set(t);
                        if (stage == Stage.FITTING) {
                            done.set(d);
                        } else if (stage == Stage.INFERENCE) {
                            drawsDone.set(d);
                            drawsTotal.set(t);
                        }
                    };
                }

                @Override
                public void ended(Stage stage) {
                }
            };
        }

        /** Records the end once; later calls (a cancel racing a finish) do nothing. */
        private synchronized boolean end(RunState state, String where, String why, String logLine) {
            if (!ended.compareAndSet(false, true)) {
                return false;
            }
            // on disk first: a status poll that sees the end in memory must find it in the workspace too, and
            // the log line before the record, so that whoever sees the end there finds it in the log
            StoredRun ending = record.ending(state, Instant.now(), where, why);
            try {
                workspace.log(record, logLine);
                workspace.update(ending);
                record = ending;
            } catch (WorkspaceWriteException e) {
                // a full or read-only disk: the end is known in memory, and this job answers its status until a restart
                LOG.error("run {} of analysis {} ended ({}) but {}", ending.id(), ending.analysisId(), logLine,
                        e.getMessage(), e.getCause());
                record = ending;
                unrecorded = true;
            }
            if (state == RunState.CANCELLED && record.started() == null) {
                started(record.id());
            }
            return true;
        }
    }
}
