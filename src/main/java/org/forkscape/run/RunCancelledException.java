package org.forkscape.run;

/** Thrown out of a run whose cancellation was requested; no partial results are kept. */
public class RunCancelledException extends RuntimeException {
    public RunCancelledException() {
        super("the run was cancelled");
    }
}
