package org.forkscape.reference;

import java.math.BigDecimal;
import java.math.MathContext;

/**
 * Least squares of one specification in decimal arithmetic of {@value #DIGIT_COUNT} digits, the outside
 * reference for the engine's every route. The design is the rows' own doubles taken exactly: an
 * intercept (or one dummy per fixed-effect level present, no intercept), the controls and the key
 * predictor last. Cross-products of exact doubles are formed without rounding; only the elimination,
 * the inverse and what follows round, at 90 digits, so the results are exact to far beyond double
 * precision unless the design is singular to 70 digits.
 *
 * <p>Formulas: b = (X'X)^-1 X'y; classical s^2 (X'X)^-1_kk with s^2 = RSS/(N-K); with w = (X'X)^-1 e_key,
 * u_i = x_i'w and e_i the residual, HC0 = sum e_i^2 u_i^2 (White 1980, Econometrica 48(4)), HC1 = HC0
 * N/(N-K), HC2 and HC3 divide each term by 1-h_i and (1-h_i)^2 with h_i = x_i'(X'X)^-1 x_i (MacKinnon &amp;
 * White 1985, Journal of Econometrics 29(3)), CR1 = G/(G-1) (N-1)/(N-K) sum_g (sum_{i in g} e_i u_i)^2
 * (Cameron &amp; Miller 2015, Journal of Human Resources 50(2)).
 */
public final class ExactLeastSquares {
    static final int DIGIT_COUNT = 90;
    private static final MathContext DIGITS = new MathContext(DIGIT_COUNT);

    /**
     * The key coefficient and its standard errors of every type, each rounded once to a double;
     * {@code cr1Variance} is the square of {@code cr1}, rounded once (NaN with fewer than two clusters), for
     * signed sums of one-way variances such as multi-way clustering's.
     */
    public record KeyResult(double estimate, double classical, double hc0, double hc1, double hc2, double hc3,
            double cr1, double cr1Variance, int n, int k, int clusters) {
        /** The standard error of the type spelled as in a plan ("classical", "HC0".."HC3", "cluster:..."). */
        public double stdError(String type) {
            if (type.startsWith("cluster")) {
                return cr1;
            }
            switch (type) {
                case "classical":
                    return classical;
                case "HC0":
                    return hc0;
                case "HC1":
                    return hc1;
                case "HC2":
                    return hc2;
                case "HC3":
                    return hc3;
                default:
                    throw new IllegalArgumentException(type);
            }
        }
    }

    private ExactLeastSquares() {
    }

    /**
     * @param regressors the controls and, last, the key predictor, one array per column over the rows
     * @param y          the outcome over the same rows
     * @param level      fixed-effect level of each row (dummies, no intercept), or null for an intercept
     * @param cluster    cluster code of each row for CR1, or null
     */
    public static KeyResult fit(double[][] regressors, double[] y, int[] level, int[] cluster) {
        return fit(regressors, y, null, level, null, cluster);
    }

    /**
     * Weighted least squares with analytic weights w_i and up to two sets of fixed-effect dummies: b =
     * (X'WX)^-1 X'Wy, s^2 = sum w e^2 / (N-K), u_i = x_i'(X'WX)^-1 e_key, HC0 = sum w_i^2 e_i^2 u_i^2, h_i =
     * w_i x_i'(X'WX)^-1 x_i, CR1 scores sum_{i in g} w_i e_i u_i (the meats of X'W diag(e^2) WX and its
     * per-cluster form; as R's {@code sandwich} takes them for a weighted {@code lm}).
     *
     * @param weight the analytic weight of each row (all positive), or null for ordinary least squares
     * @param level2 a second fixed effect's level of each row, beside {@code level}: its dummies for every
     *               level but the first, which is full rank when the two levels' graph is connected; or null
     */
    public static KeyResult fit(double[][] regressors, double[] y, double[] weight, int[] level, int[] level2,
            int[] cluster) {
        return fitWithEffects(regressors, y, weight, level, level2 == null ? new int[0][] : new int[][] {level2},
                cluster);
    }

