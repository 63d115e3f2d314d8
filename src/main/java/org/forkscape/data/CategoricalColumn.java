package org.forkscape.data;

import java.util.List;

/**
 * A categorical column: a column with at least one non-missing cell that is not a number.
 *
 * @param name   the header as written in the file
 * @param codes  one code per row, an index into {@code levels}, or -1 where the cell was missing
 * @param levels the distinct values in sorted (natural string) order; the first is the reference level
 *               when the column enters a model as dummies
 * @param typed  whether the file declared the column text (a Parquet STRING or ENUM), rather than its cells
 *               making it text as in a CSV file
 */
public record CategoricalColumn(String name, int[] codes, List<String> levels, boolean typed) implements Column {
    public CategoricalColumn {
        levels = List.copyOf(levels);
    }

    /** A column that is text because of its cells, as a CSV file's. */
    public CategoricalColumn(String name, int[] codes, List<String> levels) {
        this(name, codes, levels, false);
    }

    @Override
    public int size() {
        return codes.length;
    }

    @Override
    public boolean isMissing(int row) {
        return codes[row] < 0;
    }

    /**
     * The levels that are not decimal numbers, when they are few beside many numeric ones: the cells
     * that made a column of numbers categorical (a stray {@code N/A}, a unit written after a value).
     * Empty when the column is plainly text, or was declared text by its file (its cells did not decide it).
     */
    public List<String> strayTextLevels() {
        if (typed) {
            return List.of();
        }
        List<String> text = levels.stream().filter(l -> !NumberSyntax.isDecimal(l)).toList();
        boolean mostlyNumbers = levels.size() - text.size() >= 2 * text.size();
        return mostlyNumbers && text.size() <= 5 ? text : List.of();
    }

    /** Counts of each level, in level order. */
    public int[] levelCounts() {
        int[] counts = new int[levels.size()];
        for (int c : codes) {
            if (c >= 0) {
                counts[c]++;
            }
        }
        return counts;
    }
}
