package org.forkscape.reference;

import java.math.BigDecimal;
import java.math.MathContext;
import java.math.RoundingMode;

/**
 * The maximum likelihood fit of a logit or Poisson model of one specification (an intercept, the
 * controls and the key predictor last) in decimal arithmetic of {@value #DIGIT_COUNT} digits, the outside
 * reference for the engine's iterations on designs whose cross-products lose digits: Newton's method
 * (for these canonical links, Fisher scoring), b += I^-1 U with I = X'WX and U = X'(y - mu), continued
 * until the step is below 1e-45 of the coefficients, from the rows' own doubles taken exactly; the
 * exponential by its Taylor series after halving the argument until it is below 1/16. Formulas:
 * classical se^2 = (I^-1)_kk (dispersion 1, as R's {@code summary.glm} for these families); with
 * c = I^-1 e_key, HC0 = sum (y_i - mu_i)^2 (x_i'c)^2 and HC1 = HC0 N/(N-K) (White 1980, Econometrica
 * 48(4); Zeileis 2006, "Object-oriented computation of sandwich estimators", Journal of Statistical
 * Software 16(9), for a {@code glm} with a canonical link); the cluster-robust errors from the same scores
 * ({@link KeyResult#clustered}).
 */
public final class ExactGeneralizedLinear {
    static final int DIGIT_COUNT = 60;
    private static final MathContext DIGITS = new MathContext(DIGIT_COUNT, RoundingMode.HALF_EVEN);
    private static final BigDecimal STOP = new BigDecimal("1e-45");

    /**
     * The key coefficient and its classical, HC0 and HC1 standard errors, each rounded once to a double, and
     * each row's score of the key coefficient, e_i = (y_i - mu_i) x_i'c, for the cluster-robust errors.
     */
    public record KeyResult(double estimate, double classical, double hc0, double hc1, BigDecimal[] keyScores,
            int parameters) {
        /**
         * The cluster-robust standard error, rounded once to a double. One column: G/(G-1) sum_g (sum_{i in g}
         * e_i)^2, {@code sandwich::vcovCL}'s default (HC0 type) for a {@code glm} (Zeileis, Koell &amp; Graham
         * 2020, Journal of Statistical Software 95(1)). Several: over every non-empty subset S of the columns,
         * (-1)^(|S|+1) G_S/(G_S-1) times the sum over the clusters of S's intersection, all times
         * (n-1)/(n-K) (Cameron, Gelbach &amp; Miller 2011, Journal of Business &amp; Economic Statistics 29(2),
         * as {@code vcovCL(type = "HC1", cadjust = TRUE, multi0 = FALSE)} computes); NaN when not positive.
         */
        public double clustered(int[]... columns) {
            int n = keyScores.length;
            BigDecimal total = BigDecimal.ZERO;
            for (int subset = 1; subset < 1 << columns.length; subset++) {
                java.util.Map<String, BigDecimal> sums = new java.util.HashMap<>();
                for (int i = 0; i < n; i++) {
                    StringBuilder cell = new StringBuilder();
                    for (int c = 0; c < columns.length; c++) {
                        if ((subset >> c & 1) == 1) {
                            cell.append(columns[c][i]).append('/');
                        }
                    }
                    sums.merge(cell.toString(), keyScores[i], (a, b) -> a.add(b, DIGITS));
                }
                BigDecimal squares = BigDecimal.ZERO;
                for (BigDecimal sum : sums.values()) {
                    squares = squares.add(sum.multiply(sum, DIGITS), DIGITS);
                }
                int g = sums.size();
                BigDecimal term = squares.multiply(BigDecimal.valueOf(g)).divide(BigDecimal.valueOf(g - 1), DIGITS);
                total = Integer.bitCount(subset) % 2 == 1 ? total.add(term, DIGITS) : total.subtract(term, DIGITS);
            }
            if (columns.length > 1) {
                total = total.multiply(BigDecimal.valueOf(n - 1)).divide(BigDecimal.valueOf(n - parameters), DIGITS);
            }
            return total.signum() > 0 ? total.sqrt(DIGITS).doubleValue() : Double.NaN;
        }
    }

