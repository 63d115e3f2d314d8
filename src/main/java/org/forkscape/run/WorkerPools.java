package org.forkscape.run;

import java.util.concurrent.ExecutionException;
import java.util.concurrent.ExecutorService;
import java.util.concurrent.Future;
import java.util.concurrent.TimeUnit;

/**
 * Waits for and ends a run's worker threads, so that a finished or cancelled run leaves none behind and a
 * worker's failure reaches the caller as it was thrown.
 */
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

    /**
     * Waits for one worker's task; its own runtime exception is rethrown as is, and an interrupt of the
     * waiting thread counts as a cancellation.
     */
    public static void await(Future<?> f) {
        try {
            f.get();
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
            throw new RunCancelledException();
        } catch (ExecutionException e) {
            Throwable cause = e.getCause();
            if (cause instanceof RuntimeException re) {
                throw re;
            }
            throw new IllegalStateException(cause);
        }
    }
}
