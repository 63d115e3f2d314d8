package org.forkscape.fit;

import org.forkscape.data.Column;

/** Integer codes of a grouping column for callers outside the engine, such as the cluster bootstrap. */
public final class GroupingCodes {
    private GroupingCodes() {
    }

    /** One code per table row, 0..levels-1 in sorted order of the values, -1 where missing. */
    public static int[] of(Column column) {
        return LevelCodes.of(column);
    }
}
