package org.forkscape.fit;

import java.io.Serializable;
import java.util.List;
import org.forkscape.data.CategoricalColumn;
import org.forkscape.data.Column;
import org.forkscape.data.NumericColumn;
import org.forkscape.data.Table;

/**
 * What a Poisson bootstrap draw resamples, for the parts of a table that compute their own rows' counts
 * ({@link PoissonCounts}): single rows, each by its identity, or the clusters of a column, each by its value,
 * so that every row of a cluster gets the cluster's count wherever the cluster's rows are held; a row
 * missing that column is a cluster of its own, by its row identity (as {@code infer.ResampleDesign} has it on
 * one machine).
 *
 * @param seed             the run's seed
 * @param resampledColumn  the column whose clusters are resampled whole, or null for single rows
 */
public record BootstrapDesign(long seed, String resampledColumn) implements Serializable {
    /**
     * Each row's resampled unit: its row identity, or its cluster's value.
     *
     * @param rowKeys each row's identity ({@link PoissonCounts#rowKey}), one per row of {@code part}
     */
    public long[] unitKeys(Table part, long[] rowKeys) {
        if (resampledColumn == null) {
            return rowKeys;
        }
        Column c = part.column(resampledColumn);
        long[] keys = new long[rowKeys.length];
        if (c instanceof CategoricalColumn cat) {
            List<String> levels = cat.levels();
            long[] levelKey = new long[levels.size()];
            for (int l = 0; l < levelKey.length; l++) {
                levelKey[l] = PoissonCounts.textKey(levels.get(l));
            }
            int[] codes = cat.codes();
            for (int r = 0; r < keys.length; r++) {
                keys[r] = codes[r] < 0 ? rowKeys[r] : levelKey[codes[r]];
            }
        } else {
            double[] x = ((NumericColumn) c).values();
            for (int r = 0; r < keys.length; r++) {
                keys[r] = Double.isNaN(x[r]) ? rowKeys[r] : PoissonCounts.numberKey(x[r]);
            }
        }
        return keys;
    }

    /** Each unit's count in draw {@code draw} (0-based). */
    public int[] counts(long[] unitKeys, int draw) {
        int[] counts = new int[unitKeys.length];
        for (int r = 0; r < counts.length; r++) {
            counts[r] = PoissonCounts.count(seed, unitKeys[r], draw);
        }
        return counts;
    }
}
