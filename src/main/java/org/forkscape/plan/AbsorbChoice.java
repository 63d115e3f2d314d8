package org.forkscape.plan;

import java.util.List;

/** One alternative of an absorb decision: the categorical columns whose fixed effects are absorbed (may be none). */
public record AbsorbChoice(String label, List<String> columns) {
    /**
     * Most columns one alternative absorbs. With two, the rank of the dummies is counted exactly (one level lost
     * per connected component of the levels' bipartite graph); with three or more no such count is exact.
     */
    public static final int MAX_COLUMNS = 2;

    /**
     * Most levels, on the one of two absorbed columns with fewer of them, for HC2 and HC3 errors: their
     * leverages factor and invert a dense matrix of that order once per set of usable rows (2,000: 32 MB and
     * about 8e9 multiply-adds; the cost grows with the cube).
     */
    public static final int MAX_LEVERAGE_LEVELS = 2_000;

    public AbsorbChoice {
        columns = List.copyOf(columns);
    }
}
