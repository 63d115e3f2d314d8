package org.forkscape.fit;

/**
 * Picks how the sandwich meat of a specification is computed, from cost estimates in multiply-adds,
 * so that callers never choose kernels. The row pass costs about 3 n p per specification; the
 * fourth-moment route (HC0, HC1, no absorbed fixed effects) costs n C(P+3,4) once per variant plus
 * about (p+1)^2 p^2 / 4 per specification; the per-cluster route costs n P^2 / 2 once plus cells p^2.
 * A route that avoids the rows is also declined when the specification's numbers would cancel: the
 * moment expansions lose about log10((y'y / RSS) VIF_key) digits.
 */
final class SandwichRoute {
    /** Above this cancellation factor the moment routes could lose more than about four digits. */
    static final double MAX_CANCELLATION = 1e4;
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

    static boolean safe(Moments mom, KeySolution s, int y) {
        int stride = mom.variant.columns;
        int key = s.kept[s.p - 1];
        double vif = s.keyInverseDiagonal() * mom.within[key * stride + key];
        double cancellation = mom.within[y * stride + y] / s.rss * vif;
        return cancellation < MAX_CANCELLATION;
    }
}
