package org.forkscape.plan;

import java.util.List;
import org.forkscape.InputException;

/**
 * A plan that cannot be used; {@link #where()} is the JSON path of the offending field. When a reading
 * found several problems, this is the first of them and {@link #all()} lists every one in order.
 */
public class PlanException extends InputException {
    private final List<PlanException> all;

    public PlanException(String jsonPath, String message) {
        super(jsonPath, message);
        this.all = List.of(this);
    }

    PlanException(List<PlanException> problems) {
        this(problems.stream().flatMap(e -> e.all().stream()).toList(), true);
    }

    private PlanException(List<PlanException> flat, boolean flattened) {
        super(flat.get(0).where(), flat.get(0).problem());
        this.all = List.copyOf(flat);
    }

    /** Every problem the reading found, this one's first (at least one). */
    public List<PlanException> all() {
        return all;
    }
}