    /**
     * As {@link #fit(double[][], double[], double[], int[], int[], int[])} with any number of further fixed
     * effects beside {@code level}: each one's dummies for every level but the first, which is full rank when the
     * design has no dependency among them beyond the one per extra set (checked by the inverse, which fails on a
     * singular matrix).
     *
     * @param extra further fixed effects' levels of each row (not modified)
     */
    public static KeyResult fitWithEffects(double[][] regressors, double[] y, double[] weight, int[] level,
            int[][] extra, int[] cluster) {
        int n = y.length;
        int levels = 0;
        if (level != null) {
            for (int l : level) {
                levels = Math.max(levels, l + 1);
            }
        }
        int[] extraStart = new int[extra.length + 1];
        extraStart[0] = level == null ? 1 : levels;
        for (int d = 0; d < extra.length; d++) {
            int count = 0;
            for (int l : extra[d]) {
                count = Math.max(count, l + 1);
            }
            extraStart[d + 1] = extraStart[d] + Math.max(0, count - 1);
        }
        int lead = extraStart[extra.length];
        int k = lead + regressors.length;
        BigDecimal[][] x = new BigDecimal[n][k];
        for (int i = 0; i < n; i++) {
            int first = extraStart[0];
            for (int j = 0; j < first; j++) {
                x[i][j] = (level == null || level[i] == j) ? BigDecimal.ONE : BigDecimal.ZERO;
            }
            for (int d = 0; d < extra.length; d++) {
                for (int j = extraStart[d]; j < extraStart[d + 1]; j++) {
                    x[i][j] = extra[d][i] == j - extraStart[d] + 1 ? BigDecimal.ONE : BigDecimal.ZERO;
                }
            }
            for (int j = 0; j < regressors.length; j++) {
                x[i][lead + j] = new BigDecimal(regressors[j][i]);
            }
        }
        BigDecimal[] yy = new BigDecimal[n];
        BigDecimal[] wt = new BigDecimal[n];
        for (int i = 0; i < n; i++) {
            yy[i] = new BigDecimal(y[i]);
            wt[i] = weight == null ? BigDecimal.ONE : new BigDecimal(weight[i]);
        }
        BigDecimal[][] a = new BigDecimal[k][k];
        BigDecimal[] xy = new BigDecimal[k];
        for (int p = 0; p < k; p++) {
            for (int q = p; q < k; q++) {
                BigDecimal s = BigDecimal.ZERO;
                for (int i = 0; i < n; i++) {
                    if (x[i][p].signum() != 0 && x[i][q].signum() != 0) {
                        BigDecimal t = x[i][p].multiply(x[i][q]);
                        s = s.add(weight == null ? t : t.multiply(wt[i]));
                    }
                }
                a[p][q] = s;
                a[q][p] = s;
            }
            BigDecimal s = BigDecimal.ZERO;
            for (int i = 0; i < n; i++) {
                BigDecimal t = x[i][p].multiply(yy[i]);
                s = s.add(weight == null ? t : t.multiply(wt[i]));
            }
            xy[p] = s;
        }
        BigDecimal[][] inverse = invert(a);
        BigDecimal[] b = new BigDecimal[k];
        for (int p = 0; p < k; p++) {
            BigDecimal s = BigDecimal.ZERO;
            for (int q = 0; q < k; q++) {
                s = s.add(inverse[p][q].multiply(xy[q], DIGITS), DIGITS);
            }
            b[p] = s;
        }
        int key = k - 1;
        BigDecimal rss = BigDecimal.ZERO;
        BigDecimal hc0 = BigDecimal.ZERO;
        BigDecimal hc2 = BigDecimal.ZERO;
        BigDecimal hc3 = BigDecimal.ZERO;
        int clusterCount = 0;
        if (cluster != null) {
            for (int g : cluster) {
                clusterCount = Math.max(clusterCount, g + 1);
            }
        }
        BigDecimal[] score = new BigDecimal[clusterCount];
        java.util.Arrays.fill(score, BigDecimal.ZERO);
        boolean[] seen = new boolean[clusterCount];
        for (int i = 0; i < n; i++) {
            BigDecimal e = yy[i];
            BigDecimal u = BigDecimal.ZERO;
            for (int p = 0; p < k; p++) {
                e = e.subtract(x[i][p].multiply(b[p], DIGITS), DIGITS);
                u = u.add(x[i][p].multiply(inverse[key][p], DIGITS), DIGITS);
            }
            BigDecimal h = BigDecimal.ZERO;
            for (int p = 0; p < k; p++) {
                if (x[i][p].signum() == 0) {
                    continue;
                }
                BigDecimal t = BigDecimal.ZERO;
                for (int q = 0; q < k; q++) {
                    if (x[i][q].signum() != 0) {
                        t = t.add(inverse[p][q].multiply(x[i][q], DIGITS), DIGITS);
                    }
                }
                h = h.add(x[i][p].multiply(t, DIGITS), DIGITS);
            }
            if (weight != null) {
                h = h.multiply(wt[i], DIGITS);
            }
            BigDecimal eu = weight == null ? e.multiply(u, DIGITS) : e.multiply(u, DIGITS).multiply(wt[i], DIGITS);
            BigDecimal term = eu.multiply(eu, DIGITS);
            BigDecimal ee = e.multiply(e, DIGITS);
            rss = rss.add(weight == null ? ee : ee.multiply(wt[i], DIGITS), DIGITS);
            hc0 = hc0.add(term, DIGITS);
            BigDecimal q = BigDecimal.ONE.subtract(h, DIGITS);
            hc2 = hc2.add(term.divide(q, DIGITS), DIGITS);
            hc3 = hc3.add(term.divide(q.multiply(q, DIGITS), DIGITS), DIGITS);
            if (cluster != null) {
                score[cluster[i]] = score[cluster[i]].add(eu, DIGITS);
                seen[cluster[i]] = true;
            }
        }
        int g = 0;
        BigDecimal cr1 = BigDecimal.ZERO;
        for (int c = 0; c < clusterCount; c++) {
            if (seen[c]) {
                g++;
                cr1 = cr1.add(score[c].multiply(score[c], DIGITS), DIGITS);
            }
        }
        BigDecimal dfResidual = BigDecimal.valueOf(n - k);
        BigDecimal classical = rss.divide(dfResidual, DIGITS).multiply(inverse[key][key], DIGITS);
        BigDecimal hc1 = hc0.multiply(BigDecimal.valueOf(n), DIGITS).divide(dfResidual, DIGITS);
        double clusterSe = Double.NaN;
        double clusterVariance = Double.NaN;
        if (g >= 2) {
            BigDecimal scale = BigDecimal.valueOf((long) g * (n - 1))
                    .divide(BigDecimal.valueOf((long) (g - 1) * (n - k)), DIGITS);
            BigDecimal variance = cr1.multiply(scale, DIGITS);
            clusterSe = variance.sqrt(DIGITS).doubleValue();
            clusterVariance = variance.doubleValue();
        }
        return new KeyResult(b[key].doubleValue(), classical.sqrt(DIGITS).doubleValue(),
                hc0.sqrt(DIGITS).doubleValue(), hc1.sqrt(DIGITS).doubleValue(), hc2.sqrt(DIGITS).doubleValue(),
                hc3.sqrt(DIGITS).doubleValue(), clusterSe, clusterVariance, n, k, g);
    }

