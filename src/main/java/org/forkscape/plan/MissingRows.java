package org.forkscape.plan;

/** Which rows a specification uses when some cells are missing. */
public enum MissingRows {
    /** Each specification uses the rows complete on its own variables, exactly as fitting it alone would. */
    PER_SPECIFICATION("per-specification"),
    /** Every specification uses the rows complete on every model variable the plan names. */
    COMMON("common");

    private final String spelling;

    MissingRows(String spelling) {
        this.spelling = spelling;
    }

    public String spelling() {
        return spelling;
    }
}
