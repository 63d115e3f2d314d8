package org.forkscape.fit;

/**
 * The least-squares solution of one specification in the within (centered) coordinates, as both solvers
 * deliver it: the columns kept (key last), their coefficients, the residual sum of squares, and a lower
 * triangular M with (X'X)^-1 = M'M, so that leverages are ||M x||^2 and the key row of the inverse is
 * M_kk times the last row of M.
 */
final class KeySolution {
    int[] kept;
    int p;
    double[] b;
    /** p x p, row-major, lower triangular; null when {@link #linv} and {@link #scale} stand for it. */
    double[] m;
    /** The Cholesky route's inverse factor of the scaled matrix and the column scales: M = L^-1 D^-1. */
    double[] linv;
    double[] scale;
    double rss;
    /** Positions in the requested column order of the kept columns (QR route only; null otherwise). */
    int[] keptPositions;
    /** Dropped model columns by reason, for the status note; null when none. */
    java.util.Map<String, java.util.List<String>> dropped;

    double keyEstimate() {
        return b[p - 1];
    }

    /** Entry (i, j) of M. */
    double mAt(int i, int j) {
        return m != null ? m[i * p + j] : linv[i * p + j] / scale[j];
    }

    /** (X'X)^-1 at the key position. */
    double keyInverseDiagonal() {
        double mkk = mAt(p - 1, p - 1);
        return mkk * mkk;
    }

    /** The key row of (X'X)^-1 into {@code w} (modified). */
    void keyRow(double[] w) {
        double mkk = mAt(p - 1, p - 1);
        for (int j = 0; j < p; j++) {
            w[j] = mkk * mAt(p - 1, j);
        }
    }

    void drop(String column, String reason) {
        if (dropped == null) {
            dropped = new java.util.LinkedHashMap<>();
        }
        dropped.computeIfAbsent(reason, r -> new java.util.ArrayList<>()).add(column);
    }

    /** "dropped a, b: reason; c: other reason", or empty. */
    String note() {
        return DropReason.note(dropped);
    }
}
