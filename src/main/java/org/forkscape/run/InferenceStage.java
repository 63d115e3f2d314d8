package org.forkscape.run;

import java.nio.file.Path;
import java.util.List;
import java.util.Map;
import java.util.concurrent.atomic.AtomicBoolean;

/**
 * The stage a {@link RunPipeline} runs on a run that fitted something: the joint inference, which lives
 * above this package (in {@code org.forkscape.infer}, which uses the run's results) and is therefore
 * handed in by each door.
 *
 * @param <O> what the stage gives back, for a door that reads more than the common {@link Outcome}
 */
@FunctionalInterface
public interface InferenceStage<O extends InferenceStage.Outcome> {
    /**
     * @param progress receives the stage's work done out of its total (null draws)
     * @param cancel   the run's cancel flag, or null when the run cannot be cancelled
     */
    O compute(RunResult run, RunProgress progress, AtomicBoolean cancel);

    /** What every inference stage gives back. */
    interface Outcome {
        /** The summary.json sections after the headline numbers, in their documented order. */
        Map<String, Object> sections();

        /** Writes the stage's own files into the run's folder, after the run's files are written. */
        void writeFiles(Path folder);

        /** Warnings about the results, each one sentence, for a door that shows them beside the results. */
        List<String> warnings();
    }
}
