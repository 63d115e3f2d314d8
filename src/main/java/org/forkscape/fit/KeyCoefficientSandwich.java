package org.forkscape.fit;

import org.forkscape.plan.ErrorType;

/**
 * Heteroskedasticity-robust and cluster-robust variance of the key coefficient alone, in one fused
 * pass over the specification's rows. With w the key row of (X'X)^-1, u_i = x_i'w and residuals e_i:
 * HC0 = sum e_i^2 u_i^2 (White 1980, "A heteroskedasticity-consistent covariance matrix estimator and a
 * direct test for heteroskedasticity", Econometrica 48(4)); HC1 scales by N/(N-K); HC2 and HC3 divide
 * each term by (1-h_i) and (1-h_i)^2 (MacKinnon &amp; White 1985, "Some heteroskedasticity-consistent
 * covariance matrix estimators with improved finite sample properties", J. Econometrics 29(3)); CR1 =
 * G/(G-1) (N-1)/(N-K) sum over clusters of (sum e_i u_i)^2 (Cameron &amp; Miller 2015, "A practitioner's
 * guide to cluster-robust inference", J. Human Resources 50(2)). Leverages h_i = 1/n_level + ||M x_i||^2,
 * the hat matrix of the model with explicit intercept or dummies; beside two absorbed columns the first term
 * is the crossed dummies' own leverage ({@link CrossedDummyLeverage}), the hat matrix of a partitioned
 * regression being the sum of the dummies' and the demeaned columns' (Frisch-Waugh-Lovell). Weighted least squares is the same pass
 * over rows scaled by sqrt(w_i): the scores become w_i e_i x_i and h_i = w_i / W_level + w_i ||M x_i||^2,
 * which is what {@code sandwich}'s {@code estfun.lm} and {@code hatvalues} give for a weighted {@code lm}
 * (Zeileis 2006, "Object-oriented computation of sandwich estimators", Journal of Statistical Software
 * 16(9)). Each row is read once, in blocks
 * small enough to stay in cache; nothing is materialised beyond the block. For rows held in parts the same
 * pass runs over each part's rows ({@link #partSum}), the parts' meats are added, and {@link #finish} makes
 * the variance as {@link #variance} does ({@link RowPassesByParts}).
 */
final class KeyCoefficientSandwich {
    /** A leverage this close to 1 makes HC2 and HC3 undefined. */
    static final double LEVERAGE_ONE = 1 - 1e-10;

    /**
     * The rows as the pass reads them: one array per kept column (key last) and the outcome, indexed by
     * row; the rows to use; each row's level and cluster; per level the offsets that turn the stored
     * values into within values.
     */
    static final class RowView {
        double[][] x = new double[0][];
        double[] y;
        int[] rows;
        int n;
        int[] level;
        double[][] offset;
        double[] yOffset;
        int[] levelCount;
        /** Per level: the usable rows' weight total (the count when unweighted). */
        double[] levelWeight;
        /** Each row's analytic weight (indexed as the rows are), null when unweighted. */
        double[] weight;
        /** Whether the pass scales each row by sqrt(weight) (false when the rows are already scaled). */
        boolean scaleRows;
        int[] cluster;
        int clusterCount;
        /**
         * Beside two absorbed columns, for HC2 and HC3: the dummies' part of each row's leverage, by variant row;
         * null otherwise (the part is then 1/n_level, or w_i/W_level).
         */
        DummyLeverage dummies;
        /** The variant row of each row the view reads, when they are materialised rows; null when rows are variant rows. */
        int[] source;
        private double[][] offsets = new double[0][];
        private double[] yOffsets = new double[0];

        /**
         * Points the view at stored (level-shifted) columns: {@code columns[kept[c]]} for the kept
         * columns and {@code columns[y]}, read through {@code rows} (null for every row in order) with
         * the usable rows' level means of {@code mom} as offsets.
         */
        RowView over(double[][] columns, int[] kept, int p, int y, Moments mom, int[] rows, int[] clusterCodes,
                int clusters) {
            DataVariant v = mom.variant;
            if (x.length < p) {
                x = new double[p][];
            }
            for (int c = 0; c < p; c++) {
                x[c] = columns[kept[c]];
            }
            if (offsets.length != v.levels || offsets[0].length < p) {
                offsets = new double[v.levels][p];
                yOffsets = new double[v.levels];
            }
            for (int l = 0; l < v.levels; l++) {
                double[] off = mom.levelMeanOffset[l];
                for (int c = 0; c < p; c++) {
                    offsets[l][c] = off[kept[c]];
                }
                yOffsets[l] = off[y];
            }
            this.y = columns[y];
            this.rows = rows;
            this.n = mom.n;
            this.level = v.level;
            this.offset = offsets;
            this.yOffset = yOffsets;
            this.levelCount = mom.levelCount;
            this.levelWeight = mom.levelWeight;
            this.weight = v.weight;
            this.scaleRows = v.weight != null;
            this.cluster = clusterCodes;
            this.clusterCount = clusters;
            this.dummies = null;
            this.source = null;
            return this;
        }

