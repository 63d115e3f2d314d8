package org.forkscape.web.run;

import java.util.concurrent.atomic.AtomicBoolean;
import org.forkscape.infer.InferenceSections;
import org.forkscape.infer.NullDrawSettings;
import org.forkscape.run.InferenceStage;
import org.forkscape.run.RunProgress;
import org.forkscape.run.RunResult;
import org.forkscape.web.system.ForkscapeSettings;
import org.springframework.stereotype.Component;

/**
 * The joint-inference sections of a run, as the batch command computes them: the plan's null draws (if
 * any), the selection-adjusted p of the best-looking specification, extreme bounds, weights, the
 * overfitting yardstick and the influence of the decisions, with null-draws.csv and overfitting.csv.
 */
@Component
class InferenceSummary implements SummarySections {
    private final int threads;

    InferenceSummary(ForkscapeSettings settings) {
        this.threads = settings.runs().fittingThreads();
    }

    @Override
    public InferenceStage.Outcome of(RunResult run, RunProgress progress, AtomicBoolean cancel) {
        return InferenceSections.compute(run, NullDrawSettings.of(run.plan()), threads, progress, cancel);
    }
}
