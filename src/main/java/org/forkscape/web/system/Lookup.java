package org.forkscape.web.system;

import org.forkscape.run.StoredAnalysis;
import org.forkscape.run.StoredRun;
import org.forkscape.run.Workspace;
import org.springframework.stereotype.Component;

/**
 * Finds the analysis and run a request names. Identifiers are checked against the workspace's generated
 * shape before any path is built, so {@code ../}, absolute paths and encoded variants find nothing.
 */
@Component
public class Lookup {
    private final Workspace workspace;

    public Lookup(Workspace workspace) {
        this.workspace = workspace;
    }

    public StoredAnalysis analysis(String id) {
        return workspace.analysis(id).orElseThrow(() -> new NotFoundException("there is no analysis " + shown(id)));
    }

    public StoredRun run(StoredAnalysis analysis, String runId) {
        return workspace.run(analysis.id(), runId)
                .orElseThrow(() -> new NotFoundException("analysis " + analysis.id() + " has no run " + shown(runId)));
    }

    private static String shown(String id) {
        String s = id == null ? "" : id.replaceAll("\\p{Cntrl}", "");
        return "\"" + (s.length() > 40 ? s.substring(0, 40) + "..." : s) + "\"";
    }
}
