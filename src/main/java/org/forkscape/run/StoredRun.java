package org.forkscape.run;

import java.time.Instant;

/**
 * One run as recorded in its folder.
 *
 * @param id             generated identifier, also the folder name
 * @param analysisId     the analysis it belongs to
 * @param state          where it stands
 * @param created        when it was asked for
 * @param started        when fitting began, or {@code null}
 * @param ended          when it finished, failed or was cancelled, or {@code null}
 * @param specifications specifications it fits (0 until known)
 * @param problemWhere   for a failed run, the JSON path, file or line the problem concerns ({@code ""} if none)
 * @param problem        for a failed run, the message; otherwise {@code ""}
 * @param name           the name the user gave the run, or {@code ""}
 * @param archived       whether the user archived it (kept whole, listed apart)
 */
public record StoredRun(String id, String analysisId, RunState state, Instant created, Instant started, Instant ended,
        long specifications, String problemWhere, String problem, String name, boolean archived) {

    public StoredRun with(RunState newState) {
        return new StoredRun(id, analysisId, newState, created, started, ended, specifications, problemWhere, problem,
                name, archived);
    }

    /** The run as it starts fitting {@code count} specifications. */
    public StoredRun starting(Instant at, long count) {
        return new StoredRun(id, analysisId, RunState.RUNNING, created, at, null, count, "", "", name, archived);
    }

    /** The run as it ends; {@code where} and {@code why} describe a failure and are empty otherwise. */
    public StoredRun ending(RunState finalState, Instant at, String where, String why) {
        return new StoredRun(id, analysisId, finalState, created, started, at, specifications, where, why, name,
                archived);
    }

    /** The run under a new name ({@code ""} for none) and archive mark. */
    public StoredRun labelled(String newName, boolean isArchived) {
        return new StoredRun(id, analysisId, state, created, started, ended, specifications, problemWhere, problem,
                newName.strip(), isArchived);
    }
}
