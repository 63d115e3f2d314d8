package org.forkscape.web.explore;

import java.util.ArrayList;
import java.util.List;
import org.forkscape.plan.Factor;

/**
 * The left-to-right order of the curve: by estimate, or grouped by the levels of one factor (in level
 * order) and by estimate inside each group.
 *
 * @param ranks  the ranks in display order; position i on the curve shows rank {@code ranks[i]}
 * @param groups the groups, in order ({@code [0, n)} with an empty label when not grouped)
 */
public record DisplayOrder(int[] ranks, List<Group> groups) {

    /** Positions {@code [from, to)} of the curve showing one level of the grouping factor. */
    public record Group(String label, int from, int to) {
    }

    public static DisplayOrder byEstimate(int[] kept) {
        return new DisplayOrder(kept, List.of(new Group("", 0, kept.length)));
    }

    /** A stable counting sort of the kept ranks by their level of {@code factor}: one pass to count, one to place. */
    public static DisplayOrder groupedBy(RankedRun run, int[] kept, int factor) {
        Factor f = run.factors().get(factor);
        int[] level = run.levels(factor);
        int levels = f.levels().size();
        int[] start = new int[levels + 1];
        for (int k : kept) {
            start[level[k] + 1]++;
        }
        for (int l = 0; l < levels; l++) {
            start[l + 1] += start[l];
        }
        int[] next = start.clone();
        int[] out = new int[kept.length];
        for (int k : kept) {
            out[next[level[k]]++] = k;
        }
        List<Group> groups = new ArrayList<>();
        for (int l = 0; l < levels; l++) {
            if (start[l + 1] > start[l]) {
                groups.add(new Group(f.isControl() ? f.describe(l) : f.levels().get(l), start[l], start[l + 1]));
            }
        }
        return new DisplayOrder(out, List.copyOf(groups));
    }

    public int size() {
        return ranks.length;
    }
}
