package org.forkscape.web.explore;

import org.forkscape.plan.Factor;

/**
 * Applies a {@link Selection} to a ranked run: one sequential pass over the level column of each
 * restricted factor, then one pass collecting the ranks that stay. Callable without HTTP (the benchmark
 * times it on a million specifications).
 */
public final class SpecificationFilter {
    private SpecificationFilter() {
    }

    /** The ranks that stay, ascending (so their estimates are ascending too). */
    public static int[] keep(RankedRun run, Selection selection) {
        int n = run.size();
        boolean[] drop = new boolean[n];
        boolean any = false;
        for (Factor f : run.factors()) {
            if (!selection.restricts(f.id())) {
                continue;
            }
            any = true;
            boolean[] allowed = selection.allowedLevels(f.id());
            int[] level = run.levels(f.id());
            for (int k = 0; k < n; k++) {
                if (!allowed[level[k]]) {
                    drop[k] = true;
                }
            }
        }
        if (!any) {
            int[] all = new int[n];
            for (int k = 0; k < n; k++) {
                all[k] = k;
            }
            return all;
        }
        int m = 0;
        for (int k = 0; k < n; k++) {
            if (!drop[k]) {
                m++;
            }
        }
        int[] out = new int[m];
        m = 0;
        for (int k = 0; k < n; k++) {
            if (!drop[k]) {
                out[m++] = k;
            }
        }
        return out;
    }
}
