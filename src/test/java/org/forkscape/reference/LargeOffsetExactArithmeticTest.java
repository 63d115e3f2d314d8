package org.forkscape.reference;

import static org.junit.jupiter.api.Assertions.assertTrue;

import java.math.BigDecimal;
import java.math.MathContext;
import java.util.List;
import java.util.Random;
import org.forkscape.data.NumericColumn;
import org.forkscape.data.Table;
import org.forkscape.plan.Plan;
import org.forkscape.plan.PlanReader;
import org.forkscape.run.MultiverseRunner;
import org.forkscape.run.ResultTable;
import org.forkscape.run.RunProgress;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.ValueSource;

/**
 * Columns far from zero relative to their spread (means up to 1e10 times the standard deviation, beyond
 * NIST's Longley), against the exact least-squares solution of the same double data, computed in
 * 60-digit decimal arithmetic: y on the key predictor x and one control c. This is the case where forming
 * cross-products around zero, or QR on the raw columns with an intercept, loses up to 20 digits; the
 * engine accumulates around the column means, so it should lose almost none.
 *
 * <p>Tolerance {@value #RELATIVE} relative for the key coefficient and its classical standard error: the
 * centered design is well conditioned (correlation 0.45 between x and c), so about 1e-15 is expected
 * whatever the offset; measured below 5e-15.
 */
class LargeOffsetExactArithmeticTest {
    static final double RELATIVE = 1e-12;
    static final int ROWS = 500;
    static final MathContext DIGITS = new MathContext(60);

    @ParameterizedTest(name = "offset {0}")
    @ValueSource(doubles = {0, 1e4, 1e6, 1e8, 1e10})
    void keyCoefficientMatchesExactArithmetic(double offset) {
        Random random = new Random(5);
        double[] x = new double[ROWS];
        double[] c = new double[ROWS];
        double[] y = new double[ROWS];
        for (int i = 0; i < ROWS; i++) {
            double u = random.nextGaussian();
            double v = random.nextGaussian() + 0.5 * u;
            x[i] = offset + u;
            c[i] = 2 * offset + v;
            y[i] = 3 * offset + 2 * u + v + random.nextGaussian();
        }
        Table table = new Table("offset", List.of(new NumericColumn("y", y), new NumericColumn("x", x),
                new NumericColumn("c", c)));
        String json = "{\"data\": \"unused.csv\", \"decisions\": ["
                + "{\"name\": \"outcome\", \"kind\": \"outcome\", \"alternatives\": [{\"label\": \"y\", \"column\": \"y\"}]},"
                + "{\"name\": \"key\", \"kind\": \"predictor\", \"alternatives\": [{\"label\": \"x\", \"column\": \"x\"}]},"
                + "{\"name\": \"controls\", \"kind\": \"controls\", \"required\": [\"c\"]}]}";
        Plan plan = new PlanReader(false).read(json, ReferenceFiles.path("versions.txt").getParent());
        ResultTable r = new MultiverseRunner(1).run(plan, table, RunProgress.SILENT, null).results();

        double[][] exact = exactFit(new double[][] {x, c}, y);
        double estimateError = Agreement.relativeError(r.estimate(0), exact[0][0]);
        double seError = Agreement.relativeError(r.stdError(0), exact[0][1]);
        assertTrue(estimateError <= RELATIVE && seError <= RELATIVE, String.format("offset %.0e: estimate %.17g, "
                + "exact %.17g (relative error %.2e); std_error %.17g, exact %.17g (relative error %.2e); tolerance %.0e "
                + "(exact 60-digit arithmetic on the same doubles)", offset, r.estimate(0), exact[0][0], estimateError,
                r.stdError(0), exact[0][1], seError, RELATIVE));
    }

    /**
     * The exact coefficient of the first of two regressors (with an intercept) and its classical standard
     * error, from the centered cross-products in decimal arithmetic: b = S^-1 s_xy, se^2 = RSS/(n - 3)
     * (S^-1)_11, RSS = S_yy - b's_xy.
     */
    private static double[][] exactFit(double[][] regressors, double[] y) {
        double[][] columns = {regressors[0], regressors[1], y};
        BigDecimal n = BigDecimal.valueOf(ROWS);
        BigDecimal[][] centered = new BigDecimal[3][ROWS];
        for (int j = 0; j < 3; j++) {
            BigDecimal sum = BigDecimal.ZERO;
            for (double v : columns[j]) {
                sum = sum.add(new BigDecimal(v));
            }
            BigDecimal mean = sum.divide(n, DIGITS);
            for (int i = 0; i < ROWS; i++) {
                centered[j][i] = new BigDecimal(columns[j][i]).subtract(mean);
            }
        }
        BigDecimal[][] s = new BigDecimal[3][3];
        for (int p = 0; p < 3; p++) {
            for (int q = 0; q < 3; q++) {
                BigDecimal sum = BigDecimal.ZERO;
                for (int i = 0; i < ROWS; i++) {
                    sum = sum.add(centered[p][i].multiply(centered[q][i]));
                }
                s[p][q] = sum;
            }
        }
        BigDecimal det = s[0][0].multiply(s[1][1]).subtract(s[0][1].multiply(s[1][0]));
        BigDecimal b0 = s[0][2].multiply(s[1][1]).subtract(s[0][1].multiply(s[1][2])).divide(det, DIGITS);
        BigDecimal b1 = s[0][0].multiply(s[1][2]).subtract(s[1][0].multiply(s[0][2])).divide(det, DIGITS);
        BigDecimal rss = s[2][2].subtract(b0.multiply(s[0][2])).subtract(b1.multiply(s[1][2]));
        BigDecimal inverse00 = s[1][1].divide(det, DIGITS);
        BigDecimal variance = rss.divide(BigDecimal.valueOf(ROWS - 3), DIGITS).multiply(inverse00);
        return new double[][] {{b0.doubleValue(), variance.sqrt(DIGITS).doubleValue()}};
    }
}
