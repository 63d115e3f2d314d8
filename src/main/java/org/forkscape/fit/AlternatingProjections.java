package org.forkscape.fit;

/**
 * The within transformation for several crossed fixed-effect dimensions over one set of rows: each column
 * minus its projection on the span of every dimension's dummies, found by alternating projections (Gaure
 * 2013, "OLS with multiple high dimensional category variables", Computational Statistics &amp; Data Analysis
 * 66; Guimarães &amp; Portugal 2010, "A simple feasible procedure to fit models with high-dimensional fixed
 * effects", Stata Journal 10(4)), accelerated by conjugate gradients.
 *
 * <p>With Q_d the projection that subtracts each level's (weighted) mean of dimension d, the symmetric sweep
 * T = Q_1 Q_2 ... Q_D ... Q_2 Q_1 (Q_D once) is self-adjoint and positive semi-definite in the weighted inner
 * product, with T v = v exactly on the within space (every Q_d leaves v alone). Plain alternating projections
 * iterate x_{k+1} = T x_k, which converges (von Neumann-Halperin) linearly at a rate set by how well the levels
 * are connected, and can be slow on thinly connected panels. Here the same sweep is the operator of the
 * conjugate gradient method (Hestenes &amp; Stiefel 1952, "Methods of conjugate gradients for solving linear
 * systems", Journal of Research of the National Bureau of Standards 49(6)) for (I - T) z = (I - T) x, whose
 * solution from z = 0 lies in the dummies' span, so that x - z is the within column: the symmetric Kaczmarz
 * sweep with conjugate-gradient acceleration. Each iteration costs one sweep, 2D - 1 passes over the rows.
 *
 * <p>Stopping rule: the residual (I - T) x~ of the current within column x~, recomputed from x~ itself (one
 * sweep's movement), is at most {@link #TOLERANCE} times the norm of the column given (the caller centres it on
 * its mean); the conjugate-gradient recursion restarts from the true residual if rounding has let the two
 * drift apart. The error of x~ is then at most that residual divided by the smallest positive eigenvalue of
 * I - T (which the tests bound on thinly connected designs against the explicit dummies' residual);
 * {@link #MAX_ITERATIONS} sweeps without getting there are reported as not converged, never used.
 *
 * <p>Weights: level means are weighted means, sum w x / sum w, and norms are weighted, so an analytic weight
 * vector gives the weighted within transformation of weighted least squares; without weights every row
 * weighs 1. Rows are read in a fixed order, so the result is the same numbers whichever thread asks. Not
 * thread safe: its workspaces belong to the caller.
 */
final class AlternatingProjections {
    /** Relative residual at which a column counts as converged: ||(I - T) x~|| &lt;= 1e-14 ||x||. */
    static final double TOLERANCE = 1e-14;
    /** Sweeps after which a column that has not converged is reported as such. */
    static final int MAX_ITERATIONS = 10_000;

    private final int n;
    /** Per dimension: the level of each row, 0..levels-1 (dense over these rows). */
    private final int[][] codes;
    /** Per dimension and level: the sum of the rows' weights (the row count without weights). */
    private final double[][] levelWeight;
    /** The rows' weights, or null for 1 each. */
    private final double[] weights;
    private final double[][] levelSum;
    private final double[] r;
    private final double[] p;
    private final double[] ap;

    /** Sweeps the last {@link #demean} call took (for tests and the benchmark). */
    int iterations;

    /**
     * @param codes   per dimension, the dense level of each of the n rows (not modified, kept)
     * @param levels  per dimension, the number of levels
     * @param weights the rows' analytic weights (not modified, kept), or null for unweighted
     */
    AlternatingProjections(int[][] codes, int[] levels, double[] weights) {
        this.codes = codes;
        this.n = codes[0].length;
        this.weights = weights;
        levelWeight = new double[codes.length][];
        levelSum = new double[codes.length][];
        for (int d = 0; d < codes.length; d++) {
            double[] w = new double[levels[d]];
            int[] c = codes[d];
            for (int i = 0; i < n; i++) {
                w[c[i]] += weights == null ? 1 : weights[i];
            }
            levelWeight[d] = w;
            levelSum[d] = new double[levels[d]];
        }
        r = new double[n];
        p = new double[n];
        ap = new double[n];
    }

    /**
     * Replaces {@code x} (modified; n values) by its within column. Returns false when it did not converge
     * within {@link #MAX_ITERATIONS} sweeps (x then holds the last iterate, which must not be used).
     */
    boolean demean(double[] x) {
        double reference = Math.sqrt(inner(x, x));
        iterations = 0;
        if (reference == 0) {
            return true;
        }
        double stop = TOLERANCE * reference;
        while (true) {
            // the true residual (I - T) x~, not the one the recursion carries (rounding makes them drift apart):
            // the stopping rule holds for the column returned, and a drifted recursion restarts from here
            oneMinusSweep(x, r);
            double rr = inner(r, r);
            if (Math.sqrt(rr) <= stop) {
                return true;
            }
            if (iterations == MAX_ITERATIONS) {
                return false;
            }
            System.arraycopy(r, 0, p, 0, n);
            while (Math.sqrt(rr) > stop && iterations < MAX_ITERATIONS) {
                iterations++;
                oneMinusSweep(p, ap);
                double pap = inner(p, ap);
                if (!(pap > 0)) {
                    // the direction has left the dummies' span by rounding alone: check and restart
                    break;
                }
                double alpha = rr / pap;
                for (int i = 0; i < n; i++) {
                    x[i] -= alpha * p[i];
                    r[i] -= alpha * ap[i];
                }
                double next = inner(r, r);
                double beta = next / rr;
                rr = next;
                for (int i = 0; i < n; i++) {
                    p[i] = r[i] + beta * p[i];
                }
            }
        }
    }

    /** out = v - T v, one symmetric sweep (v not modified). */
    private void oneMinusSweep(double[] v, double[] out) {
        System.arraycopy(v, 0, out, 0, n);
        int last = codes.length - 1;
        for (int d = 0; d <= last; d++) {
            project(out, d);
        }
        for (int d = last - 1; d >= 0; d--) {
            project(out, d);
        }
        for (int i = 0; i < n; i++) {
            out[i] = v[i] - out[i];
        }
    }

    /** Subtracts dimension d's (weighted) level means from {@code v} (modified). */
    private void project(double[] v, int d) {
        double[] sum = levelSum[d];
        double[] w = levelWeight[d];
        int[] c = codes[d];
        java.util.Arrays.fill(sum, 0);
        if (weights == null) {
            for (int i = 0; i < n; i++) {
                sum[c[i]] += v[i];
            }
        } else {
            for (int i = 0; i < n; i++) {
                sum[c[i]] += weights[i] * v[i];
            }
        }
        for (int l = 0; l < sum.length; l++) {
            sum[l] = w[l] > 0 ? sum[l] / w[l] : 0;
        }
        for (int i = 0; i < n; i++) {
            v[i] -= sum[c[i]];
        }
    }

    private double inner(double[] a, double[] b) {
        if (weights == null) {
            return Kernels.dot(a, b, n);
        }
        double s = 0;
        for (int i = 0; i < n; i++) {
            s += weights[i] * a[i] * b[i];
        }
        return s;
    }
}
