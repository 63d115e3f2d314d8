package org.forkscape.fit;

import org.forkscape.data.Column;
import org.forkscape.data.NumericColumn;

/**
 * A weighted variant's analytic weights: rows whose weight is missing or zero drop out of the variant, the
 * others keep their weight. Dropping zero-weight rows is what R's {@code lm.wfit} does before its QR
 * decomposition (a zero-weight row has no part in the estimate, the residual variance or R-squared, and
 * N and the residual degrees of freedom count only rows with positive weight); doing it here also keeps
 * them out of the HC1 factor N/(N - K), the leverages of HC2 and HC3 and the cluster count G, which is
 * the fit of {@code lm} and {@code sandwich} on the positive-weight rows (see README, "Plan file",
 * weights). Every specification of a weighted variant uses the weight, so dropping a row missing it here
 * selects exactly the rows a per-specification missing bit would. Negative and infinite weights never
 * reach this class: the plan check refuses them. Without weights every row is kept and no weight is held.
 */
final class AnalyticWeights {
    /** The table rows kept. */
    final int[] tableRows;
    /** The weight of each kept row, all positive; null when unweighted. */
    final double[] weight;
    /** Position of each kept row among the rows it was built from; null when every row is kept. */
    private final int[] keptAt;

    private AnalyticWeights(int[] tableRows, double[] weight, int[] keptAt) {
        this.tableRows = tableRows;
        this.weight = weight;
        this.keptAt = keptAt;
    }

    /** The weights of {@code column} (null for none) at the table rows {@code sampled}. */
    static AnalyticWeights of(Column column, int[] sampled) {
        if (column == null) {
            return new AnalyticWeights(sampled, null, null);
        }
        double[] values = ((NumericColumn) column).values();
        int m = 0;
        for (int r : sampled) {
            if (values[r] > 0) {
                m++;
            }
        }
        int[] keptAt = new int[m];
        int[] kept = new int[m];
        double[] weight = new double[m];
        m = 0;
        for (int i = 0; i < sampled.length; i++) {
            double w = values[sampled[i]];
            if (w > 0) {
                keptAt[m] = i;
                kept[m] = sampled[i];
                weight[m++] = w;
            }
        }
        return new AnalyticWeights(kept, weight, keptAt);
    }

    /** Replaces each non-null column of {@code columns} (modified), given over the sampled rows, by its kept rows. */
    void compact(double[][] columns) {
        if (keptAt == null) {
            return;
        }
        for (int j = 0; j < columns.length; j++) {
            if (columns[j] != null) {
                double[] compact = new double[keptAt.length];
                for (int i = 0; i < keptAt.length; i++) {
                    compact[i] = columns[j][keptAt[i]];
                }
                columns[j] = compact;
            }
        }
    }

    /** The weights of the rows {@code levels} keeps out of these (the absorbed column may drop more), or null. */
    double[] at(FixedEffectLevels levels) {
        if (weight == null || levels.tableRows.length == tableRows.length) {
            return weight;
        }
        double[] out = new double[levels.tableRows.length];
        int k = 0;
        for (int i = 0; i < tableRows.length && k < out.length; i++) {
            if (tableRows[i] == levels.tableRows[k]) {
                out[k++] = weight[i];
            }
        }
        return out;
    }
}
