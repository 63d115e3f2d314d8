package org.forkscape.fit;

/**
 * Picks how the sandwich meat of a specification is computed, from cost estimates in multiply-adds,
 * so that callers never choose kernels. The row pass costs about 3 n p per specification; the
 * fourth-moment route (HC0, HC1, with none or two absorbed columns) costs n C(P+3,4) once per variant (per
 * usable set beside two absorbed columns) plus
 * about (p+1)^2 p^2 / 4 per specification; the per-cluster route costs n P^2 / 2 once plus cells p^2.
 *
 * <p>A route that avoids the rows is declined whenever its result could lose digits. Both routes compute
 * a sum of products of stored sums: every rounding error, in forming those sums and in contracting them,
 * is at most a small multiple of the unit roundoff times the same sum taken over absolute values
 * (Higham, Accuracy and Stability of Numerical Algorithms, 2nd ed., 2002, section 3.1, the bound for sums
 * of products). {@link RowFreeSandwich} bounds that absolute sum from the stored moments alone, by the
 * Cauchy-Schwarz inequality over scaled coordinates, and the ratio of the bound to the meat is the
 * amplification of rounding error. Near-collinear controls make it large (the key row of the inverse
 * and the residual's coefficients grow with opposite signs on the near-copies), as do a well explained
 * outcome and badly scaled columns; the ratio sees all of them, the key's variance inflation alone does
 * not.
 *
 * <p>Beside two absorbed columns the rows of each usable set are explicit (its demeaned rows, offsets 0), so
 * both structures are summed from them per set, weighted or not: with each row scaled by sqrt(w), the plain
 * sums are those weighted least squares needs (HC0: sum w^2 e^2 u^2; CR1: per cluster sum w e u). A cluster
 * column with one row per cluster there takes the fourth moments, its CR1 meat being the HC0 meat. With
 * none or one absorbed column a weighted variant's per-cluster cells hold weighted sums (sum w z z', sum w z
 * and the weight total), whose score is sum w e u, and without absorbed columns its fourth moments are
 * weighted by w^2 at every order (the HC0 meat sum w^2 e^2 u^2).
 */
final class SandwichRoute {
    /**
     * Largest accepted ratio of the absolute-value bound to the meat. With unit roundoff 1.1e-16 the
     * rounding error is then about 1e-10 relative or less: the errors of the blocked sums grow with the
     * square root of their length rather than the length (Higham &amp; Mary 2019, "A new approach to
     * probabilistic rounding error analysis", SIAM Journal on Scientific Computing 41(5)), and the
     * Cauchy-Schwarz bound itself exceeds the absolute sum several times over. Measured on the
     * near-copy sweeps of the tests: the accepted specifications are within 1e-11 of exact arithmetic.
     */
    static final double MAX_AMPLIFICATION = 1e6;
    /** Memory bound for the per-group fourth-moment tensors, in doubles (256 MiB). */
    static final long MAX_TENSOR_DOUBLES = 1L << 25;

    private SandwichRoute() {
    }

    static boolean fourthMomentsPay(DataVariant v, long specifications, double meanColumns) {
        return !v.absorbs && fourthMomentsPay(v.rows, v.columns, v.groupMissing.length, specifications, meanColumns);
    }

    /**
     * The same choice from the sizes alone (a variant without absorbed fixed effects), so that a run's
     * memory can be estimated before any variant is built.
     */
    static boolean fourthMomentsPay(int rows, int columns, int groups, long specifications, double meanColumns) {
        if (specifications <= 0) {
            return false;
        }
        long perGroup = FourthMoments.distinctFourth(columns) + FourthMoments.distinctThird(columns);
        if (perGroup * groups > MAX_TENSOR_DOUBLES) {
            return false;
        }
        double p = meanColumns;
        double build = (double) rows * FourthMoments.distinctFourth(columns);
        double contract = (p + 1) * (p + 1) * p * p / 4 + (double) columns * columns * columns * columns / 24;
        double rowPass = 3.0 * rows * p;
        return build + specifications * contract < specifications * rowPass;
    }

    /**
     * Whether the fourth moments of each usable set's explicit rows pay beside two absorbed columns: the
     * same costs, the tensor built from the set's rows (one group), weighted or not.
     */
    static boolean withinFourthMomentsPay(int rows, int columns, long specifications, double meanColumns) {
        return fourthMomentsPay(rows, columns, 1, specifications, meanColumns);
    }

    /**
     * Whether per-cluster cells of each usable set's explicit rows pay beside two absorbed columns (one
     * level), weighted or not, and fit in {@link #MAX_TENSOR_DOUBLES}: every cluster keeps P(P+1)/2 doubles.
     */
    static boolean withinClusterMomentsPay(int rows, int columns, long specifications, double meanColumns,
            int clusters) {
        if ((long) clusters * columns * (columns + 1) / 2 > MAX_TENSOR_DOUBLES) {
            return false;
        }
        return clusterMomentsPay(rows, columns, 1, specifications, meanColumns, clusters);
    }

    static boolean clusterMomentsPay(DataVariant v, long specifications, double meanColumns, int clusters) {
        return clusterMomentsPay(v.rows, v.columns, v.levels, specifications, meanColumns, clusters);
    }

    /** The same choice from the sizes alone. */
    static boolean clusterMomentsPay(int rows, int columns, int levels, long specifications, double meanColumns,
            int clusters) {
        if (specifications <= 0) {
            return false;
        }
        double p = meanColumns;
        double cells = Math.min((double) rows, (double) clusters * levels);
        double build = ClusterMoments.buildCost(rows, columns);
        return build + specifications * cells * (p + 1) * p < specifications * 3.0 * rows * p;
    }
}
