package org.forkscape.web.explore;

import java.util.List;
import org.forkscape.plan.Factor;

/**
 * How many specifications of a shown set use each alternative (each level of each factor; for an optional
 * control, level 1 is "with" and 0 "without"), so that the filter panel can say what is left after a
 * filter rather than what the run fitted. One pass over each factor's level column.
 */
public final class AlternativeCounts {
    private AlternativeCounts() {
    }

    /**
     * @param kept ranks of the shown specifications (as {@link SpecificationFilter#keep} returns them)
     * @return per factor id, per level, the number of kept specifications using it
     */
    public static int[][] of(RankedRun run, int[] kept) {
        List<Factor> factors = run.factors();
        int[][] counts = new int[factors.size()][];
        for (Factor f : factors) {
            int[] c = new int[f.levels().size()];
            for (int k : kept) {
                c[run.level(f.id(), k)]++;
            }
            counts[f.id()] = c;
        }
        return counts;
    }
}
