package org.forkscape.run;

import java.util.concurrent.ExecutorService;
import java.util.concurrent.TimeUnit;

/** Ends a run's worker threads, so that a finished or cancelled run leaves none behind. */
public final class WorkerPools {
    /**
     * How long to wait for workers to end: they stop at their next chunk of specifications or their next
     * draw, and a chunk that outlasts this ends by itself later.
     */
    private static final long WAIT_SECONDS = 60;

    private WorkerPools() {
    }

    /** Interrupts the pool's workers and waits until they have ended. */
    public static void stop(ExecutorService pool) {
        pool.shutdownNow();
        try {
            pool.awaitTermination(WAIT_SECONDS, TimeUnit.SECONDS);
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
        }
    }
}
