package org.forkscape.fit;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;

import java.math.BigDecimal;
import java.math.MathContext;
import java.util.SplittableRandom;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.CsvSource;

/**
 * The tensor sums of one block of rows ({@link FourthMoments#block}), unweighted, with square-root weights
 * on the values and with squared weights on the products: against the same sums in exact decimal arithmetic
 * of the same doubles (BigDecimal products are exact, and the sums are rounded once at the end), within a
 * few units of the sums' absolute values' rounding (1e-14 relative to the sum of absolute products, a
 * bound on the error of summation in double of up to 2,048 terms at common practice's n eps / (1 - n eps));
 * and bit for bit against the order the kernel documents (each sum adds its rows one after the other,
 * products formed as ((z_i z_j) z_k) z_l), so that a change of that order, which would change a run's
 * last digits, does not go unnoticed. Row counts not a multiple of four and a null (all-zero) column included.
 */
class FourthMomentsBlockTest {
    @ParameterizedTest(name = "{0} columns, {1} rows, {2}")
    @CsvSource({"1, 1, none", "3, 7, none", "5, 1025, none", "12, 101, none", "6, 333, root", "6, 333, squared",
            "13, 45, squared"})
    void blockSumsAreTheExactSumsInRowOrder(int p, int n, String weighting) {
        SplittableRandom random = new SplittableRandom(31L * p + n);
        double[][] source = new double[p][];
        for (int j = 0; j < p; j++) {
            if (p > 2 && j == 1) {
                continue;
            }
            source[j] = new double[n + 5];
            for (int i = 0; i < source[j].length; i++) {
                source[j][i] = random.nextGaussian() * (1 + j) + (j % 3 == 0 ? 10 : 0);
            }
        }
        double[] weights = new double[n + 5];
        for (int i = 0; i < weights.length; i++) {
            weights[i] = random.nextDouble() * 3;
        }
        int[] rows = new int[n];
        for (int i = 0; i < n; i++) {
            rows[i] = n + 4 - i; // read in an order other than storage's
        }
        double[] root = weighting.equals("root") ? weights : null;
        double[] squared = weighting.equals("squared") ? weights : null;
        double[][] got = FourthMoments.block(source, root, rows, 0, n, squared);

        int i4 = 0;
        int i3 = 0;
        for (int i = 0; i < p; i++) {
            for (int j = i; j < p; j++) {
                for (int k = j; k < p; k++) {
                    check(got[1][i3++], source, rows, root, squared, i, j, k, -1);
                    for (int l = k; l < p; l++) {
                        check(got[0][i4++], source, rows, root, squared, i, j, k, l);
                    }
                }
            }
        }
        assertEquals(FourthMoments.distinctFourth(p), i4);
        if (squared != null) {
            double inOrder = 0;
            for (int row : rows) {
                inOrder += squared[row] * squared[row];
            }
            assertEquals(inOrder, got[4][0], 0.0, "sum of w^2 in row order");
            for (int i = 0; i < p; i++) {
                double first = 0;
                for (int row : rows) {
                    first += value(source, i, row, null) * (squared[row] * squared[row]);
                }
                assertEquals(first, got[3][i], 0.0, "w^2-weighted first order of column " + i);
                for (int j = 0; j < p; j++) {
                    double second = 0;
                    for (int row : rows) {
                        second += value(source, Math.min(i, j), row, null) * value(source, Math.max(i, j), row, null)
                                * (squared[row] * squared[row]);
                    }
                    assertEquals(second, got[2][i * p + j], 0.0, "w^2-weighted second order " + i + ", " + j);
                }
            }
        }
    }

    private static double value(double[][] source, int j, int row, double[] root) {
        if (source[j] == null) {
            return 0;
        }
        return root == null ? source[j][row] : source[j][row] * Math.sqrt(root[row]);
    }

    /** Checks one sum (l = -1 for a third-order one) exactly and in the documented order. */
    private static void check(double got, double[][] source, int[] rows, double[] root, double[] squared, int i,
            int j, int k, int l) {
        BigDecimal exact = BigDecimal.ZERO;
        double absolute = 0;
        double inOrder = 0;
        for (int row : rows) {
            double product = value(source, i, row, root) * value(source, j, row, root);
            if (squared != null) {
                product *= squared[row] * squared[row];
            }
            product *= value(source, k, row, root);
            if (l >= 0) {
                product *= value(source, l, row, root);
            }
            inOrder += product;
            BigDecimal e = new BigDecimal(value(source, i, row, root)).multiply(new BigDecimal(value(source, j, row, root)))
                    .multiply(new BigDecimal(value(source, k, row, root)));
            if (l >= 0) {
                e = e.multiply(new BigDecimal(value(source, l, row, root)));
            }
            if (squared != null) {
                e = e.multiply(new BigDecimal(squared[row] * squared[row]));
            }
            exact = exact.add(e);
            absolute += Math.abs(e.doubleValue());
        }
        String where = "(" + i + ", " + j + ", " + k + (l >= 0 ? ", " + l : "") + ")";
        assertEquals(exact.round(MathContext.DECIMAL64).doubleValue(), got, 1e-14 * absolute + 1e-300,
                where + " against exact arithmetic");
        assertArrayEquals(new double[] {inOrder}, new double[] {got}, 0.0, where + " in row order");
    }
}
