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

    private final HashMap<Long, Long> unitOf = new HashMap<>();
    private boolean split;

    private ClusterNesting() {
    }

    /** One part's clusters of {@code column} and the units their rows are in. */
    static ClusterNesting of(Table part, long[] rowKeys, String column, BootstrapDesign design) {
        ClusterNesting n = new ClusterNesting();
        long[] units = design.unitKeys(part, rowKeys);
        Column c = part.column(column);
        if (c instanceof CategoricalColumn cat) {
            long[] levelKey = new long[cat.levels().size()];
            for (int l = 0; l < levelKey.length; l++) {
                levelKey[l] = PoissonCounts.textKey(cat.levels().get(l));
            }
            int[] codes = cat.codes();
            for (int r = 0; r < codes.length && !n.split; r++) {
                if (codes[r] >= 0) {
                    n.place(levelKey[codes[r]], units[r]);
                }
            }
        } else {
            double[] x = ((NumericColumn) c).values();
            for (int r = 0; r < x.length && !n.split; r++) {
                if (!Double.isNaN(x[r])) {
                    n.place(PoissonCounts.numberKey(x[r]), units[r]);
                }
            }
        }
        return n;
    }

    private void place(long cluster, long unit) {
        Long before = unitOf.putIfAbsent(cluster, unit);
        if (before != null && before != unit) {
            split = true;
        }
    }

    /** Two parts' clusters as one ({@code a} modified and returned). */
    static ClusterNesting merge(ClusterNesting a, ClusterNesting b) {
        a.split |= b.split;
        for (Map.Entry<Long, Long> e : b.unitOf.entrySet()) {
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
