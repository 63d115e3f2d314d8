package org.forkscape.fit;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.SplittableRandom;
import org.apache.commons.math3.linear.Array2DRowRealMatrix;
import org.apache.commons.math3.linear.RealMatrix;
import org.apache.commons.math3.linear.SingularValueDecomposition;
import org.junit.jupiter.api.Test;

/**
 * The crossed dummies' leverages against Apache Commons Math 3.6.1: w_i d_i' G d_i with G the pseudo-inverse of
 * D'WD by its singular value decomposition (a generalised inverse, so the same value as any other; d_i in the
 * row space of D), D the explicit dummies of both columns over the set's rows. Designs are invented with fixed
 * seeds: unbalanced, with singleton levels, disconnected groups of levels, either column the one with fewer
 * levels, weighted and not, and a set that leaves some rows (and levels) out.
 */
class CrossedDummyLeverageTest {
    /**
     * Agreement with the SVD's pseudo-inverse, absolute on values in [0, 1]: both are backward stable on these
     * small, well-conditioned designs (measured below 1e-14); the bound leaves room for the SVD's own rounding.
     */
    static final double ABSOLUTE = 1e-12;

    @Test
    void unweightedLeveragesAreThoseOfTheExplicitDummies() {
        for (int groups = 1; groups <= 3; groups++) {
            TwoWayDesign d = TwoWayDesign.of(300 + groups, groups, 25, 7, 0.7);
            check(d, null, all(d.n()), "units over periods, " + groups + " group(s)");
        }
    }

    /** More periods than units: the Schur complement is then on the units, the first column. */
    @Test
    void eitherColumnMayBeTheOneWithFewerLevels() {
        TwoWayDesign d = TwoWayDesign.of(41, 2, 6, 15, 0.6);
        check(d, null, all(d.n()), "periods over units");
        check(d, weights(d.n(), 42), all(d.n()), "periods over units, weighted");
    }

    @Test
    void weightedLeveragesAreThoseOfTheWeightedDummies() {
        for (int groups = 1; groups <= 2; groups++) {
            TwoWayDesign d = TwoWayDesign.of(500 + groups, groups, 20, 6, 0.8);
            check(d, weights(d.n(), 600 + groups), all(d.n()), "weighted, " + groups + " group(s)");
        }
    }

    /** A set of the rows: the levels only the left-out rows hold are not among the dummies. */
    @Test
    void aSetOfTheRowsHasTheLeveragesOfItsOwnDummies() {
        TwoWayDesign d = TwoWayDesign.of(71, 2, 15, 6, 0.75);
        SplittableRandom random = new SplittableRandom(72);
        int[] rows = java.util.stream.IntStream.range(0, d.n()).filter(i -> d.unit()[i] != 3 && random.nextDouble() < 0.85)
                .toArray();
        check(d, null, rows, "a set of the rows");
        check(d, weights(d.n(), 73), rows, "a set of the rows, weighted");
    }

    /** A thinly connected chain (each unit shares one period with the next): every row is a bridge, leverage 1. */
    @Test
    void aChainOfBridgesHasLeverageOne() {
        TwoWayDesign d = TwoWayDesign.chain(30);
        check(d, null, all(d.n()), "chain");
        CrossedDummyLeverage leverage = of(d, null, all(d.n()));
        for (int i = 0; i < d.n(); i++) {
            assertEquals(1, leverage.at(i), 1e-12, "row " + i + " of the chain, a bridge of the level graph");
        }
    }

    /**
     * A singleton unit's row is fitted by its own dummy: leverage exactly 1 unweighted, w (1/w) weighted (1 to
     * the last bit or two), far inside the 1 - 1e-10 at which HC2 and HC3 are undefined.
     */
    @Test
    void aSingletonsLeverageIsExactlyOne() {
        TwoWayDesign d = TwoWayDesign.of(81, 2, 10, 5, 0.8);
        int singleton = d.n() - 1;
        assertEquals(1.0, of(d, null, all(d.n())).at(singleton), "unweighted singleton");
        double[] w = weights(d.n(), 82);
        assertEquals(1.0, of(d, w, all(d.n())).at(singleton), 4e-16, "weighted singleton");
        assertTrue(of(d, w, all(d.n())).at(singleton) > KeyCoefficientSandwich.LEVERAGE_ONE, "weighted singleton");
    }

