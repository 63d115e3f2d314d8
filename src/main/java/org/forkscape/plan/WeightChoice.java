package org.forkscape.plan;

/**
 * One alternative of a weights decision: the numeric column of analytic weights, or null for unweighted.
 * Weights enter as R's {@code lm(weights = w)} and {@code glm(weights = w)} use them.
 */
public record WeightChoice(String label, String column) {
    public boolean weighted() {
        return column != null;
    }
}
