package org.forkscape.fit;

import java.util.BitSet;

/**
 * Which rows of a data variant a specification uses, as the set of missing-pattern groups complete on
 * its variables. Every group holds at least one row, so two specifications of one variant use exactly
 * the same rows when, and only when, these sets are equal.
 */
public final class UsableRows {
    private UsableRows() {
    }

    /** The usable groups for the variables in {@code variableMask} (bit v = model variable v). */
    public static BitSet groups(DataVariant variant, long variableMask) {
        long[] missing = variant.groupMissing;
        BitSet usable = new BitSet(missing.length);
        for (int g = 0; g < missing.length; g++) {
            if ((missing[g] & variableMask) == 0) {
                usable.set(g);
            }
        }
        return usable;
    }
}
