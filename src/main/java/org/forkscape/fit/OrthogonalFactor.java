package org.forkscape.fit;

/**
 * The lower factor of a weighted within information from Householder QR of the weighted within design A
 * itself, column by column, instead of Cholesky of A'A (Golub &amp; Van Loan, Matrix Computations, 4th ed.,
 * section 5.2): with A = QR, L = R' up to the signs of R's rows, made positive on the diagonal. Orthogonal
 * factorisation does not square the condition number, so L keeps its digits where the Cholesky of A'A
 * would not (R's {@code summary.glm} takes its covariance from the same R). Columns are taken in order;
 * when deciding, one whose remaining norm is below {@link QrRefit#TOLERANCE} of its own is dropped. Both
 * scoring iterations switch to it ({@link Irls}, {@link SeveralEffectsIrls}) below
 * {@link Irls#ORTHOGONAL_BELOW_SHARE}. Not thread safe: its buffers belong to one iteration.
 */
final class OrthogonalFactor {
    /** Column j of the weighted within design over the fit's n rows. */
    interface Design {
        void column(int j, double[] into);
    }

    /** The design's columns, overwritten by their Householder vectors. */
    private double[][] design = new double[0][];
    private double[] householderScale = new double[0];
    private int[] keptOrder = new int[0];
    private boolean[] negativeDiagonal = new boolean[0];

    /**
     * Writes L (p x p row-major, the kept columns' rows and columns) into {@code factor}.
     *
     * @param considered per column, whether it takes part (when deciding, the columns not spanned by the
     *                   fixed effects; otherwise the kept ones)
     * @param kept       the kept columns: set here when {@code decide}, read otherwise
     * @return the number of kept columns, or -1 when (not deciding) a kept column has no remaining norm
     */
    int factor(int n, int p, Design source, boolean[] considered, boolean[] kept, boolean decide, double[] factor) {
        if (design.length < p || design[0].length < n) {
            design = new double[p][Math.max(n, 1)];
            householderScale = new double[p];
            keptOrder = new int[p];
            negativeDiagonal = new boolean[p];
        }
        int rank = 0;
        double tolerance = QrRefit.TOLERANCE * QrRefit.TOLERANCE;
        for (int j = 0; j < p; j++) {
            if (!considered[j]) {
                continue;
            }
            double[] a = design[j];
            source.column(j, a);
            double own = 0;
            for (int i = 0; i < n; i++) {
                own += a[i] * a[i];
            }
            for (int t = 0; t < rank; t++) {
                double[] v = design[keptOrder[t]];
                double s = 0;
                for (int i = t; i < n; i++) {
                    s += v[i] * a[i];
                }
                s *= householderScale[t];
                for (int i = t; i < n; i++) {
                    a[i] -= s * v[i];
                }
            }
            double remaining = 0;
            for (int i = rank; i < n; i++) {
                remaining += a[i] * a[i];
            }
            if (decide) {
                kept[j] = own > 0 && remaining > tolerance * own;
                if (!kept[j]) {
                    continue;
                }
            } else if (!(remaining > 0)) {
                return -1;
            }
            for (int t = 0; t < rank; t++) {
                double r = a[t];
                factor[j * p + keptOrder[t]] = negativeDiagonal[t] ? -r : r;
            }
            double norm = Math.sqrt(remaining);
            double head = a[rank];
            double diagonal = head > 0 ? -norm : norm;
            factor[j * p + j] = norm;
            negativeDiagonal[rank] = diagonal < 0;
            // the reflector v = a - diagonal e_rank, scaled so that H = I - scale v v'
            a[rank] = head - diagonal;
            householderScale[rank] = 1 / (norm * (norm + Math.abs(head)));
            keptOrder[rank] = j;
            rank++;
        }
        return rank;
    }

    /** After deciding: the kept columns' count ({@code rank}), each dropped column's coefficient set to 0. */
    static int dropped(int rank, boolean[] kept, double[] beta, int p) {
        for (int j = 0; j < p; j++) {
            if (!kept[j]) {
                beta[j] = 0;
            }
        }
        return Math.max(rank, 0);
    }
}