    /** Gauss-Jordan elimination with partial pivoting, at {@value #DIGIT_COUNT} digits. */
    private static BigDecimal[][] invert(BigDecimal[][] a) {
        int k = a.length;
        BigDecimal[][] m = new BigDecimal[k][2 * k];
        for (int i = 0; i < k; i++) {
            for (int j = 0; j < k; j++) {
                m[i][j] = a[i][j];
                m[i][k + j] = i == j ? BigDecimal.ONE : BigDecimal.ZERO;
            }
        }
        for (int c = 0; c < k; c++) {
            int pivot = c;
            for (int r = c + 1; r < k; r++) {
                if (m[r][c].abs().compareTo(m[pivot][c].abs()) > 0) {
                    pivot = r;
                }
            }
            BigDecimal[] t = m[c];
            m[c] = m[pivot];
            m[pivot] = t;
            if (m[c][c].signum() == 0) {
                throw new ArithmeticException("singular design");
            }
            BigDecimal d = m[c][c];
            for (int j = 0; j < 2 * k; j++) {
                m[c][j] = m[c][j].divide(d, DIGITS);
            }
            for (int r = 0; r < k; r++) {
                if (r == c || m[r][c].signum() == 0) {
                    continue;
                }
                BigDecimal f = m[r][c];
                for (int j = 0; j < 2 * k; j++) {
                    m[r][j] = m[r][j].subtract(f.multiply(m[c][j], DIGITS), DIGITS);
                }
            }
        }
        BigDecimal[][] inverse = new BigDecimal[k][k];
        for (int i = 0; i < k; i++) {
            System.arraycopy(m[i], k, inverse[i], 0, k);
        }
        return inverse;
    }
}
