package org.forkscape.plan;

import java.util.List;

/** One alternative of an absorb decision: the categorical columns whose fixed effects are absorbed (may be none). */
public record AbsorbChoice(String label, List<String> columns) {
    /**
     * Most levels outside the column with most of them, beside three or more absorbed columns: the dummies' exact
     * rank eliminates a dense matrix of that order modulo a prime once per set of usable rows
     * ({@code fit.ModularDummyRank}; 2,000: 32 MB and at most about 8e9 multiply-adds; the cost grows with the
     * cube). Two columns need no such limit: their rank is a count of connected components.
     */
    public static final int MAX_RANK_LEVELS = 2_000;

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
