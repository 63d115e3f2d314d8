package org.forkscape.plan;

import org.forkscape.InputException;

/** A plan that cannot be used; {@link #where()} is the JSON path of the offending field. */
public class PlanException extends InputException {
    public PlanException(String jsonPath, String message) {
        super(jsonPath, message);
    }
}