        /**
         * Points the view at rows already materialised in within coordinates: column {@code positions[c]}
         * of {@code design} for kept column c, every row in order, no offsets.
         */
        RowView overRows(DesignRows design, int[] positions, int p, Moments mom, int clusters) {
            if (x.length < p) {
                x = new double[p][];
            }
            for (int c = 0; c < p; c++) {
                x[c] = design.x[positions[c]];
            }
            int levels = mom.levelCount.length;
            if (offsets.length != levels || offsets[0].length < p) {
                offsets = new double[levels][p];
                yOffsets = new double[levels];
            }
            for (int l = 0; l < levels; l++) {
                java.util.Arrays.fill(offsets[l], 0);
            }
            java.util.Arrays.fill(yOffsets, 0);
            this.y = design.y;
            this.rows = null;
            this.n = design.n;
            this.level = design.level;
            this.offset = offsets;
            this.yOffset = yOffsets;
            this.levelCount = mom.levelCount;
            this.levelWeight = mom.levelWeight;
            this.weight = design.weighted ? design.weight : null;
            this.scaleRows = false;
            this.cluster = design.cluster;
            this.clusterCount = clusters;
            this.dummies = null;
            this.source = design.source;
            return this;
        }

        /** Sets the dummies' part of the leverages (see {@link #dummies}); returns this. */
        RowView withDummyLeverage(DummyLeverage d) {
            this.dummies = d;
            return this;
        }

        /**
         * Points the view at a part of a specification's rows held elsewhere ({@link RowPassRequest}): the
         * part's stored (level-shifted) columns {@code columns[kept[c]]} and {@code columns[y]}, read through
         * {@code rows}, its rows' levels, and the whole specification's offsets and level counts (one row per
         * level and kept column, then the outcome's offset last), no clusters; in a weighted variant the part's
         * rows' weights and the whole specification's level weight totals, each row scaled by sqrt(w) as
         * {@link #over} scales it.
         *
         * @param weight       the part's rows' weights, null when unweighted (not modified)
         * @param levelWeights per level, the specification's usable weight total; null when unweighted
         */
        RowView overPart(double[][] columns, int[] level, int[] kept, int y, int[] rows, int n,
                double[][] levelOffsets, int[] levelCounts, double[] weight, double[] levelWeights) {
            int p = kept.length;
            if (x.length < p) {
                x = new double[p][];
            }
            for (int c = 0; c < p; c++) {
                x[c] = columns[kept[c]];
            }
            if (offsets.length != levelOffsets.length || offsets[0].length < p) {
                offsets = new double[levelOffsets.length][p];
                yOffsets = new double[levelOffsets.length];
            }
            for (int l = 0; l < levelOffsets.length; l++) {
                System.arraycopy(levelOffsets[l], 0, offsets[l], 0, p);
                yOffsets[l] = levelOffsets[l][p];
            }
            this.y = columns[y];
            this.rows = rows;
            this.n = n;
            this.level = level;
            this.offset = offsets;
            this.yOffset = yOffsets;
            this.levelCount = levelCounts;
            this.levelWeight = levelWeights;
            this.weight = weight;
            this.scaleRows = weight != null;
            this.cluster = null;
            this.clusterCount = 0;
            return this;
        }
    }

    /**
     * Sets the rows' cluster codes on a part's view ({@link RowView#overPart}), for {@link #partClusterScores};
     * returns the view.
     */
    static RowView withClusters(RowView view, int[] codes, int count) {
        view.cluster = codes;
        view.clusterCount = count;
        return view;
    }

    /** Rows per block: the block's columns stay in the first-level cache. */
    static final int BLOCK = 256;

    private double[][] blockX = new double[0][];
    private final int[] blockRow = new int[BLOCK];
    private final int[] blockLevel = new int[BLOCK];
    private final double[] blockE = new double[BLOCK];
    private final double[] blockU = new double[BLOCK];
    private final double[] blockH = new double[BLOCK];
    private final double[] blockV = new double[BLOCK];
    private double[] m = new double[0];
    private double[] w = new double[0];
    private double[] clusterScore = new double[0];
    private boolean[] clusterSeen = new boolean[0];

    private void ensureBlock(int p) {
        if (blockX.length < p) {
            blockX = new double[p][BLOCK];
        }
    }

    /**
     * Result of one computation: the variance, or NaN with the status that says why (and its detail);
     * the cluster count for CR1.
     */
    record Variance(double value, int clusters, FitStatus failure, String failureDetail) {
    }

