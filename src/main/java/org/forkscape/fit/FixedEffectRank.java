package org.forkscape.fit;

/**
 * The rank of the dummies of several crossed fixed-effect dimensions over a set of rows. For two: the levels of both
 * present in the rows, less one per connected component of the bipartite graph whose vertices are the
 * levels and whose edges are the rows (a row joins its level of one dimension to its level of the other).
 * Within a component the two sets of dummies both sum to the component's indicator, which is the one linear
 * dependency there; components share no rows, so each loses exactly one (Abowd, Creecy &amp; Kramarz 2002,
 * "Computing person and firm effects using linked longitudinal employer-employee data", U.S. Census Bureau
 * technical paper TP-2002-06). Components are counted with union-find, by rank-free union and path halving
 * (Tarjan 1975, "Efficiency of a good but not linear set union algorithm", Journal of the ACM 22(2)). For
 * three or more no such count holds (a third dimension can be nested in, or collinear with, combinations of the
 * others), and the rank is computed exactly over the rationals and certified by {@link ModularDummyRank}.
 */
final class FixedEffectRank {
    private FixedEffectRank() {
    }

    /**
     * The rank of the dummies of {@code codes.length} dimensions, or empty when it could not be certified (three
     * or more dimensions only; see {@link ModularDummyRank}).
     *
     * @param codes  per dimension, the dense level (0..levels-1) of each row, not modified
     * @param levels per dimension, its levels, each present in some row
     */
    static java.util.OptionalInt of(int[][] codes, int[] levels) {
        if (codes[0].length == 0) {
            return java.util.OptionalInt.of(0);
        }
        return switch (codes.length) {
            case 1 -> java.util.OptionalInt.of(levels[0]);
            case 2 -> java.util.OptionalInt.of(ofTwo(codes[0], levels[0], codes[1], levels[1]));
            default -> new ModularDummyRank(codes, levels).rank();
        };
    }

    /**
     * @param first   the first dimension's level of each row (dense, 0..firstLevels-1), not modified
     * @param second  the second dimension's level of each row, not modified
     * @return the rank: levels present in the first plus in the second, minus the components
     */
    static int ofTwo(int[] first, int firstLevels, int[] second, int secondLevels) {
        int[] parent = new int[firstLevels + secondLevels];
        boolean[] present = new boolean[parent.length];
        for (int v = 0; v < parent.length; v++) {
            parent[v] = v;
        }
        for (int i = 0; i < first.length; i++) {
            int a = first[i];
            int b = firstLevels + second[i];
            present[a] = true;
            present[b] = true;
            int ra = root(parent, a);
            int rb = root(parent, b);
            if (ra != rb) {
                parent[Math.max(ra, rb)] = Math.min(ra, rb);
            }
        }
        int levels = 0;
        int components = 0;
        for (int v = 0; v < parent.length; v++) {
            if (present[v]) {
                levels++;
                if (root(parent, v) == v) {
                    components++;
                }
            }
        }
        return levels - components;
    }

    /** The root of v's set, halving the path on the way (parent modified). */
    static int root(int[] parent, int v) {
        while (parent[v] != v) {
            parent[v] = parent[parent[v]];
            v = parent[v];
        }
        return v;
    }
}
