package org.forkscape.run;

import java.nio.file.Path;
import java.util.concurrent.atomic.AtomicBoolean;
import org.forkscape.InputException;
import org.forkscape.data.Table;
import org.forkscape.plan.Plan;
import org.forkscape.plan.PlanChecker;

/**
 * A run from a read plan to its files, the one flow both doors call (the batch command and the web's
 * run queue), in this order: check the plan against the table (columns and types, the specification
 * cap, and the memory estimate when the door sets a limit), fit every specification
 * ({@link MultiverseRunner}), refuse a run that fitted nothing ({@link NothingFitted}), run the inference
 * stage, and write the run's files (summary.json ending with the run's {@link Provenance}) ({@link RunOutputs}, each atomically) followed by the stage's own
 * ({@link InferenceStage.Outcome#writeFiles}). The pipeline writes nothing before that last step, so a
 * refused, failed or cancelled run leaves the folder as it was.
 *
 * <p>The inference stage is passed in rather than called here: it lives in {@code org.forkscape.infer},
 * which works on this package's {@link RunResult}, so calling it from here would make the two packages
 * depend on each other. Each door hands in the stage it already holds (the batch command the inference
 * sections of its null-draw settings, the queue its summary-sections bean), and reads what the stage gave
 * back through the type it chose.
 *
 * <p>What stays with the doors: reading arguments or requests, the wording that names their options or
 * settings (the way out of a memory refusal, where a problem is located), printing, queueing and status.
 */
public final class RunPipeline {
    private final int threads;
    private final MemoryLimit memoryLimit;
    private final SettingNames names;
    private final org.forkscape.fit.VariantSource variants;

    /**
     * A pipeline that does not estimate memory: for a door that refused too large a plan before it queued
     * the run.
     *
     * @param threads fitting threads
     */
    public RunPipeline(int threads) {
        this(threads, null, SettingNames.COMMAND_LINE, null);
    }

    private RunPipeline(int threads, MemoryLimit memoryLimit, SettingNames names,
            org.forkscape.fit.VariantSource variants) {
        this.threads = threads;
        this.memoryLimit = memoryLimit;
        this.names = names;
        this.variants = variants;
    }

    /**
     * The same pipeline taking its data variants from {@code variants} (null: coded from the table's rows),
     * so that a runner holding its rows elsewhere shares every other step.
     */
    public RunPipeline withVariants(org.forkscape.fit.VariantSource variants) {
        return new RunPipeline(threads, memoryLimit, names, variants);
    }

    /**
     * The same pipeline, refusing a plan whose memory estimate ({@link MemoryEstimate}) is above
     * {@code bytes} before anything is fitted.
     *
     * @param wayOut what the user can do, in the door's own words (its options or settings)
     */
    public RunPipeline refusingMemoryAbove(long bytes, String wayOut) {
        return new RunPipeline(threads, new MemoryLimit(bytes, wayOut), names, variants);
    }

    /** The same pipeline, naming the settings in its messages as {@code names} does (the batch command's by default). */
    public RunPipeline naming(SettingNames names) {
        return new RunPipeline(threads, memoryLimit, names, variants);
    }

    /**
     * Runs a plan and writes its files.
     *
     * @param plan      a plan read for its structure; it is checked against the table here
     * @param planText  the plan as given, copied into the folder
     * @param origin    the door's part of the run's provenance (its command, the plan's bytes, the data file)
     * @param folder    where the files go
     * @param inference the stage after the fit
     * @param listener  told of each long stage and its progress
     * @param cancel    the run's cancel flag, or null when it cannot be cancelled
     * @throws InputException         when the plan cannot run on the table or fitted nothing
     * @throws RunCancelledException  when the cancel flag was set before the files were written
     */
    public <O extends InferenceStage.Outcome> CompletedRun<O> run(Plan plan, Table table, String planText, RunOrigin origin,
            Path folder, InferenceStage<O> inference, StageListener listener, AtomicBoolean cancel) {
        check(plan, table);
        Provenance provenance = Provenance.of(origin, plan.seed(), threads);
        RunResult result = fit(plan, table, listener, cancel);
        RunSummary summary = RunSummary.of(result.results(), plan.alpha());
        if (summary.fitted() == 0) {
            throw new InputException("", NothingFitted.reason(result));
        }
        O outcome = infer(result, inference, listener, cancel);
        if (cancel != null && cancel.get()) {
            throw new RunCancelledException();
        }
        write(result, folder, planText, outcome, provenance, listener);
        return new CompletedRun<>(result, summary, outcome, provenance);
    }

    private void check(Plan plan, Table table) {
        PlanChecker.check(plan, table);
        MultiverseRunner.checkCount(plan, names);
        if (memoryLimit != null) {
            MemoryEstimate.of(plan, table, threads).refuseAbove(memoryLimit.bytes(), memoryLimit.wayOut());
        }
    }

    private RunResult fit(Plan plan, Table table, StageListener listener, AtomicBoolean cancel) {
        RunProgress progress = listener.started(StageListener.Stage.FITTING);
        try {
            return new MultiverseRunner(threads).withVariants(variants).run(plan, table, progress, cancel);
        } finally {
            listener.ended(StageListener.Stage.FITTING);
        }
    }

    private static <O extends InferenceStage.Outcome> O infer(RunResult result, InferenceStage<O> inference,
            StageListener listener, AtomicBoolean cancel) {
        RunProgress progress = listener.started(StageListener.Stage.INFERENCE);
        try {
            return inference.compute(result, progress, cancel);
        } finally {
            listener.ended(StageListener.Stage.INFERENCE);
        }
    }

    private void write(RunResult result, Path folder, String planText, InferenceStage.Outcome outcome,
            Provenance provenance, StageListener listener) {
        RunProgress progress = listener.started(StageListener.Stage.WRITING);
        try {
            RunOutputs.write(result, folder, planText, outcome.sections(), provenance, threads, progress);
            outcome.writeFiles(folder);
        } finally {
            listener.ended(StageListener.Stage.WRITING);
        }
    }

    private record MemoryLimit(long bytes, String wayOut) {
    }
}
