package org.forkscape.fit;

/**
 * The absorbed fixed-effect dummies' part of each row's leverage, d_i'(D'WD)^- d_i (times w_i when weighted),
 * for one set of usable rows beside two or more absorbed columns; the row passes add the demeaned columns' part
 * (Frisch-Waugh-Lovell: the hat matrix is P_D + P_{M_D X}). Immutable once built; safe for concurrent reads.
 */
interface DummyLeverage {
    /** The dummies' part of the leverage of {@code row}, a variant row of the set. */
    double at(int row);

    /** Whether the dummies' cross-products were too poorly conditioned to factor: no leverages then. */
    boolean illConditioned();
}
