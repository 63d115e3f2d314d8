package org.forkscape.web.explore;

/** The explorer was asked about a run that is queued, running or ended without results. */
public class RunNotFinishedException extends RuntimeException {
    public RunNotFinishedException(String message) {
        super(message);
    }
}
