package org.forkscape.web.analysis;

import java.util.List;
import org.forkscape.run.StoredAnalysis;
import org.forkscape.run.StoredRun;

/** An analysis as the home page lists it, with its runs, newest first. */
public record AnalysisCard(StoredAnalysis analysis, List<StoredRun> runs) {
    /** The newest finished run that is not archived, or {@code null}. */
    public StoredRun latestFinished() {
        return runs.stream().filter(r -> r.state() == org.forkscape.run.RunState.FINISHED && !r.archived()).findFirst()
                .orElse(null);
    }
}
