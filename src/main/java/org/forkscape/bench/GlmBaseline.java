package org.forkscape.bench;

import java.util.ArrayList;
import java.util.List;
import org.apache.commons.math3.linear.Array2DRowRealMatrix;
import org.apache.commons.math3.linear.ArrayRealVector;
import org.apache.commons.math3.linear.CholeskyDecomposition;
import org.apache.commons.math3.linear.QRDecomposition;
import org.apache.commons.math3.linear.RealMatrix;
import org.forkscape.data.NumericColumn;
import org.forkscape.data.Table;

/**
 * The usual way to fit a logit: for every specification on its own, iteratively reweighted least
 * squares (Nelder &amp; Wedderburn 1972, "Generalized linear models", JRSS A 135(3)) as R's {@code glm.fit}
 * does it. It starts from mu = (y + 0.5) / 2 (never from another specification's answer), solves each
 * weighted least-squares step by Commons Math's Householder QR of the weighted design built from the
 * rows, and stops when |dev - dev_old| / (|dev| + 0.1) &lt; 1e-10. The HC1 covariance is
 * {@code sandwich::vcovHC(type = "HC1")}'s (Zeileis 2006, "Object-oriented computation of sandwich
 * estimators", Journal of Statistical Software 16(9)): with W the working weights of the last step and
 * s_i = w_i (y_i - mu_i) / mu'(eta_i) x_i the scores, V = n/(n-K) (X'WX)^-1 (sum s_i s_i') (X'WX)^-1.
 */
final class GlmBaseline {
    /** The engine's convergence criterion (R's {@code glm.control()} default is 1e-8; R is given 1e-10). */
    static final double EPSILON = 1e-10;
    /** R's {@code glm.control()} default. */
    static final int MAX_ITERATIONS = 25;

    /** The key coefficient, its HC1 standard error and the IRLS iterations it took. */
    record Fit(double estimate, double stdError, int iterations) {
    }

    private final double[] y;
    private final double[] x;
    private final double[][] controls;

    GlmBaseline(Table table) {
        y = ((NumericColumn) table.column(GlmBenchData.OUTCOME)).values();
        x = ((NumericColumn) table.column(GlmBenchData.KEY)).values();
        controls = new double[GlmBenchData.CONTROLS.size()][];
        for (int j = 0; j < controls.length; j++) {
            controls[j] = ((NumericColumn) table.column(GlmBenchData.CONTROLS.get(j))).values();
        }
    }

    /** The specification whose optional controls are the set bits of {@code mask}, key predictor last. */
    Fit fit(long mask) {
        List<double[]> cols = new ArrayList<>();
        double[] ones = new double[y.length];
        java.util.Arrays.fill(ones, 1);
        cols.add(ones);
        for (int j = 0; j < controls.length; j++) {
            if ((mask >>> j & 1) != 0) {
                cols.add(controls[j]);
            }
        }
        cols.add(x);
        int n = y.length;
        int k = cols.size();
        double[] mu = new double[n];
        double[] eta = new double[n];
        for (int i = 0; i < n; i++) {
            mu[i] = (y[i] + 0.5) / 2;
            eta[i] = Math.log(mu[i] / (1 - mu[i]));
        }
        double devOld = deviance(mu);
        double[] w = new double[n];
        double[] wz = new double[n];
        double[][] weighted = new double[n][k];
        double[] beta = null;
        int iterations = 0;
        boolean converged = false;
        while (!converged && iterations < MAX_ITERATIONS) {
            iterations++;
            for (int i = 0; i < n; i++) {
                double d = muEta(eta[i]);
                w[i] = Math.sqrt(d * d / (mu[i] * (1 - mu[i])));
                wz[i] = w[i] * (eta[i] + (y[i] - mu[i]) / d);
                for (int j = 0; j < k; j++) {
                    weighted[i][j] = w[i] * cols.get(j)[i];
                }
            }
            beta = new QRDecomposition(new Array2DRowRealMatrix(weighted, false)).getSolver()
                    .solve(new ArrayRealVector(wz, false)).toArray();
            for (int i = 0; i < n; i++) {
                double e = 0;
                for (int j = 0; j < k; j++) {
                    e += cols.get(j)[i] * beta[j];
                }
                eta[i] = e;
                mu[i] = 1 / (1 + Math.exp(-e));
            }
            double dev = deviance(mu);
            converged = Math.abs(dev - devOld) / (Math.abs(dev) + 0.1) < EPSILON;
            devOld = dev;
        }
        if (!converged) {
            return new Fit(Double.NaN, Double.NaN, iterations);
        }
        double[][] information = new double[k][k];
        double[][] meat = new double[k][k];
        double[] s = new double[k];
        for (int i = 0; i < n; i++) {
            double weight = w[i] * w[i];
            double score = weight * (y[i] - mu[i]) / muEta(eta[i]);
            for (int a = 0; a < k; a++) {
                s[a] = score * cols.get(a)[i];
                double wa = weight * cols.get(a)[i];
                for (int b = 0; b <= a; b++) {
                    information[a][b] += wa * cols.get(b)[i];
                    meat[a][b] += s[a] * s[b];
                }
            }
        }
        symmetrize(information);
        symmetrize(meat);
        RealMatrix bread = new CholeskyDecomposition(new Array2DRowRealMatrix(information, false)).getSolver()
                .getInverse();
        RealMatrix v = bread.multiply(new Array2DRowRealMatrix(meat, false)).multiply(bread)
                .scalarMultiply((double) n / (n - k));
        return new Fit(beta[k - 1], Math.sqrt(v.getEntry(k - 1, k - 1)), iterations);
    }

    /** dmu/deta of the logistic link, as R's {@code make.link("logit")} computes it. */
    private static double muEta(double eta) {
        double e = Math.exp(eta);
        return e / ((1 + e) * (1 + e));
    }

    /** The binomial deviance, with y log y = 0 at y = 0 as in R's {@code binomial()$dev.resids}. */
    private double deviance(double[] mu) {
        double sum = 0;
        for (int i = 0; i < y.length; i++) {
            sum += y[i] == 1 ? -2 * Math.log(mu[i]) : -2 * Math.log(1 - mu[i]);
        }
        return sum;
    }

    private static void symmetrize(double[][] m) {
        for (int a = 0; a < m.length; a++) {
            for (int b = 0; b < a; b++) {
                m[b][a] = m[a][b];
            }
        }
    }
}
