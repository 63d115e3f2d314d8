package org.forkscape.web.run;

/** Refuses a new run while the queue is full: the limit and how many wait are in the message. */
public class RunQueueFullException extends RuntimeException {
    public RunQueueFullException(String message) {
        super(message);
    }
}
