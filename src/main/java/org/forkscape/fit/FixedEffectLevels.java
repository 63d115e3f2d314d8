package org.forkscape.fit;

import java.util.Map;
import java.util.TreeMap;
import org.forkscape.data.Column;

/**
 * The absorbed fixed effect over a variant's rows: rows missing its column cannot be in any specification of
 * the variant and drop out; the others get dense level codes, 0..levels-1 in the order of the column's codes.
 * Without absorption every row is kept, at level 0.
 */
final class FixedEffectLevels {
    /** The absorbed column's name, null when nothing is absorbed. */
    final String column;
    /** The table row of each kept row. */
    final int[] tableRows;
    /** The level of each kept row. */
    final int[] level;
    final int levels;
    /** Position of each kept row among the rows it was built from; null when every row is kept. */
    private final int[] keptAt;

    private FixedEffectLevels(String column, int[] tableRows, int[] level, int levels, int[] keptAt) {
        this.column = column;
        this.tableRows = tableRows;
        this.level = level;
        this.levels = levels;
        this.keptAt = keptAt;
    }

    /**
     * The levels of {@code absorbed} (null for none) at the table rows {@code sampled}; with the codes
     * present in the whole variant given in {@code whole}, numbered among those.
     */
    static FixedEffectLevels of(Column absorbed, int[] sampled, WholeRows whole) {
        if (absorbed == null) {
            return new FixedEffectLevels(null, sampled, new int[sampled.length], 1, null);
        }
        int[] codes = LevelCodes.of(absorbed, whole.groupingValues(absorbed.name()));
        int m = 0;
        for (int i = 0; i < sampled.length; i++) {
            if (codes[sampled[i]] >= 0) {
                m++;
            }
        }
        int[] keptAt = new int[m];
        m = 0;
        for (int i = 0; i < sampled.length; i++) {
            if (codes[sampled[i]] >= 0) {
                keptAt[m++] = i;
            }
        }
        int[] kept = new int[keptAt.length];
        for (int i = 0; i < keptAt.length; i++) {
            kept[i] = sampled[keptAt[i]];
        }
        int[] dense = new int[keptAt.length];
        int[] present = whole.absorbCodes();
        if (present != null) {
            for (int i = 0; i < kept.length; i++) {
                dense[i] = java.util.Arrays.binarySearch(present, codes[kept[i]]);
            }
            return new FixedEffectLevels(absorbed.name(), kept, dense, Math.max(1, present.length), keptAt);
        }
        Map<Integer, Integer> remap = new TreeMap<>();
        for (int r : kept) {
            remap.put(codes[r], 0);
        }
        int next = 0;
        for (Map.Entry<Integer, Integer> e : remap.entrySet()) {
            e.setValue(next++);
        }
        for (int i = 0; i < kept.length; i++) {
            dense[i] = remap.get(codes[kept[i]]);
        }
        return new FixedEffectLevels(absorbed.name(), kept, dense, Math.max(1, next), keptAt);
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
