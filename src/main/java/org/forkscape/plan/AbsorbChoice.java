package org.forkscape.plan;

import java.util.List;

/** One alternative of an absorb decision: the categorical columns whose fixed effects are absorbed (may be none). */
public record AbsorbChoice(String label, List<String> columns) {
    /**
     * Most columns one alternative absorbs. With two, the rank of the dummies is counted exactly (one level lost
     * per connected component of the levels' bipartite graph); with three or more no such count is exact.
     */
    public static final int MAX_COLUMNS = 2;

    public AbsorbChoice {
        columns = List.copyOf(columns);
    }
}
