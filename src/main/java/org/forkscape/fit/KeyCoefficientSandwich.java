package org.forkscape.fit;

import org.forkscape.plan.ErrorType;

/**
 * Heteroskedasticity-robust and cluster-robust variance of the key coefficient alone, in one fused
 * pass over the specification's rows. With w the key row of (X'X)^-1, u_i = x_i'w and residuals e_i:
 * HC0 = sum e_i^2 u_i^2 (White 1980, "A heteroskedasticity-consistent covariance matrix estimator and a
 * direct test for heteroskedasticity", Econometrica 48(4)); HC1 scales by N/(N-K); HC2 and HC3 divide
 * each term by (1-h_i) and (1-h_i)^2 (MacKinnon &amp; White 1985, "Some heteroskedasticity-consistent
 * covariance matrix estimators with improved finite sample properties", J. Econometrics 29(3)); CR1 =
 * G/(G-1) (N-1)/(N-K) sum over clusters of (sum e_i u_i)^2 (Cameron &amp; Miller 2015, "A practitioner's
 * guide to cluster-robust inference", J. Human Resources 50(2)). Leverages h_i = 1/n_level + ||M x_i||^2,
 * the hat matrix of the model with explicit intercept or dummies. Each row is read once: its within
 * values, residual, score and leverage are formed in registers, nothing is materialised.
 */
final class KeyCoefficientSandwich {
    /** A leverage this close to 1 makes HC2 and HC3 undefined. */
    static final double LEVERAGE_ONE = 1 - 1e-10;

    /**
     * The rows as the pass reads them: one array per kept column (key last) and the outcome, indexed by
     * row; the rows to use; each row's level and cluster; per level the offsets that turn the stored
     * values into within values.
     */
    static final class RowView {
        double[][] x = new double[0][];
        double[] y;
        int[] rows;
        int n;
        int[] level;
        double[][] offset;
        double[] yOffset;
        int[] levelCount;
        int[] cluster;
        int clusterCount;
    }

    private double[] xc = new double[0];
    private double[] m = new double[0];
    private double[] w = new double[0];
    private double[] clusterScore = new double[0];
    private boolean[] clusterSeen = new boolean[0];

    /** Result of one computation: the variance, or NaN with a reason; the cluster count for CR1. */
    record Variance(double value, int clusters, String failure) {
    }

    /**
     * @param view the rows (not modified)
     * @param s    the solution
     * @param type HC0..HC3 or cluster
     * @param k    number of coefficients K
     */
    Variance variance(RowView view, KeySolution s, ErrorType type, int k) {
        int p = s.p;
        int n = view.n;
        if (xc.length < p) {
            xc = new double[p];
            w = new double[p];
        }
        if (m.length < p * p) {
            m = new double[p * p];
        }
        s.keyRow(w);
        boolean leverage = type.kind() == ErrorType.Kind.HC2 || type.kind() == ErrorType.Kind.HC3;
        if (leverage) {
            for (int i = 0; i < p; i++) {
                for (int j = 0; j <= i; j++) {
                    m[i * p + j] = s.mAt(i, j);
                }
            }
        }
        boolean cluster = type.kind() == ErrorType.Kind.CLUSTER;
        if (cluster && clusterScore.length < view.clusterCount) {
            clusterScore = new double[view.clusterCount];
            clusterSeen = new boolean[view.clusterCount];
        }
        if (cluster) {
            java.util.Arrays.fill(clusterScore, 0, view.clusterCount, 0);
            java.util.Arrays.fill(clusterSeen, 0, view.clusterCount, false);
        }
        boolean hc3 = type.kind() == ErrorType.Kind.HC3;
        double[] b = s.b;
        double[][] x = view.x;
        double sum = 0;
        int groups = 0;
        for (int t = 0; t < n; t++) {
            int r = view.rows == null ? t : view.rows[t];
            int l = view.level[r];
            double[] off = view.offset[l];
            double e = view.y[r] - view.yOffset[l];
            double u = 0;
            for (int c = 0; c < p; c++) {
                double v = x[c][r] - off[c];
                xc[c] = v;
                e -= b[c] * v;
                u += w[c] * v;
            }
            double eu = e * u;
            if (cluster) {
                int g = view.cluster[r];
                clusterScore[g] += eu;
                if (!clusterSeen[g]) {
                    clusterSeen[g] = true;
                    groups++;
                }
            } else if (leverage) {
                double h = 1.0 / view.levelCount[l];
                for (int i = 0; i < p; i++) {
                    double v = 0;
                    int row = i * p;
                    for (int j = 0; j <= i; j++) {
                        v += m[row + j] * xc[j];
                    }
                    h += v * v;
                }
                if (h > LEVERAGE_ONE) {
                    return new Variance(Double.NaN, 0, "undefined: leverage 1 for " + type.label()
                            + " (a row fits perfectly, such as a fixed-effect level with one row)");
                }
                double q = 1 - h;
                sum += eu * eu / (hc3 ? q * q : q);
            } else {
                sum += eu * eu;
            }
        }
        if (cluster) {
            if (groups < 2) {
                return new Variance(Double.NaN, groups, "one cluster: cluster-robust errors need at least two");
            }
            double meat = 0;
            for (int g = 0; g < view.clusterCount; g++) {
                meat += clusterScore[g] * clusterScore[g];
            }
            return new Variance(meat * groups / (groups - 1) * (n - 1.0) / (n - k), groups, null);
        }
        return new Variance(type.kind() == ErrorType.Kind.HC1 ? sum * n / (n - k) : sum, 0, null);
    }
}
