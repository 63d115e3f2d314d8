package org.forkscape.web.explore;

/**
 * Where a specification sits on the curve as shown, so that a specification named elsewhere on the page
 * (the smallest p, the ends of the extreme bounds) can be selected in the curve and the grid.
 */
public final class SpecificationPosition {
    private SpecificationPosition() {
    }

    /**
     * @param index the specification's index (0-based; specifications.csv numbers it index + 1)
     * @return its position in the display order, or -1 when the shown set does not hold it
     */
    public static int of(RankedRun run, DisplayOrder order, long index) {
        int[] ranks = order.ranks();
        for (int p = 0; p < ranks.length; p++) {
            if (run.run().results().specIndex(run.slot(ranks[p])) == index) {
                return p;
            }
        }
        return -1;
    }
}
