package org.forkscape.plan;

/** One alternative of a sample decision: which rows it keeps. */
public sealed interface SampleRule {
    String label();

    /** Keeps every row. */
    record AllRows(String label) implements SampleRule {
    }

    /** Keeps the rows where the expression is true; rows where it touches a missing value are dropped. */
    record KeepRows(String label, RowExpression expression) implements SampleRule {
    }

    /**
     * Drops rows whose |z-score| on {@code column} exceeds {@code z}; mean and sd (n - 1) over the rows
     * still kept at that point; rows missing the column stay.
     */
    record TrimRows(String label, String column, double z) implements SampleRule {
    }
}
