package org.forkscape.fit;

import org.forkscape.plan.ErrorType;

/**
 * Heteroskedasticity-robust and cluster-robust variance of the key coefficient alone, in one pass over
 * the specification's rows. With w the key row of (X'X)^-1, u_i = x_i'w and residuals e_i:
 * HC0 = sum e_i^2 u_i^2 (White 1980, "A heteroskedasticity-consistent covariance matrix estimator and a
 * direct test for heteroskedasticity", Econometrica 48(4)); HC1 scales by N/(N-K); HC2 and HC3 divide
 * each term by (1-h_i) and (1-h_i)^2 (MacKinnon &amp; White 1985, "Some heteroskedasticity-consistent
 * covariance matrix estimators with improved finite sample properties", J. Econometrics 29(3)); CR1 =
 * G/(G-1) (N-1)/(N-K) sum over clusters of (sum e_i u_i)^2 (Cameron &amp; Miller 2015, "A practitioner's
 * guide to cluster-robust inference", J. Human Resources 50(2)). Leverages h_i = 1/n_level + ||M x_i||^2,
 * the hat matrix of the model with explicit intercept or dummies.
 */
final class KeyCoefficientSandwich {
    /** A leverage this close to 1 makes HC2 and HC3 undefined. */
    static final double LEVERAGE_ONE = 1 - 1e-10;

    private double[] u = new double[0];
    private double[] e = new double[0];
    private double[] h = new double[0];
    private double[] t = new double[0];
    private double[] clusterScore = new double[0];
    private boolean[] clusterSeen = new boolean[0];

    /** Result of one computation: the variance, or NaN with a reason; the cluster count for CR1. */
    record Variance(double value, int clusters, String failure) {
    }

    /**
     * @param rows      the rows in within coordinates; column {@code positions[c]} holds kept column c
     * @param positions where each kept column sits in {@code rows}
     * @param s         the solution
     * @param mom       the rows' moments (level counts for the leverages)
     * @param type      HC0..HC3 or cluster
     * @param k         number of coefficients K
     * @param clusterCount number of distinct cluster codes in the variant (for CR1)
     */
    Variance variance(DesignRows rows, int[] positions, KeySolution s, Moments mom, ErrorType type, int k,
            int clusterCount) {
        int n = rows.n;
        int p = s.p;
        ensure(n);
        double[] w = new double[p];
        s.keyRow(w);
        java.util.Arrays.fill(u, 0, n, 0);
        System.arraycopy(rows.y, 0, e, 0, n);
        for (int c = 0; c < p; c++) {
            double[] x = rows.x[positions[c]];
            double wc = w[c];
            double bc = s.b[c];
            for (int i = 0; i < n; i++) {
                u[i] += wc * x[i];
                e[i] -= bc * x[i];
            }
        }
        switch (type.kind()) {
            case HC0, HC1 -> {
                double sum = 0;
                for (int i = 0; i < n; i++) {
                    double eu = e[i] * u[i];
                    sum += eu * eu;
                }
                return new Variance(type.kind() == ErrorType.Kind.HC1 ? sum * n / (n - k) : sum, 0, null);
            }
            case HC2, HC3 -> {
                leverages(rows, positions, s, mom, n, p);
                double sum = 0;
                for (int i = 0; i < n; i++) {
                    if (h[i] > LEVERAGE_ONE) {
                        return new Variance(Double.NaN, 0, "undefined: leverage 1 for " + type.label()
                                + " (a row fits perfectly, such as a fixed-effect level with one row)");
                    }
                    double eu = e[i] * u[i];
                    double q = 1 - h[i];
                    sum += eu * eu / (type.kind() == ErrorType.Kind.HC2 ? q : q * q);
                }
                return new Variance(sum, 0, null);
            }
            case CLUSTER -> {
                if (clusterScore.length < clusterCount) {
                    clusterScore = new double[clusterCount];
                    clusterSeen = new boolean[clusterCount];
                }
                java.util.Arrays.fill(clusterScore, 0, clusterCount, 0);
                java.util.Arrays.fill(clusterSeen, 0, clusterCount, false);
                int g = 0;
                for (int i = 0; i < n; i++) {
                    int c = rows.cluster[i];
                    clusterScore[c] += e[i] * u[i];
                    if (!clusterSeen[c]) {
                        clusterSeen[c] = true;
                        g++;
                    }
                }
                if (g < 2) {
                    return new Variance(Double.NaN, g, "one cluster: cluster-robust errors need at least two");
                }
                double sum = 0;
                for (int c = 0; c < clusterCount; c++) {
                    sum += clusterScore[c] * clusterScore[c];
                }
                double adjust = (double) g / (g - 1) * (n - 1.0) / (n - k);
                return new Variance(sum * adjust, g, null);
            }
            default -> throw new IllegalArgumentException("not a sandwich type: " + type);
        }
    }

    private void leverages(DesignRows rows, int[] positions, KeySolution s, Moments mom, int n, int p) {
        for (int i = 0; i < n; i++) {
            h[i] = 1.0 / mom.levelCount[rows.level[i]];
        }
        for (int j = 0; j < p; j++) {
            java.util.Arrays.fill(t, 0, n, 0);
            for (int m = 0; m <= j; m++) {
                double coef = s.mAt(j, m);
                double[] x = rows.x[positions[m]];
                for (int i = 0; i < n; i++) {
                    t[i] += coef * x[i];
                }
            }
            for (int i = 0; i < n; i++) {
                h[i] += t[i] * t[i];
            }
        }
    }

    private void ensure(int n) {
        if (u.length < n) {
            u = new double[n];
            e = new double[n];
            h = new double[n];
            t = new double[n];
        }
    }
}
