package org.forkscape.fit;

/**
 * Solves one specification from its sub-matrix of the within cross-products: scale to unit diagonal,
 * factor by Cholesky with the key predictor last, and read the key coefficient, the residual sum of
 * squares and the inverse's key row from the factor. One instance per worker thread; it keeps its
 * workspace and allocates nothing per call beyond the returned solution.
 *
 * <p>Precision guard. Normal equations square the condition number (Golub &amp; Van Loan, Matrix
 * Computations, 4th ed., section 5.3.7), so this route declines, returning {@code null}, whenever the
 * answer could lose digits, or the collinearity rule could drop a column: a column that the fixed
 * effects nearly explain (below {@link #MIN_WITHIN_SHARE}), a non-positive or small pivot, a trace of the scaled inverse above
 * {@link #MAX_INVERSE_TRACE} (it bounds the scaled condition number by p times that value), or a
 * residual sum of squares below {@link #MIN_RESIDUAL_SHARE} of the outcome's (where RSS = y'y - z'z
 * cancels). The caller then refits that one specification from its rows by QR.
 */
final class CholeskySubsetSolver {
    /**
     * With a unit-diagonal matrix of condition at most p * 1e5, the relative error of the solution is
     * about 1e-16 * p * 1e5 (Higham, Accuracy and Stability of Numerical Algorithms, 2nd ed., theorem
     * 10.4), well inside the 1e-10 the engine promises against a QR refit.
     */
    static final double MAX_INVERSE_TRACE = 1e5;
    /**
     * A column whose within sum of squares is below this share of its total (about the overall mean) goes
     * to the QR refit, which applies the one collinearity rule ({@link QrRefit#TOLERANCE}). An accepted
     * pivot keeps at least 1 / {@link #MAX_INVERSE_TRACE} of the within square, so a column this route
     * keeps has a remaining squared norm of at least 1e-13 of its total, above the rule's 1e-14
     * (TOLERANCE squared): the two routes never disagree on which columns are dropped, near the fixed
     * effects included.
     */
    static final double MIN_WITHIN_SHARE = 1e-8;
    /** Below this share the subtraction y'y - z'z leaves fewer than ten exact digits of the RSS. */
    static final double MIN_RESIDUAL_SHARE = 1e-6;

    private double[] a = new double[0];
    private double[] linv = new double[0];
    private double[] ay = new double[0];
    private double[] z = new double[0];
    private double[] scale = new double[0];
    private double[] beta = new double[0];
    /** Reused for every call: valid until the next call. */
    private final KeySolution solution = new KeySolution();

    private void ensure(int p) {
        if (a.length < p * p) {
            beta = new double[p];
            a = new double[p * p];
            linv = new double[p * p];
            ay = new double[p];
            z = new double[p];
            scale = new double[p];
        }
    }

    /**
     * @param mom   the usable rows' moments
     * @param cols  model columns, controls first and key last
     * @param y     the outcome's model column
     * @return the solution (owned by this solver, valid until its next call), or {@code null} when the
     *         precision guard asks for a QR refit
     */
    KeySolution solve(Moments mom, int[] cols, int y) {
        int p = cols.length;
        int stride = mom.variant.columns;
        double[] w = mom.within;
        ensure(p);
        double yy = w[y * stride + y];
        if (!(yy > 0)) {
            return null;
        }
        double dy = Math.sqrt(yy);
        for (int i = 0; i < p; i++) {
            double d = w[cols[i] * stride + cols[i]];
            if (!(d > 0) || d < MIN_WITHIN_SHARE * mom.totalSquares[cols[i]]) {
                return null;
            }
            scale[i] = Math.sqrt(d);
        }
        for (int i = 0; i < p; i++) {
            int row = cols[i] * stride;
            for (int j = 0; j <= i; j++) {
                a[i * p + j] = w[row + cols[j]] / (scale[i] * scale[j]);
            }
            ay[i] = w[row + y] / (scale[i] * dy);
        }
        // Cholesky, lower triangle in place: a = L L'
        for (int j = 0; j < p; j++) {
            double d = a[j * p + j];
            for (int k = 0; k < j; k++) {
                d -= a[j * p + k] * a[j * p + k];
            }
            if (!(d > 1 / MAX_INVERSE_TRACE)) {
                return null;
            }
            double ljj = Math.sqrt(d);
            a[j * p + j] = ljj;
            for (int i = j + 1; i < p; i++) {
                double s = a[i * p + j];
                for (int k = 0; k < j; k++) {
                    s -= a[i * p + k] * a[j * p + k];
                }
                a[i * p + j] = s / ljj;
            }
        }
        // z = L^-1 ay; the scaled RSS is 1 - z'z
        double zz = 0;
        for (int i = 0; i < p; i++) {
            double s = ay[i];
            for (int k = 0; k < i; k++) {
                s -= a[i * p + k] * z[k];
            }
            z[i] = s / a[i * p + i];
            zz += z[i] * z[i];
        }
        double residualShare = 1 - zz;
        if (!(residualShare > MIN_RESIDUAL_SHARE)) {
            return null;
        }
        // L^-1, lower triangular, and the trace of the scaled inverse as ||L^-1||_F^2
        double trace = 0;
        for (int j = 0; j < p; j++) {
            linv[j * p + j] = 1 / a[j * p + j];
            trace += linv[j * p + j] * linv[j * p + j];
            for (int i = j + 1; i < p; i++) {
                double s = 0;
                for (int k = j; k < i; k++) {
                    s -= a[i * p + k] * linv[k * p + j];
                }
                linv[i * p + j] = s / a[i * p + i];
                trace += linv[i * p + j] * linv[i * p + j];
            }
        }
        if (!(trace < MAX_INVERSE_TRACE)) {
            return null;
        }
        KeySolution s = solution;
        s.kept = cols;
        s.p = p;
        s.b = beta;
        s.dropped = null;
        s.keptPositions = null;
        // beta~ = L^-T z, then undo the scaling
        for (int i = p - 1; i >= 0; i--) {
            double t = z[i];
            for (int k = i + 1; k < p; k++) {
                t -= a[k * p + i] * s.b[k];
            }
            s.b[i] = t / a[i * p + i];
        }
        for (int i = 0; i < p; i++) {
            s.b[i] *= dy / scale[i];
        }
        s.m = null;
        s.linv = linv;
        s.scale = scale;
        s.rss = residualShare * yy;
        return s;
    }
}
