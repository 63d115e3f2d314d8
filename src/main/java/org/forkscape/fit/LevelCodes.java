package org.forkscape.fit;

import java.util.TreeMap;
import org.forkscape.data.CategoricalColumn;
import org.forkscape.data.Column;
import org.forkscape.data.NumericColumn;

/** Integer level codes for a grouping column (fixed effects, clusters): categorical or numeric identifiers. */
public final class LevelCodes {
    private LevelCodes() {
    }

    /** One code per row, 0..levels-1 in sorted order of the values, -1 where missing. */
    public static int[] of(Column column) {
        return of(column, null);
    }

    /**
     * The same, a numeric column's codes taken from {@code sortedValues} (its distinct values over the whole
     * table, ascending) when not null, so that a part of the table codes its rows as the whole does.
     */
    static int[] of(Column column, double[] sortedValues) {
        if (column instanceof CategoricalColumn cat) {
            return cat.codes();
        }
        if (sortedValues != null) {
            double[] x = ((NumericColumn) column).values();
            int[] codes = new int[x.length];
            for (int r = 0; r < x.length; r++) {
                codes[r] = Double.isNaN(x[r]) ? -1 : java.util.Arrays.binarySearch(sortedValues, x[r]);
            }
            return codes;
        }
        double[] x = ((NumericColumn) column).values();
        TreeMap<Double, Integer> levels = new TreeMap<>();
        for (double v : x) {
            if (!Double.isNaN(v)) {
                levels.put(v, 0);
            }
        }
        int next = 0;
        for (var e : levels.entrySet()) {
            e.setValue(next++);
        }
        int[] codes = new int[x.length];
        for (int r = 0; r < x.length; r++) {
            codes[r] = Double.isNaN(x[r]) ? -1 : levels.get(x[r]);
        }
        return codes;
    }
}
