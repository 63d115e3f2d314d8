package org.forkscape.fit;

import java.util.ArrayList;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import org.forkscape.data.Table;
import org.forkscape.plan.ErrorType;

/**
 * The one-way clusterings whose signed sum is a cluster error type's variance. Multi-way clustering on
 * columns c_1..c_m is V = sum over the non-empty subsets S of (-1)^(|S|+1) V_S, where V_S is the one-way
 * cluster-robust variance on the intersection of the columns in S (a cluster of S is one combination of
 * their values), each with its own G_S/(G_S - 1) and the (N - 1)/(N - K) factor (Cameron, Gelbach &amp;
 * Miller 2011, "Robust inference with multiway clustering", Journal of Business &amp; Economic Statistics
 * 29(2), eq. 2.13 and its m-way form); two-way is V_a + V_b - V_ab. One-way clustering is its own single
 * component. A component over one column is keyed by the column's name, so one-way error types on that
 * column share its codes and cells; an intersection by the names joined with {@link #JOIN}, the unit
 * separator, which a typed column name does not hold.
 */
public final class ClusterComponents {
    /** Joins the column names of an intersection in its key. */
    static final String JOIN = "\u001f";

    /**
     * One one-way clustering of the sum.
     *
     * @param key     the name its codes are kept under in a data variant
     * @param columns the columns it intersects, in the order the error type names them
     * @param sign    +1 or -1
     */
    public record Component(String key, List<String> columns, int sign) {
        /** The error type that clusters one way on this component's codes. */
        ErrorType oneWay() {
            return ErrorType.cluster(key);
        }
    }

    private ClusterComponents() {
    }

    /**
     * The components of a cluster error type, in a fixed order (subsets by their bit mask over the columns
     * as written), so that the signed sum is added in the same order on every thread.
     */
    public static List<Component> of(ErrorType type) {
        List<String> columns = type.clusterColumns();
        int m = columns.size();
        List<Component> out = new ArrayList<>();
        for (int subset = 1; subset < 1 << m; subset++) {
            List<String> in = new ArrayList<>();
            for (int c = 0; c < m; c++) {
                if ((subset & 1 << c) != 0) {
                    in.add(columns.get(c));
                }
            }
            out.add(new Component(String.join(JOIN, in), List.copyOf(in), Integer.bitCount(subset) % 2 == 1 ? 1 : -1));
        }
        return List.copyOf(out);
    }

    /**
     * The cluster code of every table row in the intersection of {@code columns}: one code per combination
     * of their values, numbered in order of first appearance; -1 where any of them is missing.
     */
    public static int[] codes(Table table, List<String> columns) {
        int[] codes = LevelCodes.of(table.column(columns.get(0)));
        for (int c = 1; c < columns.size(); c++) {
            int[] next = LevelCodes.of(table.column(columns.get(c)));
            Map<Long, Integer> pairs = new HashMap<>();
            int[] joined = new int[codes.length];
            for (int r = 0; r < codes.length; r++) {
                if (codes[r] < 0 || next[r] < 0) {
                    joined[r] = -1;
                } else {
                    joined[r] = pairs.computeIfAbsent(((long) codes[r] << 32) | next[r], k -> pairs.size());
                }
            }
            codes = joined;
        }
        return codes;
    }
}
