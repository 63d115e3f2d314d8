package org.forkscape.fit;

import java.util.HashMap;
import java.util.Map;

/**
 * The code of each row of a variant in every cluster column an error type names and in every intersection
 * of columns a multi-way error type needs ({@link ClusterComponents}; -1 where missing), and the number of
 * clusters.
 */
final class ClusterCodes {
    /** Per cluster column name: one code per variant row. */
    final Map<String, int[]> codes = new HashMap<>();
    /** Per cluster column name: one more than the largest code among the variant's rows. */
    final Map<String, Integer> counts = new HashMap<>();

    /**
     * The cluster codes at the table rows {@code rows}; a numeric cluster column is coded among its values
     * over the whole table when {@code whole} gives them.
     */
    ClusterCodes(CompiledPlan plan, int[] rows, WholeRows whole) {
        for (CompiledPlan.ClusterColumn cluster : plan.clusterColumns) {
            String name = cluster.column().name();
            put(name, LevelCodes.of(cluster.column(), whole.groupingValues(name)), rows);
        }
        for (ClusterComponents.Component intersection : plan.clusterIntersections) {
            put(intersection.key(), ClusterComponents.codes(plan.table, intersection.columns()), rows);
        }
    }

    private void put(String key, int[] all, int[] rows) {
        int[] out = new int[rows.length];
        int max = -1;
        for (int i = 0; i < rows.length; i++) {
            out[i] = all[rows[i]];
            max = Math.max(max, out[i]);
        }
        codes.put(key, out);
        counts.put(key, max + 1);
    }
}
