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
            int[] byWhole = wholeNumberCodes(sortedValues);
            long low = byWhole == null ? 0 : (long) sortedValues[0];
            int[] codes = new int[x.length];
            for (int r = 0; r < x.length; r++) {
                double v = x[r];
                if (Double.isNaN(v)) {
                    codes[r] = -1;
                    continue;
                }
                int code = -1;
                long k = (long) v;
                if (byWhole != null && k == v && k >= low && k - low < byWhole.length) {
                    code = byWhole[(int) (k - low)];
                }
                // the table answers whole numbers; anything else (or -0.0) by the search it stands for
                codes[r] = code >= 0 && Double.compare(sortedValues[code], v) == 0 ? code
                        : java.util.Arrays.binarySearch(sortedValues, v);
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

    /** Values spread over at most this many whole numbers per value are coded through a table. */
    private static final int TABLE_SPREAD = 8;

    /**
     * When {@code sortedValues} are whole numbers within a range of at most {@link #TABLE_SPREAD} times their
     * count (identifiers, years), each one's code indexed by its offset from the smallest (-1 where no value
     * is), so that a row's code is one lookup instead of a binary search; null otherwise.
     */
    static int[] wholeNumberCodes(double[] sortedValues) {
        int n = sortedValues.length;
        if (n == 0) {
            return null;
        }
        double low = sortedValues[0];
        double high = sortedValues[n - 1];
        if (!(high - low < (double) TABLE_SPREAD * n + 1) || Math.abs(low) > 1e15 || Math.abs(high) > 1e15) {
            return null;
        }
        int[] table = new int[(int) (high - low) + 1];
        java.util.Arrays.fill(table, -1);
        for (int c = 0; c < n; c++) {
            double v = sortedValues[c];
            if (v != Math.rint(v)) {
                return null;
            }
            table[(int) ((long) v - (long) low)] = c;
        }
        return table;
    }
}
