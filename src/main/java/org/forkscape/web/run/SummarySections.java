package org.forkscape.web.run;

import java.nio.file.Path;
import java.util.Map;
import java.util.concurrent.atomic.AtomicBoolean;
import org.forkscape.run.RunProgress;
import org.forkscape.run.RunResult;

/**
 * The sections a finished run adds to summary.json after its headline numbers (joint inference from null
 * draws, the selection-adjusted p-value, influence...), each under its own key, computed on the run's
 * thread after the fit. An implementation may write files of its own into the run's folder.
 */
@FunctionalInterface
public interface SummarySections {
    /**
     * @param folder   the run's folder
     * @param progress receives the null draws done out of their total
     * @param cancel   the run's cancel flag
     */
    Map<String, Object> of(RunResult run, Path folder, RunProgress progress, AtomicBoolean cancel);
}
