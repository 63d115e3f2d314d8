package org.forkscape.fit;

/**
 * The key coefficient's HC0 and CR1 meats from moments instead of rows (see {@link FourthMoments} and
 * {@link ClusterMoments}); the scalings are those of {@link KeyCoefficientSandwich}. One per worker
 * thread: it keeps its workspace.
 */
final class RowFreeSandwich {
    private int[] aCols = new int[0];
    private double[] aVal = new double[0];
    private double[] w = new double[0];
    private int[] wPairs = new int[0];
    private double[] wPairCoef = new double[0];
    private double[] clusterScore = new double[0];
    private boolean[] clusterSeen = new boolean[0];

    private void ensure(int p) {
        if (aCols.length < p + 1) {
            aCols = new int[p + 1];
            aVal = new double[p + 1];
            w = new double[p];
            wPairs = new int[p * (p + 1) / 2];
            wPairCoef = new double[p * (p + 1) / 2];
        }
    }

    /** Loads a = (-b, 1) over (kept columns, y) and w, the key row of the inverse. */
    private void load(KeySolution s, int y) {
        int p = s.p;
        ensure(p);
        for (int c = 0; c < p; c++) {
            aCols[c] = s.kept[c];
            aVal[c] = -s.b[c];
        }
        aCols[p] = y;
        aVal[p] = 1;
        s.keyRow(w);
    }

    private double offset(double[] off, int[] cols, double[] val, int n) {
        double t = 0;
        for (int i = 0; i < n; i++) {
            t += off[cols[i]] * val[i];
        }
        return t;
    }

    /** sum e_i^2 u_i^2 over the usable rows (the HC0 meat), or NaN when it came out non-positive. */
    double hc0(Moments mom, KeySolution s, int y) {
        load(s, y);
        int p = s.p;
        double[] off = mom.levelMeanOffset[0];
        double alpha = offset(off, aCols, aVal, p + 1);
        double beta = offset(off, s.kept, w, p);
        double meat = mom.fourthMoments().meat(aCols, aVal, p + 1, s.kept, w, p, alpha, beta, wPairs, wPairCoef);
        return meat > 0 ? meat : Double.NaN;
    }

    /**
     * The CR1 meat, sum over clusters of (sum e_i u_i)^2, and the number of clusters in the rows.
     *
     * @return {meat, clusters}
     */
    double[] cluster(Moments mom, KeySolution s, int y, String column) {
        load(s, y);
        int p = s.p;
        int stride = mom.variant.columns;
        ClusterMoments.Usable cells = mom.clusterCells(column);
        if (clusterScore.length < cells.clusters) {
            clusterScore = new double[cells.clusters];
            clusterSeen = new boolean[cells.clusters];
        }
        java.util.Arrays.fill(clusterScore, 0, cells.clusters, 0);
        java.util.Arrays.fill(clusterSeen, 0, cells.clusters, false);
        int g = 0;
        for (int c = 0; c < cells.n.length; c++) {
            double[] off = mom.levelMeanOffset[cells.level[c]];
            double alpha = offset(off, aCols, aVal, p + 1);
            double beta = offset(off, s.kept, w, p);
            double[] cross = cells.cross[c];
            double[] sum = cells.sum[c];
            double asw = 0;
            for (int x = 0; x <= p; x++) {
                int row = aCols[x] * stride;
                double t = 0;
                for (int k = 0; k < p; k++) {
                    t += cross[row + s.kept[k]] * w[k];
                }
                asw += aVal[x] * t;
            }
            double as = offset(sum, aCols, aVal, p + 1);
            double ws = offset(sum, s.kept, w, p);
            clusterScore[cells.cluster[c]] += asw - beta * as - alpha * ws + cells.n[c] * alpha * beta;
            if (!clusterSeen[cells.cluster[c]]) {
                clusterSeen[cells.cluster[c]] = true;
                g++;
            }
        }
        double meat = 0;
        for (int c = 0; c < cells.clusters; c++) {
            meat += clusterScore[c] * clusterScore[c];
        }
        return new double[] {meat, g};
    }
}
