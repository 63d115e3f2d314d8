package org.forkscape.web.run;

import org.forkscape.run.StoredRun;

/**
 * A run as the progress page and the JSON API show it.
 *
 * @param state            queued, running, finished, failed, cancelled or interrupted
 * @param done             specifications fitted so far
 * @param total            specifications the run fits (0 until known)
 * @param elapsedSeconds   since fitting started (0 while queued)
 * @param remainingSeconds estimated time left at the pace so far, or {@code null} when unknown
 * @param queuePosition    1 for the next run to start, 0 when not waiting
 * @param problemWhere     for a failed run, the JSON path, file or line concerned
 * @param problem          for a failed run, what went wrong
 */
public record RunStatus(String id, String analysis, String state, long done, long total, double elapsedSeconds,
        Double remainingSeconds, int queuePosition, String created, String started, String ended, String problemWhere,
        String problem) {

    static RunStatus of(StoredRun r, long done, long total, double elapsed, Double remaining, int position) {
        return new RunStatus(r.id(), r.analysisId(), r.state().word(), done, total, elapsed, remaining, position,
                String.valueOf(r.created()), r.started() == null ? null : r.started().toString(),
                r.ended() == null ? null : r.ended().toString(), r.problemWhere(), r.problem());
    }

    public boolean finished() {
        return "finished".equals(state);
    }
}
