package org.forkscape.fit;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.SplittableRandom;
import org.apache.commons.math3.linear.ArrayRealVector;
import org.apache.commons.math3.linear.RealMatrix;
import org.apache.commons.math3.linear.RealVector;
import org.apache.commons.math3.linear.SingularValueDecomposition;
import org.junit.jupiter.api.Test;

/**
 * The two-way within transformation and the dummies' rank against Apache Commons Math 3.6.1: the residual of
 * the least-squares fit on the explicit dummy matrix by its singular value decomposition (the minimum-norm
 * solution, which exists for the rank-deficient dummies), and that decomposition's numerical rank. Designs are
 * invented with fixed seeds: unbalanced, with singleton levels, and with disconnected groups of levels.
 */
class AlternatingProjectionsTest {
    /** The stated accuracy of the demeaned columns: 1e-12 relative to the column's norm about its mean. */
    static final double RELATIVE = 1e-12;

    @Test
    void theDemeanedColumnIsTheResidualOnTheExplicitDummies() {
        for (int groups = 1; groups <= 3; groups++) {
            TwoWayDesign design = TwoWayDesign.of(1000 + groups, groups, 25, 7, 0.75);
            double[] x = column(design, 7 * groups, false);
            double[] weights = null;
            check(design, x, weights, "groups " + groups);
        }
    }

    @Test
    void weightedLevelMeansGiveTheWeightedResidual() {
        TwoWayDesign design = TwoWayDesign.of(77, 2, 20, 6, 0.8);
        SplittableRandom random = new SplittableRandom(78);
        double[] weights = new double[design.n()];
        for (int i = 0; i < weights.length; i++) {
            weights[i] = 0.2 + 3 * random.nextDouble();
        }
        check(design, column(design, 79, true), weights, "weighted");
    }

    /** The rank by connected components equals the numerical rank of the explicit dummies. */
    @Test
    void theRankLosesOneLevelPerConnectedComponent() {
        for (int groups = 1; groups <= 4; groups++) {
            TwoWayDesign design = TwoWayDesign.of(2000 + groups, groups, 12, 5, 0.6);
            int rank = new SingularValueDecomposition(design.dummies()).getRank();
            assertEquals(rank, FixedEffectRank.ofTwo(design.unit(), design.units(), design.period(), design.periods()),
                    "rank with " + groups + " components, Commons Math SingularValueDecomposition.getRank");
            // the blocks share no levels, so at least one level is lost per block (more where a block splits)
            assertTrue(rank <= design.units() + design.periods() - groups, "rank " + rank + " with " + groups
                    + " disconnected blocks");
        }
    }

    /** A thinly connected chain (each unit shares one period with the next) still converges, and accurately. */
    @Test
    void aThinlyConnectedChainConverges() {
        TwoWayDesign design = TwoWayDesign.chain(60);
        check(design, column(design, 5, false), null, "chain");
    }

    private static double[] column(TwoWayDesign design, long seed, boolean withEffects) {
        SplittableRandom random = new SplittableRandom(seed);
        double[] unitEffect = random.doubles(design.units()).toArray();
        double[] x = new double[design.n()];
        for (int i = 0; i < x.length; i++) {
            x[i] = 100 + random.nextGaussian() + (withEffects ? 5 * unitEffect[design.unit()[i]] : 0) + design.period()[i];
        }
        return x;
    }

    private static void check(TwoWayDesign design, double[] x, double[] weights, String where) {
        int n = design.n();
        double mean = 0;
        for (double v : x) {
            mean += v;
        }
        mean /= n;
        double[] centred = new double[n];
        double norm = 0;
        for (int i = 0; i < n; i++) {
            centred[i] = x[i] - mean;
            norm += (weights == null ? 1 : weights[i]) * centred[i] * centred[i];
        }
        norm = Math.sqrt(norm);
        // Commons Math: min ||sqrt(W) (x - D b)|| by SVD, residual x - D b
        RealMatrix d = design.dummies();
        RealMatrix scaled = d.copy();
        RealVector target = new ArrayRealVector(x);
        if (weights != null) {
            for (int i = 0; i < n; i++) {
                double s = Math.sqrt(weights[i]);
                scaled.setRow(i, d.getRowVector(i).mapMultiply(s).toArray());
                target.setEntry(i, x[i] * s);
            }
        }
        RealVector b = new SingularValueDecomposition(scaled).getSolver().solve(target);
        RealVector expected = new ArrayRealVector(x).subtract(d.operate(b));

        AlternatingProjections projections = new AlternatingProjections(new int[][] {design.unit(), design.period()},
                new int[] {design.units(), design.periods()}, weights);
        double[] demeaned = centred.clone();
        assertTrue(projections.demean(demeaned), where + ": converged");
        assertTrue(projections.iterations > 0, where + ": the projections iterated");
        double worst = 0;
        for (int i = 0; i < n; i++) {
            worst = Math.max(worst, Math.abs(demeaned[i] - expected.getEntry(i)));
        }
        assertTrue(worst <= RELATIVE * norm, where + ": largest difference " + worst + " from Commons Math's SVD "
                + "residual, against " + RELATIVE + " x " + norm);
    }
}
