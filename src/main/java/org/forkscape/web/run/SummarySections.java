package org.forkscape.web.run;

import java.util.Map;
import java.util.concurrent.atomic.AtomicBoolean;
import org.forkscape.run.RunResult;

/**
 * The sections a finished run adds to summary.json after its headline numbers (joint inference from null
 * draws, the selection-adjusted p-value, influence...), each under its own key. Computed on the run's
 * thread after the fit; {@code cancel} is the run's cancel flag.
 */
@FunctionalInterface
public interface SummarySections {
    /** No sections: summary.json holds the headline numbers and how the run was made. */
    SummarySections NONE = (run, cancel) -> Map.of();

    Map<String, Object> of(RunResult run, AtomicBoolean cancel);
}
