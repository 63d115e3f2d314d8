package org.forkscape.fit;

/**
 * The key coefficient's HC0 and CR1 meats from moments instead of rows (see {@link FourthMoments} and
 * {@link ClusterMoments}); the scalings are those of {@link KeyCoefficientSandwich}. One per worker
 * thread: it keeps its workspace.
 *
 * <p>Each meat comes with a bound on its rounding error, from the stored moments alone (see
 * {@link SandwichRoute}): with z the stored columns, a the residual's coefficients and w the key row of
 * the inverse, both meats are sums of products whose absolute values add up to at most a bound B of the
 * sums over rows of (|z|'|a| + |alpha|)(|z|'|w| + |beta|) (squared for HC0). Writing each row as
 * (z_j / s_j, 1 / sqrt(n)) and each coefficient vector as (a_j s_j, alpha sqrt(n)), with s_j^2 the
 * column's stored sum of squares, the Cauchy-Schwarz inequality gives |z|'|a| + |alpha| at most the
 * product of the two vectors' norms; the rows' scaled norms, squared or to the fourth power, sum to
 * entries of the stored moments. A meat is declined, and the row pass used instead, when B exceeds
 * {@link SandwichRoute#MAX_AMPLIFICATION} times the meat.
 */
final class RowFreeSandwich {
    /**
     * A meat computed without rows.
     *
     * @param value    the meat, before the degrees-of-freedom scaling
     * @param clusters clusters present in the rows (CR1 only, else 0)
     */
    record Meat(double value, int clusters, VarianceRoute route) {
    }

    private int[] aCols = new int[0];
    private double[] aVal = new double[0];
    private double[] w = new double[0];
    private int[] wPairs = new int[0];
    private double[] wPairCoef = new double[0];
    private double[] clusterScore = new double[0];
    private double[] clusterAbsolute = new double[0];
    private boolean[] clusterSeen = new boolean[0];
    private double[] squares = new double[0];

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

    /**
     * sum e_i^2 u_i^2 over the usable rows (the HC0 meat), or {@code null} when it came out non-positive
     * or its rounding error bound is too large.
     */
    Meat hc0(Moments mom, KeySolution s, int y) {
        load(s, y);
        int p = s.p;
        double[] off = mom.levelMeanOffset[0];
        double alpha = offset(off, aCols, aVal, p + 1);
        double beta = offset(off, s.kept, w, p);
        FourthMoments moments = mom.fourthMoments();
        double meat = moments.meat(aCols, aVal, p + 1, s.kept, w, p, alpha, beta, wPairs, wPairCoef);
        double bound = moments.absoluteBound(aCols, aVal, p + 1, w, p, alpha, beta);
        if (!(meat > 0) || !(bound <= SandwichRoute.MAX_AMPLIFICATION * meat)) {
            return null;
        }
        return new Meat(meat, 0, VarianceRoute.FOURTH_MOMENTS);
    }

    private double[] pairCoef = new double[0];
    private int[] pairList = new int[0];

    /**
     * The CR1 meat beside two absorbed columns, from the per-cluster cells of the set's demeaned rows
     * ({@link ClusterMoments.WithinCells}; offsets 0, so each cluster's score is a'S_g w alone), or
     * {@code null} when its rounding error bound is too large. The score collects, per column pair of the
     * specification, the coefficient a_i w_j + a_j w_i once, and adds each pair's stream over the clusters in
     * a fixed order. The bound is {@link #cluster}'s with alpha = beta = 0.
     */
    Meat clusterWithinRows(Moments mom, KeySolution s, int y, String column) {
        load(s, y);
        int p = s.p;
        ClusterMoments.WithinCells cells = mom.withinClusterCells(column);
        int g = cells.clusters;
        if (g < 2) {
            return new Meat(0, g, VarianceRoute.CLUSTER_CELLS);
        }
        int stride = cells.columns;
        int pairs = stride * (stride + 1) / 2;
        if (pairCoef.length < pairs) {
            pairCoef = new double[pairs];
            pairList = new int[pairs];
        }
        if (clusterScore.length < g) {
            clusterScore = new double[g];
            clusterAbsolute = new double[g];
        }
        if (squares.length < p + 1) {
            squares = new double[p + 1];
        }
        // pairs in order of first use, each coefficient summed in (x, k) order
        int listed = 0;
        for (int x = 0; x <= p; x++) {
            for (int k = 0; k < p; k++) {
                int pair = cells.pairIndex[aCols[x] * stride + s.kept[k]];
                double c = aVal[x] * w[k];
                boolean known = false;
                for (int t = 0; t < listed; t++) {
                    if (pairList[t] == pair) {
                        pairCoef[t] += c;
                        known = true;
                        break;
                    }
                }
                if (!known) {
                    pairList[listed] = pair;
                    pairCoef[listed++] = c;
                }
            }
        }
        double[] score = clusterScore;
        java.util.Arrays.fill(score, 0, g, 0);
        for (int t = 0; t < listed; t++) {
            double c = pairCoef[t];
            double[] cross = cells.cross[pairList[t]];
            for (int q = 0; q < g; q++) {
                score[q] += c * cross[q];
            }
        }
        double n = mom.n;
        double[] rowNorms = clusterAbsolute;
        for (int q = 0; q < g; q++) {
            rowNorms[q] = cells.n[q] / n;
        }
        double aNorm = 0;
        double wNorm = 0;
        for (int x = 0; x <= p; x++) {
            double[] diagonal = cells.cross[cells.pairIndex[aCols[x] * stride + aCols[x]]];
            double total = 0;
            for (int q = 0; q < g; q++) {
                total += diagonal[q];
            }
            aNorm += aVal[x] * aVal[x] * total;
            if (x < p) {
                wNorm += w[x] * w[x] * total;
            }
            double inverse = 1 / total;
            for (int q = 0; q < g; q++) {
                rowNorms[q] += diagonal[q] * inverse;
            }
        }
        double scale = Math.sqrt(aNorm * wNorm);
        double meat = 0;
        double bound = 0;
        for (int q = 0; q < g; q++) {
            meat += score[q] * score[q];
            bound += 2 * Math.abs(score[q]) * scale * rowNorms[q];
        }
        if (!(meat > 0) || !(bound <= SandwichRoute.MAX_AMPLIFICATION * meat)) {
            return null;
        }
        return new Meat(meat, g, VarianceRoute.CLUSTER_CELLS);
    }

