package org.forkscape.fit;

import org.forkscape.data.Column;

/**
 * The absorbed fixed effects over a variant's rows: rows missing an absorbed column cannot be in any
 * specification of the variant and drop out. With one column the others get dense level codes, 0..levels-1 in
 * the order of the column's codes, and the cell sums absorb them. With several, every row is at level 0 of the
 * cells, and each column's dense codes are kept as a dimension for {@link SeveralEffectsWithin}. Without
 * absorption every row is kept, at level 0.
 */
final class FixedEffectLevels {
    /** The absorbed column's name (several joined by ", "), null when nothing is absorbed. */
    final String column;
    /** With several absorbed columns: per column, the dense level (0..levels-1) of each kept row; else null. */
    final int[][] dimensionCodes;
    /** With several absorbed columns: per column, its number of levels over the kept rows; else null. */
    final int[] dimensionLevels;
    /** The table row of each kept row. */
    final int[] tableRows;
    /** The level of each kept row. */
    final int[] level;
    final int levels;
    /** Position of each kept row among the rows it was built from; null when every row is kept. */
    private final int[] keptAt;

    private FixedEffectLevels(String column, int[] tableRows, int[] level, int levels, int[] keptAt) {
        this(column, tableRows, level, levels, keptAt, null, null);
    }

    private FixedEffectLevels(String column, int[] tableRows, int[] level, int levels, int[] keptAt,
            int[][] dimensionCodes, int[] dimensionLevels) {
        this.dimensionCodes = dimensionCodes;
        this.dimensionLevels = dimensionLevels;
        this.column = column;
        this.tableRows = tableRows;
        this.level = level;
        this.levels = levels;
        this.keptAt = keptAt;
    }

    /**
     * The levels of the {@code absorbed} columns (none, one or several) at the table rows {@code sampled}; with
     * one column and the codes present in the whole variant given in {@code whole}, numbered among those.
     */
    static FixedEffectLevels of(Column[] absorbed, int[] sampled, WholeRows whole) {
        if (absorbed.length == 0) {
            return new FixedEffectLevels(null, sampled, new int[sampled.length], 1, null);
        }
        int[][] codes = new int[absorbed.length][];
        for (int d = 0; d < absorbed.length; d++) {
            codes[d] = LevelCodes.of(absorbed[d], whole.groupingValues(absorbed[d].name()));
        }
        int m = 0;
        for (int i = 0; i < sampled.length; i++) {
            if (complete(codes, sampled[i])) {
                m++;
            }
        }
        int[] keptAt = new int[m];
        m = 0;
        for (int i = 0; i < sampled.length; i++) {
            if (complete(codes, sampled[i])) {
                keptAt[m++] = i;
            }
        }
        int[] kept = new int[keptAt.length];
        for (int i = 0; i < keptAt.length; i++) {
            kept[i] = sampled[keptAt[i]];
        }
        int[] present = whole.absorbCodes();
        if (present != null && absorbed.length == 1) {
            int[] dense = new int[kept.length];
            for (int i = 0; i < kept.length; i++) {
                dense[i] = java.util.Arrays.binarySearch(present, codes[0][kept[i]]);
            }
            return new FixedEffectLevels(absorbed[0].name(), kept, dense, Math.max(1, present.length), keptAt);
        }
        int[][] dense = new int[absorbed.length][kept.length];
        int[] levels = new int[absorbed.length];
        for (int d = 0; d < absorbed.length; d++) {
            levels[d] = dense(codes[d], kept, dense[d]);
        }
        if (absorbed.length == 1) {
            return new FixedEffectLevels(absorbed[0].name(), kept, dense[0], Math.max(1, levels[0]), keptAt);
        }
        String names = String.join(", ", java.util.Arrays.stream(absorbed).map(Column::name).toList());
        return new FixedEffectLevels(names, kept, new int[kept.length], 1, keptAt, dense, levels);
    }

    private static boolean complete(int[][] codes, int row) {
        for (int[] c : codes) {
            if (c[row] < 0) {
                return false;
            }
        }
        return true;
    }

    /**
     * Writes into {@code dense} the codes at {@code kept} renumbered 0.. in their order; returns their count. By a
     * sort of the codes and a binary search a row (a map of boxed codes took a quarter of a Spark run's time
     * beside two absorbed columns, where every pass codes its partition again).
     */
    static int dense(int[] codes, int[] kept, int[] dense) {
        int[] distinct = new int[kept.length];
        for (int i = 0; i < kept.length; i++) {
            distinct[i] = codes[kept[i]];
        }
        java.util.Arrays.sort(distinct);
        int count = 0;
        for (int i = 0; i < distinct.length; i++) {
            if (i == 0 || distinct[i] != distinct[i - 1]) {
                distinct[count++] = distinct[i];
            }
        }
        for (int i = 0; i < kept.length; i++) {
            dense[i] = java.util.Arrays.binarySearch(distinct, 0, count, codes[kept[i]]);
        }
        return count;
    }

    /** Whether several columns are absorbed (by alternating projections rather than the cell sums). */
    boolean several() {
        return dimensionCodes != null;
    }

    /** The distinct codes of {@code absorbed} at the table rows {@code sampled}, ascending. */
    static int[] presentCodes(Column absorbed, int[] sampled, WholeRows whole) {
        int[] codes = LevelCodes.of(absorbed, whole.groupingValues(absorbed.name()));
        return java.util.Arrays.stream(sampled).map(r -> codes[r]).filter(c -> c >= 0).distinct().sorted().toArray();
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
}
