package org.forkscape.web.run;

import org.forkscape.run.RunResult;

/** Published when a run's files are written, so the explorer can keep its results without reading them back. */
public record RunFinished(String analysisId, String runId, RunResult result) {
}
