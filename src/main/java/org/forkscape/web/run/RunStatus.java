package org.forkscape.web.run;

import org.forkscape.run.StoredRun;

/**
 * A run as the progress page and the JSON API show it.
 *
 * @param state            queued, running, finished, failed, cancelled or interrupted
 * @param phase            while running: {@link #FITTING}, then {@link #INFERENCE} (null draws when the plan asks
 *                         for them, and the summaries), then {@link #WRITING}; empty once the run has ended
 * @param done             specifications fitted so far
 * @param total            specifications the run fits (0 until known)
 * @param drawsDone        null draws done so far
 * @param drawsTotal       null draws the run makes (0 until they start)
 * @param phaseDone        the current phase's work done: specifications, null draws, or rows of
 *                         specifications.csv written
 * @param phaseTotal       the current phase's work in all (0 when the phase has nothing to count, as the
 *                         inference without null draws)
 * @param elapsedSeconds   since fitting started (0 while queued)
 * @param remainingSeconds estimated time left in the current phase at its pace so far, or {@code null} when
 *                         unknown
 * @param queuePosition    1 for the next run to start, 0 when not waiting
 * @param problemWhere     for a failed run, the JSON path, file or line concerned
 * @param problem          for a failed run, what went wrong
 */
public record RunStatus(String id, String analysis, String state, String phase, long done, long total, long drawsDone,
        long drawsTotal, long phaseDone, long phaseTotal, double elapsedSeconds,
        Double remainingSeconds, int queuePosition, String created, String started, String ended, String problemWhere,
        String problem) {
    public static final String FITTING = "fitting";
    public static final String INFERENCE = "inference";
    public static final String WRITING = "writing files";

    static RunStatus of(StoredRun r, String phase, long done, long total, long drawsDone, long drawsTotal,
            long phaseDone, long phaseTotal, double elapsed, Double remaining, int position) {
        return new RunStatus(r.id(), r.analysisId(), r.state().word(), phase, done, total, drawsDone, drawsTotal,
                phaseDone, phaseTotal, elapsed, remaining, position,
                String.valueOf(r.created()), r.started() == null ? null : r.started().toString(),
                r.ended() == null ? null : r.ended().toString(), r.problemWhere(), r.problem());
    }
}
