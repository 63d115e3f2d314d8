package org.forkscape.fit;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;

import java.util.Arrays;
import java.util.SplittableRandom;
import org.apache.commons.math3.linear.Array2DRowRealMatrix;
import org.apache.commons.math3.linear.RealMatrix;
import org.apache.commons.math3.linear.SingularValueDecomposition;
import org.junit.jupiter.api.Test;

/**
 * The dummies' leverages beside three and four crossed columns against Apache Commons Math 3.6.1: w_i d_i' G d_i
 * with G the pseudo-inverse of D'WD from its singular value decomposition ({@code getSolver().getInverse()}),
 * on invented designs with fixed seeds (random, a third column nested in the first or a function of the pair of
 * the others, two disconnected blocks, weighted and not, a subset of the rows); and their sum, the trace of the
 * dummies' hat matrix, against the dummies' rank.
 */
class SeveralDummyLeverageTest {
    /** Absolute, on values in [0, 1]: both are backward stable on these small, well-conditioned designs. */
    static final double ABSOLUTE = 1e-12;

    @Test
    void theLeveragesAreThoseOfThePseudoInverse() {
        SplittableRandom random = new SplittableRandom(31);
        for (int trial = 0; trial < 40; trial++) {
            int dims = 3 + trial % 2;
            int n = 15 + random.nextInt(40);
            int[][] raw = new int[dims][n];
            for (int i = 0; i < n; i++) {
                int block = trial % 3 == 0 ? random.nextInt(2) : 0;
                raw[0][i] = block * 10 + random.nextInt(8);
                raw[1][i] = block * 10 + random.nextInt(4);
                raw[2][i] = switch (trial % 4) {
                    case 0 -> raw[0][i] / 3;
                    case 1 -> (raw[0][i] + raw[1][i]) % 3;
                    default -> block * 10 + random.nextInt(3);
                };
                if (dims == 4) {
                    raw[3][i] = random.nextInt(3);
                }
            }
            double[] weight = trial % 2 == 0 ? null : random.doubles(n, 0.3, 3).toArray();
            check(raw, weight, "trial " + trial);
        }
    }

    private static void check(int[][] raw, double[] weight, String where) {
        int n = raw[0].length;
        // the set: every row but every fifth, as a specification with missing cells uses
        int[] rows = java.util.stream.IntStream.range(0, n).filter(i -> i % 5 != 2).toArray();
        int[] levels = new int[raw.length];
        int[][] codes = new int[raw.length][rows.length];
        for (int d = 0; d < raw.length; d++) {
            levels[d] = SeveralEffectsWithin.renumber(raw[d], 1 + Arrays.stream(raw[d]).max().orElse(0), rows, codes[d]);
        }
        SeveralDummyLeverage leverage = SeveralDummyLeverage.of(codes, levels, rows, weight, n);
        assertFalse(leverage.illConditioned(), where);
        int total = Arrays.stream(levels).sum();
        double[][] d = new double[rows.length][total];
        for (int i = 0; i < rows.length; i++) {
            int at = 0;
            for (int k = 0; k < codes.length; k++) {
                d[i][at + codes[k][i]] = 1;
                at += levels[k];
            }
        }
        RealMatrix dm = new Array2DRowRealMatrix(d, false);
        RealMatrix wd = dm.copy();
        for (int i = 0; i < rows.length; i++) {
            for (int j = 0; j < total; j++) {
                wd.multiplyEntry(i, j, weight == null ? 1 : weight[rows[i]]);
            }
        }
        RealMatrix pinv = new SingularValueDecomposition(dm.transpose().multiply(wd)).getSolver().getInverse();
        double trace = 0;
        for (int i = 0; i < rows.length; i++) {
            double h = dm.getRowVector(i).dotProduct(pinv.operate(dm.getRowVector(i)))
                    * (weight == null ? 1 : weight[rows[i]]);
            assertEquals(h, leverage.at(rows[i]), ABSOLUTE, where + ", row " + rows[i]
                    + ": Commons Math SVD pseudo-inverse of D'WD");
            trace += leverage.at(rows[i]);
        }
        // the hat matrix's trace is its rank (Davidson & MacKinnon 2004, section 2.6)
        assertEquals(ModularDummyRankTest.svdRank(codes, levels), trace, 1e-9, where + ": the leverages' sum");
    }
}
