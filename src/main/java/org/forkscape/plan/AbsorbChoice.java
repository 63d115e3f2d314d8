package org.forkscape.plan;

import java.util.List;

/** One alternative of an absorb decision: the categorical columns whose fixed effects are absorbed (may be none). */
public record AbsorbChoice(String label, List<String> columns) {
    public AbsorbChoice {
        columns = List.copyOf(columns);
    }
}
