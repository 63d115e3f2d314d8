package org.forkscape.fit;

import java.util.Arrays;

/**
 * One QR refit a variant held in parts must reduce where its rows are: the usable rows (the variant's
 * statistics object for them, compared by identity), the columns in order and the outcome. Equal requests
 * (the same model with another error type) share one factor.
 */
public record RefitRequest(Moments rows, int[] columns, int outcome) {
    @Override
    public boolean equals(Object o) {
        return o instanceof RefitRequest r && r.rows == rows && r.outcome == outcome && Arrays.equals(r.columns, columns);
    }

    @Override
    public int hashCode() {
        return (System.identityHashCode(rows) * 31 + outcome) * 31 + Arrays.hashCode(columns);
    }
}
