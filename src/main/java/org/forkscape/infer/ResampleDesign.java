package org.forkscape.infer;

import java.util.SplittableRandom;
import org.forkscape.data.Table;
import org.forkscape.fit.GroupingCodes;

/**
 * The units a null draw resamples or shuffles, over the rows of the data table: single rows, or the
 * clusters of a column (each row missing that column is a cluster of its own).
 */
final class ResampleDesign {
    private final int rows;
    /** Unit of each table row, 0..units-1; null when every row is its own unit. */
    private final int[] unitOf;
    private final int units;

    private ResampleDesign(int rows, int[] unitOf, int units) {
        this.rows = rows;
        this.unitOf = unitOf;
        this.units = units;
    }

    static ResampleDesign of(Table table, String clusterColumn) {
        int n = table.rowCount();
        if (clusterColumn == null) {
            return new ResampleDesign(n, null, n);
        }
        int[] codes = GroupingCodes.of(table.column(clusterColumn));
        int max = -1;
        for (int c : codes) {
            max = Math.max(max, c);
        }
        int next = max + 1;
        int[] unitOf = new int[n];
        for (int r = 0; r < n; r++) {
            unitOf[r] = codes[r] >= 0 ? codes[r] : next++;
        }
        return new ResampleDesign(n, unitOf, next);
    }

    /** The resampled unit of each table row, or null when every row is its own unit. */
    int[] units() {
        return unitOf;
    }

    /**
     * Bootstrap weights: as many units drawn with replacement as there are, and each table row weighted
     * by its unit's number of draws (Efron 1979, "Bootstrap methods: another look at the jackknife",
     * Annals of Statistics 7(1); whole clusters: Cameron, Gelbach &amp; Miller 2008, "Bootstrap-based
     * improvements for inference with clustered errors", Review of Economics and Statistics 90(3)).
     *
     * @param unitDraws at least {@code units} long; overwritten
     * @param weights   one per table row; overwritten
     */
    void weights(SplittableRandom random, int[] unitDraws, int[] weights) {
        java.util.Arrays.fill(unitDraws, 0, units, 0);
        for (int k = 0; k < units; k++) {
            unitDraws[random.nextInt(units)]++;
        }
        for (int r = 0; r < rows; r++) {
            weights[r] = unitDraws[unitOf == null ? r : unitOf[r]];
        }
    }

    /** A uniformly random order of the table rows (Fisher-Yates; Knuth, TAOCP vol. 2, algorithm 3.4.2P). */
    void order(SplittableRandom random, int[] order) {
        for (int r = 0; r < rows; r++) {
            order[r] = r;
        }
        for (int r = rows - 1; r > 0; r--) {
            int j = random.nextInt(r + 1);
            int t = order[r];
            order[r] = order[j];
            order[j] = t;
        }
    }

    /**
     * Whether every cluster of a grouping lies within one resampled unit, so that a draw moves its rows
     * together; never for single rows (the same rule as {@code fit.ResampledVariant} applies to errors).
     *
     * @param clusterCodes one per table row, -1 where missing (such rows belong to no cluster)
     */
    boolean keepsWhole(int[] clusterCodes) {
        if (unitOf == null) {
            return false;
        }
        int levels = 0;
        for (int c : clusterCodes) {
            levels = Math.max(levels, c + 1);
        }
        int[] unitOfCluster = new int[levels];
        java.util.Arrays.fill(unitOfCluster, -1);
        for (int r = 0; r < rows; r++) {
            int c = clusterCodes[r];
            if (c < 0) {
                continue;
            }
            if (unitOfCluster[c] < 0) {
                unitOfCluster[c] = unitOf[r];
            } else if (unitOfCluster[c] != unitOf[r]) {
                return false;
            }
        }
        return true;
    }

    int unitCount() {
        return units;
    }

    int rows() {
        return rows;
    }
}
