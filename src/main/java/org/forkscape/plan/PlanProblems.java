package org.forkscape.plan;

import java.util.ArrayList;
import java.util.List;
import java.util.function.Supplier;

/**
 * Every problem of one reading of a plan, in the order the reader meets them. The reader and the checker
 * go on past a problem to the next field, so that the plan form can show every problem at its field at
 * once; the command line still reports the first, which is the one a reader stopping there would give.
 */
final class PlanProblems {
    private final List<PlanException> found = new ArrayList<>();

    /** Runs one step; a problem in it is kept and {@code fallback} returned in place of its value. */
    <T> T attempt(Supplier<T> step, T fallback) {
        try {
            return step.get();
        } catch (PlanException e) {
            found.add(e);
            return fallback;
        }
    }

    /** Runs one step; returns whether it went through without a problem (a problem is kept). */
    boolean attempt(Runnable step) {
        try {
            step.run();
            return true;
        } catch (PlanException e) {
            found.add(e);
            return false;
        }
    }

    int count() {
        return found.size();
    }

    /** @throws PlanException the first problem, carrying every one, when there was any */
    void throwIfAny() {
        if (!found.isEmpty()) {
            throw new PlanException(found);
        }
    }
}
