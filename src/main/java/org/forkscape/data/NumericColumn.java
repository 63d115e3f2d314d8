package org.forkscape.data;

/**
 * A numeric column: every non-missing cell parsed as a number.
 *
 * @param name   the header as written in the file
 * @param values one value per row, {@code NaN} where the cell was missing; not copied, never modified
 */
public record NumericColumn(String name, double[] values) implements Column {
    @Override
    public int size() {
        return values.length;
    }

    @Override
    public boolean isMissing(int row) {
        return Double.isNaN(values[row]);
    }
}
