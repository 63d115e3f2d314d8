package org.forkscape.run;

/**
 * What a door hears of a {@link RunPipeline}: the start and end of its three long stages, and progress
 * within each. The batch command draws a progress line per stage on a terminal; the run queue counts
 * progress for its status and records the phase.
 */
public interface StageListener {
    /** Does nothing: for callers that show no progress. */
    StageListener SILENT = new StageListener() {
        @Override
        public RunProgress started(Stage stage) {
            return RunProgress.SILENT;
        }

        @Override
        public void ended(Stage stage) {
        }
    };

    /** The stages that take long enough to report on, in the order they run. */
    enum Stage {
        /** Fitting every specification; progress counts specifications. */
        FITTING,
        /** The inference stage after the fit; progress counts null draws, and stays at 0 of 0 without them. */
        INFERENCE,
        /** Writing the run's files; progress counts the rows of specifications.csv written. */
        WRITING
    }

    /**
     * Called on the pipeline's thread as a stage begins.
     *
     * @return the progress of the stage, called from worker threads
     */
    RunProgress started(Stage stage);

    /** Called on the pipeline's thread once a started stage has ended, whether or not it completed. */
    void ended(Stage stage);
}