    /**
     * @param view the rows (not modified)
     * @param s    the solution
     * @param type HC0..HC3 or cluster
     * @param k    number of coefficients K
     */
    Variance variance(RowView view, KeySolution s, ErrorType type, int k) {
        int p = s.p;
        ensure(p);
        s.keyRow(w);
        boolean leverage = type.kind() == ErrorType.Kind.HC2 || type.kind() == ErrorType.Kind.HC3;
        if (leverage && view.dummies != null && view.dummies.illConditioned()) {
            return new Variance(Double.NaN, 0, FitStatus.LEVERAGE_ILL_CONDITIONED, type.label());
        }
        if (leverage) {
            for (int i = 0; i < p; i++) {
                for (int j = 0; j <= i; j++) {
                    m[i * p + j] = s.mAt(i, j);
                }
            }
        }
        boolean cluster = type.kind() == ErrorType.Kind.CLUSTER;
        if (cluster && clusterScore.length < view.clusterCount) {
            clusterScore = new double[view.clusterCount];
            clusterSeen = new boolean[view.clusterCount];
        }
        if (cluster) {
            java.util.Arrays.fill(clusterScore, 0, view.clusterCount, 0);
            java.util.Arrays.fill(clusterSeen, 0, view.clusterCount, false);
        }
        double sum = rowSum(view, p, s.b, type.kind());
        int n = view.n;
        if (cluster) {
            int groups = 0;
            double meat = 0;
            for (int g = 0; g < view.clusterCount; g++) {
                if (clusterSeen[g]) {
                    groups++;
                }
                meat += clusterScore[g] * clusterScore[g];
            }
            if (groups < 2) {
                return new Variance(Double.NaN, groups, FitStatus.ONE_CLUSTER, "");
            }
            return new Variance(meat * groups / (groups - 1) * (n - 1.0) / (n - k), groups, null, "");
        }
        return finish(sum, type, n, k);
    }

    /**
     * The HC0 to HC3 variance from the meat summed over every usable row: NaN (a leverage of one, which makes
     * HC2 and HC3 undefined) becomes that status; HC1 scales by N/(N-K).
     *
     * @param sum the meat over all {@code n} usable rows, a sum of {@link #partSum}s in a fixed order or one
     *            {@link #rowSum}
     */
    static Variance finish(double sum, ErrorType type, int n, int k) {
        if (Double.isNaN(sum)) {
            return new Variance(Double.NaN, 0, FitStatus.LEVERAGE_ONE, type.label());
        }
        return new Variance(type.kind() == ErrorType.Kind.HC1 ? sum * n / (n - k) : sum, 0, null, "");
    }

    /**
     * The HC0 to HC3 meat over the rows of {@code view} alone (a part of a specification's rows), from the
     * solution's pieces: {@code b} the coefficients, {@code w} the key row of (X'X)^-1, {@code m} the lower
     * triangular M with (X'X)^-1 = M'M (row-major p x p; read for HC2 and HC3 only), none modified. NaN when a
     * row's leverage is one: NaN stays NaN through the sum of the parts, and {@link #finish} reports it.
     */
    double partSum(RowView view, int p, double[] b, double[] w, double[] m, ErrorType.Kind kind) {
        ensure(p);
        System.arraycopy(w, 0, this.w, 0, p);
        if (kind == ErrorType.Kind.HC2 || kind == ErrorType.Kind.HC3) {
            System.arraycopy(m, 0, this.m, 0, p * p);
        }
        return rowSum(view, p, b, kind);
    }

    /**
     * Each cluster's score over the rows of {@code view} alone (a part of a specification's rows): sum of
     * e_i u_i over the cluster's rows (w_i e_i u_i when weighted), the CR1 meat's terms before they are squared,
     * from the solution's pieces {@code b} and {@code w} (not modified); NaN for a code with no row here. The
     * scores of the parts add up to the whole's, cluster by cluster.
     */
    double[] partClusterScores(RowView view, int p, double[] b, double[] w) {
        ensure(p);
        System.arraycopy(w, 0, this.w, 0, p);
        if (clusterScore.length < view.clusterCount) {
            clusterScore = new double[view.clusterCount];
            clusterSeen = new boolean[view.clusterCount];
        }
        java.util.Arrays.fill(clusterScore, 0, view.clusterCount, 0);
        java.util.Arrays.fill(clusterSeen, 0, view.clusterCount, false);
        rowSum(view, p, b, ErrorType.Kind.CLUSTER);
        double[] out = new double[view.clusterCount];
        for (int g = 0; g < out.length; g++) {
            out[g] = clusterSeen[g] ? clusterScore[g] : Double.NaN;
        }
        return out;
    }

    private void ensure(int p) {
        if (w.length < p) {
            w = new double[p];
        }
        if (m.length < p * p) {
            m = new double[p * p];
        }
        ensureBlock(p);
    }