    /**
     * Two groups joined only by two rows of weight 1e-13: the Schur complement is positive definite in exact
     * arithmetic but its scaled condition number is about 1e13, beyond what the factorisation keeps digits
     * for, so the leverages are refused rather than guessed.
     */
    @Test
    void almostDisconnectedGroupsAreRefused() {
        TwoWayDesign d = TwoWayDesign.of(91, 2, 10, 4, 0.9);
        int n = d.n();
        int[] unit = java.util.Arrays.copyOf(d.unit(), n + 2);
        int[] period = java.util.Arrays.copyOf(d.period(), n + 2);
        unit[n] = 0;
        period[n] = 5;
        unit[n + 1] = 1;
        period[n + 1] = 6;
        TwoWayDesign joined = new TwoWayDesign(unit, d.units(), period, d.periods());
        double[] w = new double[n + 2];
        java.util.Arrays.fill(w, 1);
        w[n] = 1e-13;
        w[n + 1] = 1e-13;
        assertTrue(of(joined, w, all(n + 2)).illConditioned, "rows of weight 1e-13 joining the groups");
        w[n] = 1e-3;
        w[n + 1] = 1e-3;
        assertFalse(of(joined, w, all(n + 2)).illConditioned, "rows of weight 1e-3 joining the groups");
        // the weak join raises the condition number of D'WD on its range from 77 to 5.2e4 (Commons Math's singular
        // values, measured), and both computations lose about that factor more: 1e-10 here (measured 2.5e-12)
        check(joined, w, all(n + 2), "joined by rows of weight 1e-3", 1e-10);
    }

    private static CrossedDummyLeverage of(TwoWayDesign d, double[] w, int[] rows) {
        return CrossedDummyLeverage.of(d.unit(), d.units(), d.period(), d.periods(), w, rows);
    }

    private static void check(TwoWayDesign d, double[] w, int[] rows, String where) {
        check(d, w, rows, where, ABSOLUTE);
    }

    private static void check(TwoWayDesign d, double[] w, int[] rows, String where, double tolerance) {
        CrossedDummyLeverage leverage = of(d, w, rows);
        assertFalse(leverage.illConditioned, where);
        // Commons Math: G = pinv(D'WD) over the set's rows, h_i = w_i d_i' G d_i
        int levels = d.units() + d.periods();
        RealMatrix dwd = new Array2DRowRealMatrix(levels, levels);
        for (int r : rows) {
            double wr = w == null ? 1 : w[r];
            int a = d.unit()[r];
            int b = d.units() + d.period()[r];
            dwd.addToEntry(a, a, wr);
            dwd.addToEntry(b, b, wr);
            dwd.addToEntry(a, b, wr);
            dwd.addToEntry(b, a, wr);
        }
        RealMatrix g = new SingularValueDecomposition(dwd).getSolver().getInverse();
        double worst = 0;
        for (int r : rows) {
            int a = d.unit()[r];
            int b = d.units() + d.period()[r];
            double expected = (w == null ? 1 : w[r]) * (g.getEntry(a, a) + 2 * g.getEntry(a, b) + g.getEntry(b, b));
            worst = Math.max(worst, Math.abs(leverage.at(r) - expected));
        }
        assertTrue(worst <= tolerance, where + ": largest difference " + worst + " from Commons Math's SVD "
                + "pseudo-inverse of D'WD");
        // the leverages of a projection sum to its rank (textbook: the trace of an idempotent matrix), here the
        // dummies' rank by connected components
        double trace = 0;
        for (int r : rows) {
            trace += leverage.at(r);
        }
        int[] unit = new int[rows.length];
        int[] period = new int[rows.length];
        for (int i = 0; i < rows.length; i++) {
            unit[i] = d.unit()[rows[i]];
            period[i] = d.period()[rows[i]];
        }
        assertEquals(FixedEffectRank.ofTwo(unit, d.units(), period, d.periods()), trace, 1e-9, where + ": the leverages' sum");
    }

    private static int[] all(int n) {
        return java.util.stream.IntStream.range(0, n).toArray();
    }

    private static double[] weights(int n, long seed) {
        SplittableRandom random = new SplittableRandom(seed);
        double[] w = new double[n];
        for (int i = 0; i < n; i++) {
            w[i] = 0.2 + 3 * random.nextDouble();
        }
        return w;
    }
}
