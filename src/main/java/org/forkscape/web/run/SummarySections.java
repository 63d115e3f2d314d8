package org.forkscape.web.run;

import java.util.concurrent.atomic.AtomicBoolean;
import org.forkscape.run.InferenceStage;
import org.forkscape.run.RunProgress;
import org.forkscape.run.RunResult;

/**
 * The run queue's inference stage: the sections a finished run adds to summary.json after its headline
 * numbers (joint inference from null draws, the selection-adjusted p-value, influence...), computed on
 * the run's thread after the fit. Its files are written by the pipeline after the run's own, so a run
 * cancelled or failed before then leaves none; tests replace it to control when a run ends.
 */
@FunctionalInterface
public interface SummarySections {
    /**
     * @param progress receives the null draws done out of their total
     * @param cancel   the run's cancel flag
     */
    InferenceStage.Outcome of(RunResult run, RunProgress progress, AtomicBoolean cancel);
}