    /**
     * The one pass over the rows of {@code view}, with {@link #w} and (for HC2, HC3) {@link #m} set: the HC0
     * to HC3 meat sum of (e_i u_i)^2, divided by (1 - h_i) or its square, or NaN at the first leverage of one;
     * for clusters, each cluster's score sum of e_i u_i into {@link #clusterScore} (and 0 returned).
     */
    private double rowSum(RowView view, int p, double[] b, ErrorType.Kind kind) {
        int n = view.n;
        boolean leverage = kind == ErrorType.Kind.HC2 || kind == ErrorType.Kind.HC3;
        boolean cluster = kind == ErrorType.Kind.CLUSTER;
        boolean hc3 = kind == ErrorType.Kind.HC3;
        double[][] x = view.x;
        double sum = 0;
        // rows in blocks: gather the block's within values column by column, then every step is a
        // loop over the block that the JIT vectorises (axpy form), instead of scalar work per row
        for (int t0 = 0; t0 < n; t0 += BLOCK) {
            int len = Math.min(BLOCK, n - t0);
            for (int z = 0; z < len; z++) {
                int r = view.rows == null ? t0 + z : view.rows[t0 + z];
                blockRow[z] = r;
                blockLevel[z] = view.level[r];
            }
            if (view.rows == null && view.offset.length == 1) {
                // every row, one level: contiguous copies the JIT vectorises
                for (int c = 0; c < p; c++) {
                    double[] col = x[c];
                    double[] xb = blockX[c];
                    double off = view.offset[0][c];
                    for (int z = 0; z < len; z++) {
                        xb[z] = col[t0 + z] - off;
                    }
                }
                double yOff = view.yOffset[0];
                for (int z = 0; z < len; z++) {
                    blockE[z] = view.y[t0 + z] - yOff;
                    blockU[z] = 0;
                }
            } else {
                for (int c = 0; c < p; c++) {
                    double[] col = x[c];
                    double[] xb = blockX[c];
                    for (int z = 0; z < len; z++) {
                        xb[z] = col[blockRow[z]] - view.offset[blockLevel[z]][c];
                    }
                }
                for (int z = 0; z < len; z++) {
                    blockE[z] = view.y[blockRow[z]] - view.yOffset[blockLevel[z]];
                    blockU[z] = 0;
                }
            }
            if (view.scaleRows) {
                for (int z = 0; z < len; z++) {
                    blockV[z] = Math.sqrt(view.weight[blockRow[z]]);
                    blockE[z] *= blockV[z];
                }
                for (int c = 0; c < p; c++) {
                    double[] xb = blockX[c];
                    for (int z = 0; z < len; z++) {
                        xb[z] *= blockV[z];
                    }
                }
            }
            for (int c = 0; c < p; c++) {
                double[] xb = blockX[c];
                double bc = b[c];
                double wc = w[c];
                for (int z = 0; z < len; z++) {
                    blockE[z] -= bc * xb[z];
                    blockU[z] += wc * xb[z];
                }
            }
            if (cluster) {
                for (int z = 0; z < len; z++) {
                    int g = view.cluster[blockRow[z]];
                    clusterScore[g] += blockE[z] * blockU[z];
                    clusterSeen[g] = true;
                }
            } else if (leverage) {
                if (view.dummies != null) {
                    // two absorbed columns: the crossed dummies' exact part, weighted by w_i when weighted
                    for (int z = 0; z < len; z++) {
                        blockH[z] = view.dummies.at(view.source == null ? blockRow[z] : view.source[blockRow[z]]);
                    }
                } else if (view.weight == null) {
                    for (int z = 0; z < len; z++) {
                        blockH[z] = 1.0 / view.levelCount[blockLevel[z]];
                    }
                } else {
                    for (int z = 0; z < len; z++) {
                        blockH[z] = view.weight[blockRow[z]] / view.levelWeight[blockLevel[z]];
                    }
                }
                for (int i = 0; i < p; i++) {
                    java.util.Arrays.fill(blockV, 0, len, 0);
                    for (int j = 0; j <= i; j++) {
                        double mij = this.m[i * p + j];
                        double[] xb = blockX[j];
                        for (int z = 0; z < len; z++) {
                            blockV[z] += mij * xb[z];
                        }
                    }
                    for (int z = 0; z < len; z++) {
                        blockH[z] += blockV[z] * blockV[z];
                    }
                }
                for (int z = 0; z < len; z++) {
                    double h = blockH[z];
                    if (h > LEVERAGE_ONE) {
                        return Double.NaN;
                    }
                    double eu = blockE[z] * blockU[z];
                    double q = 1 - h;
                    sum += eu * eu / (hc3 ? q * q : q);
                }
            } else {
                for (int z = 0; z < len; z++) {
                    double eu = blockE[z] * blockU[z];
                    sum += eu * eu;
                }
            }
        }
        return sum;
    }
}
