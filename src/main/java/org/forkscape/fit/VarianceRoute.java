package org.forkscape.fit;

/**
 * How the key coefficient's variance of one specification was computed, so that a run can say which
 * routes it took and a test can hold each route to exact arithmetic knowing that it was taken.
 */
public enum VarianceRoute {
    /** s^2 (X'X)^-1 from the solve alone. */
    CLASSICAL,
    /** One pass over the specification's rows ({@link KeyCoefficientSandwich}). */
    ROW_PASS,
    /** HC0 or HC1 from the variant's moments up to order four ({@link FourthMoments}). */
    FOURTH_MOMENTS,
    /** CR1 from per-cluster cross-products ({@link ClusterMoments}). */
    CLUSTER_CELLS,
    /** No variance: the specification was not fitted, or the run was read back from its files. */
    NONE
}
