package org.forkscape.fit;

/**
 * A specification's rows materialised in within coordinates (each value minus its fixed-effect level's
 * mean, or the overall mean), column by column, for the passes that need rows: the sandwich, the
 * leverages and the QR refit. In a weighted variant each row is multiplied by the square root of its
 * weight after centring on the weighted level means, so that least squares on these rows is weighted
 * least squares, their residuals are the weighted residuals sqrt(w) e, and the scores and leverages the
 * sandwich reads are those of R's weighted {@code lm} (its {@code lm.wfit} works on the same scaled rows).
 * One instance per worker thread; buffers grow and are reused.
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
    /** The weight of each row, meaningful when {@link #weighted}. */
    double[] weight = new double[0];
    /** Whether the rows are scaled by the square roots of their weights. */
    boolean weighted;

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
            weight = new double[cap];
        }
        int k = 0;
        double[][] stored = v.rowColumns(mom);
        double[] yz = stored[yCol];
        double[][] offsets = mom.levelMeanOffset;
        double[] w = v.weight;
        weighted = w != null;
        for (int r = 0; r < v.rows; r++) {
            if (!mom.uses(r)) {
                continue;
            }
            int l = v.level[r];
            double[] off = offsets[l];
            double root = weighted ? Math.sqrt(w[r]) : 1;
            for (int j = 0; j < p; j++) {
                x[j][k] = (stored[cols[j]][r] - off[cols[j]]) * root;
            }
            y[k] = (yz[r] - off[yCol]) * root;
            if (weighted) {
                weight[k] = w[r];
            }
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
