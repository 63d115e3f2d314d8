package org.forkscape.bench;

import java.util.ArrayList;
import java.util.List;
import org.apache.commons.math3.linear.Array2DRowRealMatrix;
import org.apache.commons.math3.linear.RealMatrix;
import org.apache.commons.math3.stat.regression.OLSMultipleLinearRegression;
import org.forkscape.data.CategoricalColumn;
import org.forkscape.data.NumericColumn;
import org.forkscape.data.Table;

/**
 * The usual way: for every specification, build its design matrix from the rows and fit it with
 * Commons Math's OLSMultipleLinearRegression (Householder QR), computing a robust covariance the
 * textbook way, (X'X)^-1 X' diag(e^2) X (X'X)^-1, or per cluster X_g' e_g e_g' X_g in the middle.
 */
final class RefitBaseline {
    private final double[] y;
    private final double[] x;
    private final double[][] controls;
    private final int[] cluster;

    RefitBaseline(Table table) {
        y = ((NumericColumn) table.column("y")).values();
        x = ((NumericColumn) table.column("x")).values();
        controls = new double[BenchData.CONTROLS][];
        for (int j = 0; j < BenchData.CONTROLS; j++) {
            controls[j] = ((NumericColumn) table.column("c" + (j + 1))).values();
        }
        cluster = ((CategoricalColumn) table.column("cluster")).codes();
    }

    /** Key estimate and standard error of the specification whose optional controls are {@code mask}. */
    double[] fit(long mask, int optional, String errors) {
        List<double[]> cols = new ArrayList<>();
        for (int j = 0; j < optional; j++) {
            if ((mask >>> j & 1) != 0) {
                cols.add(controls[j]);
            }
        }
        cols.add(x);
        int n = y.length;
        int p = cols.size();
        double[][] design = new double[n][p];
        for (int i = 0; i < n; i++) {
            for (int j = 0; j < p; j++) {
                design[i][j] = cols.get(j)[i];
            }
        }
        OLSMultipleLinearRegression ols = new OLSMultipleLinearRegression();
        ols.newSampleData(y, design);
        double[] beta = ols.estimateRegressionParameters();
        int key = p; // intercept first, key predictor last
        if (errors.equals("classical")) {
            return new double[] {beta[key], ols.estimateRegressionParametersStandardErrors()[key]};
        }
        double[] e = ols.estimateResiduals();
        int k = p + 1;
        RealMatrix full = new Array2DRowRealMatrix(n, k);
        for (int i = 0; i < n; i++) {
            full.setEntry(i, 0, 1);
            for (int j = 0; j < p; j++) {
                full.setEntry(i, j + 1, design[i][j]);
            }
        }
        RealMatrix bread = new org.apache.commons.math3.linear.LUDecomposition(full.transpose().multiply(full))
                .getSolver().getInverse();
        RealMatrix meat = new Array2DRowRealMatrix(k, k);
        double scale;
        if (errors.equals("HC1")) {
            for (int i = 0; i < n; i++) {
                RealMatrix row = full.getRowMatrix(i);
                meat = meat.add(row.transpose().multiply(row).scalarMultiply(e[i] * e[i]));
            }
            scale = (double) n / (n - k);
        } else {
            int groups = 0;
            for (int c : cluster) {
                groups = Math.max(groups, c + 1);
            }
            double[][] score = new double[groups][k];
            for (int i = 0; i < n; i++) {
                for (int j = 0; j < k; j++) {
                    score[cluster[i]][j] += full.getEntry(i, j) * e[i];
                }
            }
            for (double[] s : score) {
                RealMatrix sm = new Array2DRowRealMatrix(s);
                meat = meat.add(sm.multiply(sm.transpose()));
            }
            scale = (double) groups / (groups - 1) * (n - 1.0) / (n - k);
        }
        RealMatrix v = bread.multiply(meat).multiply(bread).scalarMultiply(scale);
        return new double[] {beta[key], Math.sqrt(v.getEntry(key, key))};
    }
}
