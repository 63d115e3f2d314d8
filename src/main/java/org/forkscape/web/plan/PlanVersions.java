package org.forkscape.web.plan;

import java.nio.file.Files;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Optional;
import org.forkscape.run.PlanVersion;
import org.forkscape.run.StoredAnalysis;
import org.forkscape.run.StoredRun;
import org.forkscape.run.Workspace;
import org.forkscape.web.system.NotFoundException;

/**
 * The plan page's history: every saved version of the plan, newest first, each with the runs that ran it
 * (a run ran the version whose SHA-256 its plan.json has, {@link Workspace#versionOf}).
 */
public final class PlanVersions {
    private PlanVersions() {
    }

    /**
     * @param version the saved version
     * @param runs    the ids of the runs that ran it, newest first
     * @param working whether it is the plan being edited (the latest)
     */
    public record Row(PlanVersion version, List<String> runs, boolean working) {
    }

    public static List<Row> of(Workspace workspace, StoredAnalysis analysis) {
        List<PlanVersion> versions = workspace.planVersions(analysis.id());
        Map<Integer, List<String>> runs = new LinkedHashMap<>();
        for (StoredRun r : workspace.runs(analysis.id())) {
            ranVersion(workspace, r).ifPresent(v -> runs.computeIfAbsent(v.version(), k -> new ArrayList<>())
                    .add(r.id()));
        }
        List<Row> rows = new ArrayList<>();
        for (int i = versions.size() - 1; i >= 0; i--) {
            PlanVersion v = versions.get(i);
            rows.add(new Row(v, runs.getOrDefault(v.version(), List.of()), i == versions.size() - 1));
        }
        return rows;
    }

    /** The saved version a run ran, or empty when its plan is none of them (sent with the run through the API). */
    public static Optional<PlanVersion> ranVersion(Workspace workspace, StoredRun run) {
        if (!Files.isRegularFile(workspace.runFolder(run.analysisId(), run.id()).resolve(Workspace.PLAN))) {
            // a run being recorded this moment, before its plan.json is written
            return Optional.empty();
        }
        return workspace.versionOf(run.analysisId(), workspace.runPlan(run.analysisId(), run.id()), run.created());
    }

    /** Parses a version number from an address. */
    static int number(String text) {
        try {
            int n = Integer.parseInt(text);
            if (n >= 1) {
                return n;
            }
        } catch (NumberFormatException e) {
            // not a number: no such version either
        }
        throw new NotFoundException("the plan has no version \"" + (text.length() > 20 ? text.substring(0, 20) : text)
                + "\"");
    }
}
