package org.forkscape.run;

import java.util.HashMap;
import java.util.HashSet;
import java.util.Map;
import java.util.Set;
import org.forkscape.data.Column;
import org.forkscape.data.Table;

/**
 * The cells the table's rows fall into: each row's missing-pattern group (the set of model variables
 * missing in it), crossed with fixed-effect levels and clusters. Counted over the whole table, which
 * bounds every variant's count.
 */
final class RowCells {
    private final int[] group;
    private final int groups;

    RowCells(Table table, Column[] variables, long missingBits) {
        int n = table.rowCount();
        group = new int[n];
        Map<Long, Integer> ids = new HashMap<>();
        long last = -1;
        int lastId = 0;
        for (int r = 0; r < n; r++) {
            long mask = 0;
            for (long bits = missingBits; bits != 0; bits &= bits - 1) {
                int v = Long.numberOfTrailingZeros(bits);
                if (variables[v].isMissing(r)) {
                    mask |= 1L << v;
                }
            }
            if (mask != last) {
                last = mask;
                lastId = ids.computeIfAbsent(mask, m -> ids.size());
            }
            group[r] = lastId;
        }
        groups = Math.max(1, ids.size());
    }

    int groups() {
        return groups;
    }

    /**
     * Distinct (group, level, cluster) combinations among the rows that have a level and a cluster.
     *
     * @param levels   level codes, or null without fixed effects
     * @param clusters cluster codes, or null
     */
    long distinct(int[] levels, int[] clusters) {
        if (levels == null && clusters == null) {
            return groups;
        }
        Map<Long, Integer> cellOf = new HashMap<>();
        Set<Long> seen = new HashSet<>();
        for (int r = 0; r < group.length; r++) {
            int l = levels == null ? 0 : levels[r];
            int c = clusters == null ? 0 : clusters[r];
            if (l >= 0 && c >= 0) {
                int cell = cellOf.computeIfAbsent((long) group[r] << 31 | l, k -> cellOf.size());
                seen.add((long) cell << 31 | c);
            }
        }
        return Math.max(1, seen.size());
    }

    /** Distinct (level, cluster) pairs among the rows that have both. */
    static long pairs(int[] levels, int[] clusters) {
        Set<Long> seen = new HashSet<>();
        for (int r = 0; r < clusters.length; r++) {
            int l = levels == null ? 0 : levels[r];
            if (l >= 0 && clusters[r] >= 0) {
                seen.add((long) l << 32 | clusters[r]);
            }
        }
        return Math.max(1, seen.size());
    }
}
