package org.forkscape.fit;

import java.util.LinkedHashMap;
import java.util.Map;

/**
 * A variant's rows grouped by the set of model variables missing in them (bit v of a mask for variable v),
 * groups numbered in order of first appearance: a specification's listwise sample is the union of the groups
 * complete on its variables.
 */
final class MissingPatterns {
    /** The group of each row. */
    final int[] group;
    /** Per group: bit v set when variable v is missing in the group's rows. */
    final long[] groupMissing;
    /** Variables missing in at least one row. */
    final long everMissing;

    /**
     * @param raw      the model columns over the variant's rows, NaN where missing
     * @param clusters the rows' cluster codes, -1 where missing
     */
    MissingPatterns(CompiledPlan plan, double[][] raw, ClusterCodes clusters, int rows) {
        long[] rowMissing = new long[rows];
        for (int j = 0; j < raw.length; j++) {
            long bit = 1L << plan.layout.variableOf(j);
            double[] x = raw[j];
            for (int i = 0; i < rows; i++) {
                if (Double.isNaN(x[i])) {
                    rowMissing[i] |= bit;
                }
            }
        }
        for (CompiledPlan.ClusterColumn cluster : plan.clusterColumns) {
            int[] codes = clusters.codes.get(cluster.column().name());
            for (int i = 0; i < rows; i++) {
                if (codes[i] < 0) {
                    rowMissing[i] |= cluster.bit();
                }
            }
        }
        Map<Long, Integer> patterns = new LinkedHashMap<>();
        group = new int[rows];
        long lastMask = 0;
        int lastGroup = -1;
        for (int i = 0; i < rows; i++) {
            // consecutive rows usually share a pattern: skip the map (and its boxing) for them
            if (lastGroup < 0 || rowMissing[i] != lastMask) {
                lastMask = rowMissing[i];
                lastGroup = patterns.computeIfAbsent(lastMask, p -> patterns.size());
            }
            group[i] = lastGroup;
        }
        groupMissing = new long[patterns.size()];
        patterns.forEach((mask, g) -> groupMissing[g] = mask);
        long any = 0;
        for (long mask : groupMissing) {
            any |= mask;
        }
        everMissing = any;
    }
}
