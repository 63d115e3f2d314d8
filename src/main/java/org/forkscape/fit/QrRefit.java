package org.forkscape.fit;

/**
 * The precision guard's route: least squares from the specification's rows by Householder QR, in the
 * given column order (key last), skipping a column whose remaining norm falls below {@link #TOLERANCE}
 * of its norm about the overall mean, the rule of R's lm (LINPACK dqrdc2, tol = 1e-7). Orthogonal
 * factorisation does not square the condition number (Golub &amp; Van Loan, Matrix Computations, 4th ed.,
 * section 5.3), and the residuals are recomputed from the rows, so the RSS does not cancel.
 */
final class QrRefit {
    static final double TOLERANCE = 1e-7;

    private double[][] work = new double[0][];
    /** Why the key column was dropped in the last call that returned {@code null}. */
    DropReason keyDropReason = DropReason.CONSTANT;
    private double[] qty = new double[0];

    /**
     * @param rows design in within coordinates (not modified)
     * @param mom  the moments of the same rows (for reference norms and collinearity wording)
     * @param cols model columns of {@code rows}, key last
     * @return the solution; {@code kept} excludes dropped columns and {@code null} means the key itself
     *         was dropped
     */
    KeySolution solve(DesignRows rows, Moments mom, int[] cols) {
        int n = rows.n;
        int p = cols.length;
        if (work.length < p) {
            work = new double[p][];
        }
        for (int j = 0; j < p; j++) {
            if (work[j] == null || work[j].length < n) {
                work[j] = new double[Math.max(n, 1)];
            }
            System.arraycopy(rows.x[j], 0, work[j], 0, n);
        }
        if (qty.length < n) {
            qty = new double[n];
        }
        System.arraycopy(rows.y, 0, qty, 0, n);
        int[] keptIdx = new int[p];
        double[] rdiag = new double[p];
        double[][] rcol = new double[p][];
        int rank = 0;
        KeySolution s = new KeySolution();
        int stride = mom.variant.columns;
        for (int j = 0; j < p; j++) {
            double[] col = work[j];
            double norm = 0;
            for (int i = rank; i < n; i++) {
                norm += col[i] * col[i];
            }
            norm = Math.sqrt(norm);
            double reference = Math.sqrt(mom.totalSquares[cols[j]]);
            if (!(norm > TOLERANCE * reference) || rank >= n) {
                if (j == p - 1) {
                    keyDropReason = why(mom, cols[j], stride, reference);
                    return null;
                }
                s.drop(mom.variant.layout.columnName(cols[j]), why(mom, cols[j], stride, reference).words);
                continue;
            }
            // Householder vector v = col[rank..] + sign * norm * e_rank, stored in place
            double alpha = col[rank] > 0 ? -norm : norm;
            col[rank] -= alpha;
            double vv = 0;
            for (int i = rank; i < n; i++) {
                vv += col[i] * col[i];
            }
            for (int k = j + 1; k < p; k++) {
                reflect(col, work[k], rank, n, vv);
            }
            reflect(col, qty, rank, n, vv);
            double[] r = new double[rank + 1];
            for (int k = 0; k < rank; k++) {
                r[k] = col[k];
            }
            r[rank] = alpha;
            rcol[rank] = r;
            rdiag[rank] = alpha;
            keptIdx[rank] = j;
            rank++;
        }
        // R is rank x rank upper triangular: column c holds rcol[c][0..c]
        double[] rinv = new double[rank * rank];
        for (int c = 0; c < rank; c++) {
            rinv[c * rank + c] = 1 / rcol[c][c];
            for (int i = c - 1; i >= 0; i--) {
                double t = 0;
                for (int k = i + 1; k <= c; k++) {
                    t += rcol[k][i] * rinv[k * rank + c];
                }
                rinv[i * rank + c] = -t / rcol[i][i];
            }
        }
        s.p = rank;
        s.kept = new int[rank];
        s.b = new double[rank];
        for (int c = 0; c < rank; c++) {
            s.kept[c] = cols[keptIdx[c]];
            double t = 0;
            for (int k = c; k < rank; k++) {
                t += rinv[c * rank + k] * qty[k];
            }
            s.b[c] = t;
        }
        // M = R^-T, lower triangular
        s.m = new double[rank * rank];
        for (int i = 0; i < rank; i++) {
            for (int j = 0; j <= i; j++) {
                s.m[i * rank + j] = rinv[j * rank + i];
            }
        }
        double rss = 0;
        for (int i = 0; i < n; i++) {
            double e = rows.y[i];
            for (int c = 0; c < rank; c++) {
                e -= rows.x[keptIdx[c]][i] * s.b[c];
            }
            rss += e * e;
        }
        s.rss = rss;
        s.keptPositions = keptIdx;
        return s;
    }

    private static void reflect(double[] v, double[] target, int from, int n, double vv) {
        if (vv == 0) {
            return;
        }
        double dot = 0;
        for (int i = from; i < n; i++) {
            dot += v[i] * target[i];
        }
        double f = 2 * dot / vv;
        for (int i = from; i < n; i++) {
            target[i] -= f * v[i];
        }
    }

    private static DropReason why(Moments mom, int col, int stride, double reference) {
        if (!(reference > 0)) {
            return DropReason.CONSTANT;
        }
        double withinNorm = Math.sqrt(Math.max(0, mom.within[col * stride + col]));
        if (mom.variant.absorbs && withinNorm <= TOLERANCE * reference * 10) {
            return DropReason.FIXED_EFFECTS;
        }
        return DropReason.OTHER_COLUMNS;
    }
}
