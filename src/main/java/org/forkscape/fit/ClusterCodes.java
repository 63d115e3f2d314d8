package org.forkscape.fit;

import java.util.HashMap;
import java.util.Map;

/** The code of each row of a variant in every cluster column an error type names (-1 where missing), and the number of clusters. */
final class ClusterCodes {
    /** Per cluster column name: one code per variant row. */
    final Map<String, int[]> codes = new HashMap<>();
    /** Per cluster column name: one more than the largest code among the variant's rows. */
    final Map<String, Integer> counts = new HashMap<>();

    /** The cluster codes at the table rows {@code rows}. */
    ClusterCodes(CompiledPlan plan, int[] rows) {
        for (CompiledPlan.ClusterColumn cluster : plan.clusterColumns) {
            int[] all = LevelCodes.of(cluster.column());
            int[] out = new int[rows.length];
            int max = -1;
            for (int i = 0; i < rows.length; i++) {
                out[i] = all[rows[i]];
                max = Math.max(max, out[i]);
            }
            codes.put(cluster.column().name(), out);
            counts.put(cluster.column().name(), max + 1);
        }
    }
}