    /**
     * The CR1 meat, sum over clusters of (sum e_i u_i)^2, with the number of clusters in the rows; or
     * {@code null} when its rounding error bound is too large. With e_i u_i summed over a cell of n_c
     * rows, the absolute bound is sqrt(A_l W_l) T_c, where A_l and W_l are the scaled norms of (a, alpha_l)
     * and (w, beta_l) and T_c the cell's sum of the rows' squared scaled norms; a cluster score's error
     * is at most a multiple of the roundoff times the sum over its cells, so the meat's relative error
     * is bounded by 2 sum_g |score_g| bound_g / meat.
     */
    Meat cluster(Moments mom, KeySolution s, int y, String column) {
        load(s, y);
        int p = s.p;
        int stride = mom.variant.columns;
        ClusterMoments.Usable cells = mom.clusterCells(column);
        if (clusterScore.length < cells.clusters) {
            clusterScore = new double[cells.clusters];
            clusterAbsolute = new double[cells.clusters];
            clusterSeen = new boolean[cells.clusters];
        }
        if (squares.length < p + 1) {
            squares = new double[p + 1];
        }
        java.util.Arrays.fill(clusterScore, 0, cells.clusters, 0);
        java.util.Arrays.fill(clusterAbsolute, 0, cells.clusters, 0);
        java.util.Arrays.fill(clusterSeen, 0, cells.clusters, false);
        java.util.Arrays.fill(squares, 0, p + 1, 0);
        // in a weighted variant the cells hold weighted sums, and the counts become weight totals
        double[] weight = cells.weight;
        double n = 0;
        for (int c = 0; c < cells.n.length; c++) {
            double[] cross = cells.cross[c];
            for (int x = 0; x <= p; x++) {
                squares[x] += cross[aCols[x] * stride + aCols[x]];
            }
            n += weight == null ? cells.n[c] : weight[c];
        }
        double aNorm = 0;
        double wNorm = 0;
        for (int x = 0; x <= p; x++) {
            aNorm += aVal[x] * aVal[x] * squares[x];
            if (x < p) {
                wNorm += w[x] * w[x] * squares[x];
            }
        }
        int g = 0;
        for (int c = 0; c < cells.n.length; c++) {
            double[] off = mom.levelMeanOffset[cells.level[c]];
            double alpha = offset(off, aCols, aVal, p + 1);
            double beta = offset(off, s.kept, w, p);
            double[] cross = cells.cross[c];
            double[] sum = cells.sum[c];
            double asw = 0;
            double rows = weight == null ? cells.n[c] : weight[c];
            double rowNorms = rows / n;
            for (int x = 0; x <= p; x++) {
                int row = aCols[x] * stride;
                double t = 0;
                for (int k = 0; k < p; k++) {
                    t += cross[row + s.kept[k]] * w[k];
                }
                asw += aVal[x] * t;
                rowNorms += cross[row + aCols[x]] / squares[x];
            }
            double as = offset(sum, aCols, aVal, p + 1);
            double ws = offset(sum, s.kept, w, p);
            int cluster = cells.cluster[c];
            clusterScore[cluster] += asw - beta * as - alpha * ws + rows * alpha * beta;
            clusterAbsolute[cluster] += Math.sqrt((aNorm + alpha * alpha * n) * (wNorm + beta * beta * n))
                    * rowNorms;
            if (!clusterSeen[cluster]) {
                clusterSeen[cluster] = true;
                g++;
            }
        }
        if (g < 2) {
            return new Meat(0, g, VarianceRoute.CLUSTER_CELLS);
        }
        double meat = 0;
        double bound = 0;
        for (int c = 0; c < cells.clusters; c++) {
            meat += clusterScore[c] * clusterScore[c];
            bound += 2 * Math.abs(clusterScore[c]) * clusterAbsolute[c];
        }
        if (!(meat > 0) || !(bound <= SandwichRoute.MAX_AMPLIFICATION * meat)) {
            return null;
        }
        return new Meat(meat, g, VarianceRoute.CLUSTER_CELLS);
    }
}
