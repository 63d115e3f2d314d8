package org.forkscape.plan;

/** One alternative of an outcome or predictor decision: a column and how it is coded. */
public record VariableChoice(String label, String column, Transform transform) {
}