    private ExactGeneralizedLinear() {
    }

    /**
     * @param poisson    true for the Poisson model (log link), false for the logit
     * @param regressors the controls and, last, the key predictor, one array per column over the rows
     * @param y          the outcome over the same rows (0/1 for the logit)
     */
    public static KeyResult fit(boolean poisson, double[][] regressors, double[] y) {
        int n = y.length;
        int p = regressors.length + 1;
        BigDecimal[][] x = new BigDecimal[n][p];
        BigDecimal[] yy = new BigDecimal[n];
        BigDecimal mean = BigDecimal.ZERO;
        for (int i = 0; i < n; i++) {
            x[i][0] = BigDecimal.ONE;
            for (int j = 1; j < p; j++) {
                x[i][j] = new BigDecimal(regressors[j - 1][i]);
            }
            yy[i] = new BigDecimal(y[i]);
            mean = mean.add(yy[i]);
        }
        mean = mean.divide(BigDecimal.valueOf(n), DIGITS);
        BigDecimal[] b = new BigDecimal[p];
        java.util.Arrays.fill(b, BigDecimal.ZERO);
        double start = poisson ? Math.log(mean.doubleValue()) : Math.log(mean.doubleValue() / (1 - mean.doubleValue()));
        b[0] = new BigDecimal(start);
        BigDecimal[] mu = new BigDecimal[n];
        BigDecimal[][] info = null;
        for (int iteration = 0; iteration < 200; iteration++) {
            means(poisson, x, b, mu);
            info = information(poisson, x, mu);
            BigDecimal[] score = new BigDecimal[p];
            for (int j = 0; j < p; j++) {
                BigDecimal s = BigDecimal.ZERO;
                for (int i = 0; i < n; i++) {
                    s = s.add(x[i][j].multiply(yy[i].subtract(mu[i]), DIGITS), DIGITS);
                }
                score[j] = s;
            }
            BigDecimal[] step = solve(info, score);
            boolean small = true;
            for (int j = 0; j < p; j++) {
                b[j] = b[j].add(step[j], DIGITS);
                small &= step[j].abs().compareTo(STOP.multiply(BigDecimal.ONE.add(b[j].abs()))) <= 0;
            }
            if (small) {
                break;
            }
        }
        means(poisson, x, b, mu);
        info = information(poisson, x, mu);
        BigDecimal[] unit = new BigDecimal[p];
        java.util.Arrays.fill(unit, BigDecimal.ZERO);
        unit[p - 1] = BigDecimal.ONE;
        BigDecimal[] c = solve(info, unit);
        BigDecimal meat = BigDecimal.ZERO;
        BigDecimal[] scores = new BigDecimal[n];
        for (int i = 0; i < n; i++) {
            BigDecimal along = BigDecimal.ZERO;
            for (int j = 0; j < p; j++) {
                along = along.add(x[i][j].multiply(c[j], DIGITS), DIGITS);
            }
            BigDecimal e = yy[i].subtract(mu[i]).multiply(along, DIGITS);
            scores[i] = e;
            meat = meat.add(e.multiply(e, DIGITS), DIGITS);
        }
        double hc0 = meat.sqrt(DIGITS).doubleValue();
        double hc1 = meat.multiply(BigDecimal.valueOf(n)).divide(BigDecimal.valueOf(n - p), DIGITS).sqrt(DIGITS)
                .doubleValue();
        return new KeyResult(b[p - 1].doubleValue(), c[p - 1].sqrt(DIGITS).doubleValue(), hc0, hc1, scores, p);
    }

