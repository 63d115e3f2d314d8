package org.forkscape.fit;

/**
 * A specification's rows materialised in within coordinates (each value minus its fixed-effect level's
 * mean, or the overall mean), column by column, for the passes that need rows: the sandwich, the
 * leverages and the QR refit. One instance per worker thread; buffers grow and are reused.
 */
final class DesignRows {
    int n;
    int p;
    /** x[j][i], j over the requested columns. */
    double[][] x = new double[0][];
    double[] y = new double[0];
    /** Fixed-effect level (or 0) of each row, and the level's usable count. */
    int[] level = new int[0];
    int[] cluster = new int[0];
    /** The variant row each row is (a bootstrap draw repeats one). */
    int[] source = new int[0];

    /**
     * Rows that stand for a specification's rows under least squares: the triangular factor R of its design
     * and outcome [X y] = Q R (at most p + 1 rows, each {@code factor[i]} one row over the p columns and the
     * outcome), which has the same column norms after each orthogonal step, the same solution and the same
     * residual norm as the rows themselves. No cluster codes or levels: only a QR refit may read them.
     */
    static DesignRows ofFactor(double[][] factor, int p) {
        DesignRows rows = new DesignRows();
        int n = factor.length;
        rows.n = n;
        rows.p = p;
        rows.x = new double[p][n];
        rows.y = new double[n];
        rows.level = new int[n];
        rows.cluster = new int[n];
        rows.source = new int[n];
        for (int i = 0; i < n; i++) {
            for (int j = 0; j < p; j++) {
                rows.x[j][i] = factor[i][j];
            }
            rows.y[i] = factor[i][p];
        }
        return rows;
    }

    void fill(Moments mom, int[] cols, int yCol, int[] clusterCodes) {
        DataVariant v = mom.variant;
        p = cols.length;
        int cap = mom.n;
        if (x.length < p) {
            double[][] grown = new double[p][];
            System.arraycopy(x, 0, grown, 0, x.length);
            x = grown;
        }
        for (int j = 0; j < p; j++) {
            if (x[j] == null || x[j].length < cap) {
                x[j] = new double[cap];
            }
        }
        if (y.length < cap) {
            y = new double[cap];
            level = new int[cap];
            cluster = new int[cap];
            source = new int[cap];
        }
        int k = 0;
        double[] yz = v.shifted[yCol];
        double[][] offsets = mom.levelMeanOffset;
        for (int r = 0; r < v.rows; r++) {
            if (!mom.uses(r)) {
                continue;
            }
            int l = v.level[r];
            double[] off = offsets[l];
            for (int j = 0; j < p; j++) {
                x[j][k] = v.shifted[cols[j]][r] - off[cols[j]];
            }
            y[k] = yz[r] - off[yCol];
            level[k] = l;
            source[k] = r;
            if (clusterCodes != null) {
                cluster[k] = clusterCodes[r];
            }
            k++;
        }
        n = k;
    }
}
