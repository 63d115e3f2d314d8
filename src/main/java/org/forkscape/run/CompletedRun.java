package org.forkscape.run;

/**
 * What a {@link RunPipeline} gives back once a run's files are written.
 *
 * @param result    the fitted run
 * @param summary   its headline numbers
 * @param inference  what the inference stage gave back
 * @param provenance how it was made, as summary.json records it
 */
public record CompletedRun<O extends InferenceStage.Outcome>(RunResult result, RunSummary summary, O inference,
        Provenance provenance) {
}