    private static void means(boolean poisson, BigDecimal[][] x, BigDecimal[] b, BigDecimal[] mu) {
        for (int i = 0; i < x.length; i++) {
            BigDecimal eta = BigDecimal.ZERO;
            for (int j = 0; j < b.length; j++) {
                eta = eta.add(x[i][j].multiply(b[j], DIGITS), DIGITS);
            }
            mu[i] = poisson ? exp(eta) : BigDecimal.ONE.divide(BigDecimal.ONE.add(exp(eta.negate())), DIGITS);
        }
    }

    /** X'WX with the canonical links' weights: mu (1 - mu) for the logit, mu for Poisson. */
    private static BigDecimal[][] information(boolean poisson, BigDecimal[][] x, BigDecimal[] mu) {
        int p = x[0].length;
        BigDecimal[][] info = new BigDecimal[p][p];
        for (BigDecimal[] row : info) {
            java.util.Arrays.fill(row, BigDecimal.ZERO);
        }
        for (int i = 0; i < x.length; i++) {
            BigDecimal w = poisson ? mu[i] : mu[i].multiply(BigDecimal.ONE.subtract(mu[i]), DIGITS);
            for (int j = 0; j < p; j++) {
                BigDecimal wx = w.multiply(x[i][j], DIGITS);
                for (int k = 0; k < p; k++) {
                    info[j][k] = info[j][k].add(wx.multiply(x[i][k], DIGITS), DIGITS);
                }
            }
        }
        return info;
    }

    /** Gaussian elimination with partial pivoting. */
    private static BigDecimal[] solve(BigDecimal[][] matrix, BigDecimal[] rhs) {
        int p = rhs.length;
        BigDecimal[][] a = new BigDecimal[p][p + 1];
        for (int j = 0; j < p; j++) {
            System.arraycopy(matrix[j], 0, a[j], 0, p);
            a[j][p] = rhs[j];
        }
        for (int col = 0; col < p; col++) {
            int pivot = col;
            for (int r = col + 1; r < p; r++) {
                if (a[r][col].abs().compareTo(a[pivot][col].abs()) > 0) {
                    pivot = r;
                }
            }
            BigDecimal[] swap = a[col];
            a[col] = a[pivot];
            a[pivot] = swap;
            for (int r = col + 1; r < p; r++) {
                BigDecimal f = a[r][col].divide(a[col][col], DIGITS);
                for (int k = col; k <= p; k++) {
                    a[r][k] = a[r][k].subtract(f.multiply(a[col][k], DIGITS), DIGITS);
                }
            }
        }
        BigDecimal[] out = new BigDecimal[p];
        for (int r = p - 1; r >= 0; r--) {
            BigDecimal s = a[r][p];
            for (int k = r + 1; k < p; k++) {
                s = s.subtract(a[r][k].multiply(out[k], DIGITS), DIGITS);
            }
            out[r] = s.divide(a[r][r], DIGITS);
        }
        return out;
    }

    /** e^v: halved until |v| &lt; 1/16, the Taylor series to the working precision, then squared back. */
    static BigDecimal exp(BigDecimal v) {
        int halvings = 0;
        BigDecimal small = v;
        BigDecimal limit = new BigDecimal("0.0625");
        while (small.abs().compareTo(limit) > 0) {
            small = small.divide(BigDecimal.valueOf(2), DIGITS);
            halvings++;
        }
        BigDecimal sum = BigDecimal.ONE;
        BigDecimal term = BigDecimal.ONE;
        BigDecimal tiny = BigDecimal.ONE.movePointLeft(DIGIT_COUNT + 5);
        for (int k = 1; term.abs().compareTo(tiny) > 0; k++) {
            term = term.multiply(small, DIGITS).divide(BigDecimal.valueOf(k), DIGITS);
            sum = sum.add(term, DIGITS);
        }
        for (int h = 0; h < halvings; h++) {
            sum = sum.multiply(sum, DIGITS);
        }
        return sum;
    }
}
