package org.forkscape.fit;

import java.io.Serializable;
import java.util.HashMap;
import java.util.Map;
import org.forkscape.data.CategoricalColumn;
import org.forkscape.data.Column;
import org.forkscape.data.NumericColumn;
import org.forkscape.data.Table;

/**
 * Whether every cluster of an error cluster column lies within one unit that a bootstrap draw resamples
 * (classes within schools, say), found from parts: each part maps its clusters, by value, to their rows' unit
 * ({@link BootstrapDesign#unitKeys}), and two parts' maps merge; a cluster met in two units is split. Only then
 * is each drawn copy of a unit a copy of its clusters too, which become new clusters (one machine's rule,
 * {@link ResampledVariant}). Rows missing the column belong to no cluster. Not thread safe; {@link #merge}
 * modifies its first argument.
 */
public final class ClusterNesting implements Serializable {
    private static final long serialVersionUID = 1L;

    /** Per cluster (its value's key, or for an intersection the list of its columns' keys): its unit. */
    private final HashMap<Object, Long> unitOf = new HashMap<>();
    private boolean split;

    private ClusterNesting() {
    }

    /** One part's clusters of {@code column} and the units their rows are in. */
    static ClusterNesting of(Table part, long[] rowKeys, String column, BootstrapDesign design) {
        return of(part, rowKeys, java.util.List.of(column), design);
    }

    /**
     * One part's clusters of the intersection of {@code columns} (one cluster per combination of their values;
     * a single column is its own intersection) and the units their rows are in. Rows missing any of the
     * columns belong to no cluster.
     */
    static ClusterNesting of(Table part, long[] rowKeys, java.util.List<String> columns, BootstrapDesign design) {
        ClusterNesting n = new ClusterNesting();
        long[] units = design.unitKeys(part, rowKeys);
        long[][] keys = new long[columns.size()][];
        boolean[][] present = new boolean[columns.size()][];
        for (int j = 0; j < keys.length; j++) {
            Column c = part.column(columns.get(j));
            keys[j] = new long[part.rowCount()];
            present[j] = new boolean[part.rowCount()];
            if (c instanceof CategoricalColumn cat) {
                long[] levelKey = new long[cat.levels().size()];
                for (int l = 0; l < levelKey.length; l++) {
                    levelKey[l] = PoissonCounts.textKey(cat.levels().get(l));
                }
                int[] codes = cat.codes();
                for (int r = 0; r < codes.length; r++) {
                    present[j][r] = codes[r] >= 0;
                    keys[j][r] = codes[r] >= 0 ? levelKey[codes[r]] : 0;
                }
            } else {
                double[] x = ((NumericColumn) c).values();
                for (int r = 0; r < x.length; r++) {
                    present[j][r] = !Double.isNaN(x[r]);
                    keys[j][r] = present[j][r] ? PoissonCounts.numberKey(x[r]) : 0;
                }
            }
        }
        for (int r = 0; r < part.rowCount() && !n.split; r++) {
            boolean complete = true;
            for (boolean[] p : present) {
                complete &= p[r];
            }
            if (!complete) {
                continue;
            }
            if (keys.length == 1) {
                n.place(keys[0][r], units[r]);
            } else {
                java.util.List<Long> combination = new java.util.ArrayList<>(keys.length);
                for (long[] k : keys) {
                    combination.add(k[r]);
                }
                n.place(combination, units[r]);
            }
        }
        return n;
    }

    private void place(Object cluster, long unit) {
        Long before = unitOf.putIfAbsent(cluster, unit);
        if (before != null && before != unit) {
            split = true;
        }
    }

    /** Two parts' clusters as one ({@code a} modified and returned). */
    static ClusterNesting merge(ClusterNesting a, ClusterNesting b) {
        a.split |= b.split;
        for (Map.Entry<Object, Long> e : b.unitOf.entrySet()) {
            if (a.split) {
                break;
            }
            a.place(e.getKey(), e.getValue());
        }
        return a;
    }

    /** Whether every cluster lies within one resampled unit. */
    boolean nested() {
        return !split;
    }
}
