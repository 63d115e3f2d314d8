package org.forkscape.fit;

import java.util.List;
import org.forkscape.plan.ErrorType;

/**
 * The variance of linear combinations g'theta of a fitted generalized linear model's coefficients (the key
 * coefficient, the average marginal effect's delta-method gradient), of the specification's error type,
 * at the estimate:
 * <ul>
 * <li>classical: g' I^-1 g, I the expected information with the dispersion fixed at 1 (R's
 * {@code summary.glm} for the binomial and Poisson families);</li>
 * <li>HC0..HC3: the sandwich I^-1 (sum_i s_i s_i' omega_i) I^-1 with the score s_i = x_i (y_i - mu_i)
 * mu'(eta_i) / V(mu_i), omega_i = 1, n / (n - K), 1 / (1 - h_i) or 1 / (1 - h_i)^2 with the weighted hat
 * values h_i (White 1980, Econometrica 48(4); MacKinnon &amp; White 1985, Journal of Econometrics 29(3); as
 * Zeileis 2006, "Object-oriented computation of sandwich estimators", Journal of Statistical Software
 * 16(9), computes them for a {@code glm});</li>
 * <li>cluster: the scores summed per cluster, times G / (G - 1), as {@code sandwich::vcovCL} computes for a
 * {@code glm} by default (Zeileis, Koell &amp; Graham 2020, "Various versatile variances", Journal of
 * Statistical Software 95(1)): its default type is HC0 for every model but {@code lm}, so the (n - 1) /
 * (n - K) factor of least squares' CR1 does not enter; multi-way: the signed sum of the components'
 * cluster terms with that factor, as {@code vcovCL(type = "HC1")} computes (see {@link #clustered}).</li>
 * </ul>
 * Each combination needs only c = I^-1 g: the meat then reads c'x_i for each row, one pass of n p.
 */
final class GlmCovariance {
    /** Why the last call gave no variance, or null. */
    FitStatus failure;
    String failureDetail;
    int clusters;

    private double[][] along = new double[0][];
    private double[][] alongLevels = new double[0][];
    private double[] meat = new double[0];
    /** Per component clustering (one for one-way errors): each combination's score summed per cluster. */
    private double[][][] clusterSums = new double[0][][];
    /** Per component: the clusters seen among the rows (their count is G). */
    private boolean[][] clusterSeen = new boolean[0][];
    private int[][] componentCodes = new int[0][];
    /** Per component: the cluster codes in use, 0..cellCount-1. */
    private int[] cellCount = new int[0];
    private double[] centred = new double[0];
    private int[] identity = new int[0];
    private double[] rowLeverage = new double[0];

    /**
     * The variances of {@code count} combinations, gradient {@code levelGradients[m]} over the levels and
     * {@code columnGradients[m]} over the columns (dropped columns ignored); null with {@link #failure} set
     * when undefined.
     */
    double[] variances(Irls fit, ErrorType errors, double[][] levelGradients, double[][] columnGradients,
            int count) {
        failure = null;
        failureDetail = "";
        clusters = 0;
        GlmRows rows = fit.rows;
        int n = rows.n;
        int p = rows.p;
        int levels = rows.levels;
        grow(count, p, levels);
        double[] out = new double[count];
        for (int m = 0; m < count; m++) {
            double[] v = along[m];
            double[] ga = levelGradients[m];
            double[] gb = columnGradients[m];
            for (int j = 0; j < p; j++) {
                double s = gb[j];
                for (int l = 0; l < levels; l++) {
                    s -= fit.levelMean[l * p + j] * ga[l];
                }
                v[j] = s;
            }
            fit.solveFactored(v, p);
            double[] u = alongLevels[m];
            double classical = 0;
            for (int l = 0; l < levels; l++) {
                double s = ga[l] / fit.levelWeight[l];
                for (int j = 0; j < p; j++) {
                    s -= fit.levelMean[l * p + j] * v[j];
                }
                u[l] = s;
                classical += ga[l] * s;
            }
            for (int j = 0; j < p; j++) {
                classical += gb[j] * v[j];
            }
            out[m] = classical;
        }
        ErrorType.Kind kind = errors.kind();
        if (kind == ErrorType.Kind.CLASSICAL) {
            return out;
        }
        int k = levels + fit.keptCount;
        if (rows.heldInParts != null) {
            if (!meatFromParts(fit, errors, count)) {
                return null;
            }
            return kind == ErrorType.Kind.CLUSTER ? clustered(errors, ClusterComponents.of(errors), n, k, count, out)
                    : hcFactor(kind, n, k, count, out);
        }
        return robust(rows, rows.x, fit.score, alongLevels, rows.level, fit, null, errors, k, count, out);
    }

    /**
     * The variances of {@code count} combinations of a fit beside two or more absorbed columns
     * ({@link SeveralEffectsIrls}), each given as sum_i c_i z_i + (0, e) with z_i = (d_i, x_i) row i of the
     * design with every set of dummies written out: {@code rowGradients[m]} holds c (null for 0) and
     * {@code columnGradients[m]} the combination's whole column part g_b = X'c + e. With W the working
     * weights, q = c / w and ~ the weighted within transformation, the partitioned inverse of Z'WZ gives
     * I^- g per row as a_i = z_i'I^- g = (q_i - q~_i) + x~_i'v, v = (X~'WX~)^-1 (g_b - (X - X~)'c), and
     * g'I^- g = sum c_i a_i + (g_b - X'c)'v (the fixed effects' block is eliminated exactly, whatever
     * generalised inverse of the dummies is taken, since g lies in the row space of Z). The sandwiches then
     * read a_i as the one-column case reads its level's part plus x_i'v; HC2 and HC3 take the hat values of the
     * weighted design with every set of dummies, {@code dummies}' part (built at the estimate's working weights)
     * plus w_i x~_i'(X~'WX~)^-1 x~_i.
     *
     * @param rank    the rank of the dummies over the fit's rows (K = rank + kept columns)
     * @param dummies the dummies' leverages at the estimate's working weights, indexed by the fit's rows; read
     *                for HC2 and HC3 only (null otherwise)
     */
    double[] variancesAcrossEffects(SeveralEffectsIrls fit, ErrorType errors, int rank, DummyLeverage dummies,
            double[][] rowGradients, double[][] columnGradients, int count) {
        failure = null;
        failureDetail = "";
        clusters = 0;
        GlmRows rows = fit.rows;
        int n = rows.n;
        int p = rows.p;
        grow(count, p, n);
        if (identity.length < n) {
            identity = new int[n];
            for (int i = 0; i < n; i++) {
                identity[i] = i;
            }
        }
        double[] out = new double[count];
        double[] x = rows.x;
        double[] xw = fit.within;
        for (int m = 0; m < count; m++) {
            double[] v = along[m];
            double[] a = alongLevels[m];
            double[] c = rowGradients[m];
            double[] g = columnGradients[m];
            System.arraycopy(g, 0, v, 0, p);
            double[] e = java.util.Arrays.copyOf(g, p);
            if (c == null) {
                java.util.Arrays.fill(a, 0, n, 0);
            } else {
                for (int i = 0; i < n; i++) {
                    a[i] = c[i] / fit.weight[i];
                }
                double[] projected = java.util.Arrays.copyOf(a, n);
                fit.centre(projected);
                if (!fit.projections.demean(projected)) {
                    failure = FitStatus.NOT_CONVERGED;
                    failureDetail = AlternatingProjections.MAX_ITERATIONS + " fixed-effect demeaning";
                    return null;
                }
                for (int i = 0, at = 0; i < n; i++, at += p) {
                    a[i] -= projected[i];
                    for (int j = 0; j < p; j++) {
                        v[j] -= (x[at + j] - xw[at + j]) * c[i];
                        e[j] -= x[at + j] * c[i];
                    }
                }
            }
            fit.solveFactored(v, p);
            double classical = 0;
            for (int i = 0, at = 0; i < n; i++, at += p) {
                if (c != null) {
                    double ai = a[i];
                    for (int j = 0; j < p; j++) {
                        ai += xw[at + j] * v[j];
                    }
                    classical += c[i] * ai;
                }
            }
            for (int j = 0; j < p; j++) {
                if (fit.kept[j]) {
                    classical += e[j] * v[j];
                }
            }
            out[m] = classical;
        }
        if (errors.kind() == ErrorType.Kind.CLASSICAL) {
            return out;
        }
        double[] leverages = null;
        if (errors.kind() == ErrorType.Kind.HC2 || errors.kind() == ErrorType.Kind.HC3) {
            if (dummies.illConditioned()) {
                failure = FitStatus.LEVERAGE_ILL_CONDITIONED;
                failureDetail = errors.label();
                return null;
            }
            // the hat values of the weighted design with every set of dummies: by Frisch-Waugh-Lovell the
            // dummies' part plus the projected columns' (Davidson & MacKinnon 2004, sections 2.4 and 2.6)
            if (rowLeverage.length < n) {
                rowLeverage = new double[n];
            }
            leverages = rowLeverage;
            for (int i = 0, at = 0; i < n; i++, at += p) {
                leverages[i] = dummies.at(i) + fit.weight[i] * withinLeverage(fit.kept, fit.factor, null, xw, at, 0, p);
            }
        }
        return robust(rows, xw, fit.score, alongLevels, identity, null, leverages, errors, rank + fit.keptCount,
                count, out);
    }

    /**
     * The sandwiches of {@code count} combinations from each row's part a_i = offsets[m][index[i]] + x_i'v_m
     * (v_m in {@link #along}) and score: HC0, HC1, HC2 and HC3 (leverages {@code rowLeverages} per row when given,
     * else from {@code leverageFit}, which may
     * be null for the other types) and the clusters.
     */
    private double[] robust(GlmRows rows, double[] x, double[] score, double[][] offsets, int[] index, Irls leverageFit,
            double[] rowLeverages, ErrorType errors, int k, int count, double[] out) {
        int n = rows.n;
        ErrorType.Kind kind = errors.kind();
        boolean cluster = kind == ErrorType.Kind.CLUSTER;
        List<ClusterComponents.Component> components = cluster ? ClusterComponents.of(errors) : List.of();
        int parts = components.size();
        int[][] codes = new int[parts][];
        if (cluster) {
            growClusters(parts, n, count);
            for (int c = 0; c < parts; c++) {
                codes[c] = componentCodes[c];
                String key = components.get(c).key();
                int[] drawCodes = errors.multiway() && rows.drawClusters != null ? rows.drawClusters.get(key) : null;
                int[] variantCodes = errors.multiway() && drawCodes == null ? rows.variantClusters.get(key) : null;
                int size = 0;
                for (int i = 0; i < n; i++) {
                    int g = drawCodes != null ? drawCodes[i]
                            : variantCodes == null ? rows.cluster[i] : variantCodes[rows.source[i]];
                    codes[c][i] = g;
                    size = Math.max(size, g + 1);
                }
                clearCells(c, size, count);
            }
        }
        if (!meatSums(rows, x, score, offsets, index, leverageFit, rowLeverages, kind, count, cluster, codes, parts)) {
            failureDetail = errors.label();
            return null;
        }
        return cluster ? clustered(errors, components, n, k, count, out) : hcFactor(kind, n, k, count, out);
    }

    private double[] hcFactor(ErrorType.Kind kind, int n, int k, int count, double[] out) {
        double factor = kind == ErrorType.Kind.HC1 ? n / (double) (n - k) : 1;
        for (int m = 0; m < count; m++) {
            out[m] = meat[m] * factor;
        }
        return out;
    }

    /**
     * The meat's row sums over {@code rows} ({@code x} their columns, {@code score} their score residuals, each
     * row's part of a combination offsets[m][index[i]] + x_i'v_m), the leverages {@code rowLeverages} when given,
     * else from the fit {@code fit} (its weights and its information at the estimate; read for HC2 and HC3 only): into {@link #meat}, or per cluster into {@link #clusterSums} and
     * {@link #clusterSeen} (cleared by the caller). False, with {@link #failure} set, at a leverage of 1.
     */
    private boolean meatSums(GlmRows rows, double[] x, double[] score, double[][] offsets, int[] index, Irls fit,
            double[] rowLeverages, ErrorType.Kind kind, int count, boolean cluster, int[][] codes, int parts) {
        int n = rows.n;
        int p = rows.p;
        boolean leverage = kind == ErrorType.Kind.HC2 || kind == ErrorType.Kind.HC3;
        java.util.Arrays.fill(meat, 0, count, 0);
        for (int i = 0, at = 0; i < n; i++, at += p) {
            int l = index[i];
            double s = score[i];
            double omega = 1;
            if (leverage) {
                double h = rowLeverages != null ? rowLeverages[i]
                        : fit.weight[i] * (1 / fit.levelWeight[l] + withinLeverage(fit.kept, fit.factor, fit.levelMean,
                                x, at, l, p));
                if (!(h < 1 - 1e-10)) {
                    failure = FitStatus.LEVERAGE_ONE;
                    return false;
                }
                omega = kind == ErrorType.Kind.HC2 ? 1 / (1 - h) : 1 / ((1 - h) * (1 - h));
            }
            if (count == 2) {
                // the key coefficient and the marginal effect together: each column value read once for both
                // sums, each sum the same expression as in the loop below
                double[] v0 = along[0];
                double[] v1 = along[1];
                double c0 = offsets[0][l];
                double c1 = offsets[1][l];
                for (int j = 0; j < p; j++) {
                    double xj = x[at + j];
                    c0 += xj * v0[j];
                    c1 += xj * v1[j];
                }
                double e0 = c0 * s;
                double e1 = c1 * s;
                if (cluster) {
                    for (int part = 0; part < parts; part++) {
                        int g = codes[part][i];
                        clusterSums[part][0][g] += e0;
                        clusterSums[part][1][g] += e1;
                        clusterSeen[part][g] = true;
                    }
                } else {
                    meat[0] += e0 * e0 * omega;
                    meat[1] += e1 * e1 * omega;
                }
                continue;
            }
            for (int m = 0; m < count; m++) {
                double[] v = along[m];
                double c = offsets[m][l];
                for (int j = 0; j < p; j++) {
                    c += x[at + j] * v[j];
                }
                double e = c * s;
                if (cluster) {
                    for (int part = 0; part < parts; part++) {
                        int g = codes[part][i];
                        clusterSums[part][m][g] += e;
                        clusterSeen[part][g] = true;
                    }
                } else {
                    meat[m] += e * e * omega;
                }
            }
        }
        return true;
    }

    /**
     * The meat of rows held in parts: every part's {@link #partMeat} at the estimate, merged in part order,
     * read into {@link #meat} or each component's cluster sums as {@link #meatSums} leaves them for rows held
     * here (a part's leverage of 1 is NaN in its sums, and stays NaN through the additions), so that
     * {@link #clustered} squares sums over the whole table. False, with {@link #failure} set, at a leverage of 1.
     */
    private boolean meatFromParts(Irls fit, ErrorType errors, int count) {
        GlmRows rows = fit.rows;
        int p = rows.p;
        int levels = rows.levels;
        double[][] combinations = new double[count][];
        double[][] combinationLevels = new double[count][];
        for (int m = 0; m < count; m++) {
            combinations[m] = java.util.Arrays.copyOf(along[m], p);
            combinationLevels[m] = java.util.Arrays.copyOf(alongLevels[m], levels);
        }
        double[] s = rows.passes.sums(GlmPassRequest.meat(rows.heldInParts, fit.family,
                java.util.Arrays.copyOf(fit.alpha, levels), java.util.Arrays.copyOf(fit.beta, p), combinations,
                combinationLevels, errors.kind(), java.util.Arrays.copyOf(fit.levelWeight, levels),
                java.util.Arrays.copyOf(fit.levelMean, levels * p), java.util.Arrays.copyOf(fit.factor, p * p),
                java.util.Arrays.copyOf(fit.kept, p)));
        if (errors.kind() != ErrorType.Kind.CLUSTER) {
            for (int m = 0; m < count; m++) {
                if (Double.isNaN(s[m])) {
                    failure = FitStatus.LEVERAGE_ONE;
                    failureDetail = errors.label();
                    return false;
                }
                meat[m] = s[m];
            }
            return true;
        }
        int[] clusterCounts = rows.heldInParts.clusterCounts();
        growClusters(clusterCounts.length, 0, count);
        for (int c = 0, at = 0; c < clusterCounts.length; at += (count + 1) * clusterCounts[c], c++) {
            int g = clusterCounts[c];
            clearCells(c, g, count);
            for (int m = 0; m < count; m++) {
                System.arraycopy(s, at + m * g, clusterSums[c][m], 0, g);
            }
            for (int code = 0; code < g; code++) {
                clusterSeen[c][code] = s[at + count * g + code] > 0;
            }
        }
        return true;
    }

    /**
     * One part's meat of request {@code r} over {@code part} (its share of the rows, {@link GlmRows#fillPart}):
     * {@code fit} holds the part's scores and weights at the estimate ({@link Irls#partSums}); the
     * combinations and the information at the estimate are the driver's. In the layout of
     * {@link GlmPassRequest#layout}; a leverage of 1 makes every meat NaN.
     *
     * @param codes for cluster errors, per component of the request's error type the code of each of the
     *              part's rows among the variant's clusters ({@link GlmPassRequest.Rows}); null otherwise; not
     *              modified
     */
    double[] partMeat(Irls fit, GlmRows part, GlmPassRequest r, int[][] codes) {
        int count = r.along.length;
        grow(count, part.p, part.levels);
        for (int m = 0; m < count; m++) {
            System.arraycopy(r.along[m], 0, along[m], 0, part.p);
            System.arraycopy(r.alongLevels[m], 0, alongLevels[m], 0, part.levels);
        }
        fit.levelWeight = r.levelWeight;
        fit.levelMean = r.levelMean;
        fit.factor = r.factor;
        fit.kept = r.kept;
        boolean cluster = r.errorKind == ErrorType.Kind.CLUSTER;
        int[] clusterCounts = r.rows.clusterCounts();
        int parts = cluster ? clusterCounts.length : 0;
        if (cluster) {
            growClusters(parts, 0, count);
            for (int c = 0; c < parts; c++) {
                clearCells(c, clusterCounts[c], count);
            }
        }
        boolean defined = meatSums(part, part.x, fit.score, alongLevels, part.level, fit, null, r.errorKind, count, cluster, codes,
                parts);
        double[] out = new double[r.layout()];
        if (!cluster) {
            for (int m = 0; m < count; m++) {
                out[m] = defined ? meat[m] : Double.NaN;
            }
            return out;
        }
        for (int c = 0, at = 0; c < parts; at += (count + 1) * clusterCounts[c], c++) {
            int g = clusterCounts[c];
            for (int m = 0; m < count; m++) {
                System.arraycopy(clusterSums[c][m], 0, out, at + m * g, g);
            }
            for (int code = 0; code < g; code++) {
                out[at + count * g + code] = clusterSeen[c][code] ? 1 : 0;
            }
        }
        return out;
    }

    /**
     * One-way: the cluster sums of the scores times G / (G - 1), {@code vcovCL}'s default for a {@code glm}.
     * Multi-way: V = sum over the components of sign x G_S / (G_S - 1) x their cluster sum, times
     * (n - 1) / (n - K) (Cameron, Gelbach &amp; Miller 2011, "Robust inference with multiway clustering",
     * Journal of Business &amp; Economic Statistics 29(2)), exactly as
     * {@code sandwich::vcovCL(fit, cluster = ~ a + b, type = "HC1", cadjust = TRUE, multi0 = FALSE)} computes
     * for a {@code glm}: its HC1 factor (n - 1) / (n - K), K the coefficients (levels included), applies to
     * every model. {@link #clusters} is then the fewest clusters of one column. A combination whose sum is
     * not positive gets NaN (for the key coefficient the caller reports
     * {@link FitStatus#VARIANCE_NOT_POSITIVE}, least squares' status for the same case).
     */
    private double[] clustered(ErrorType errors, List<ClusterComponents.Component> components, int n, int k,
            int count, double[] out) {
        boolean multiway = errors.multiway();
        java.util.Arrays.fill(out, 0, count, 0);
        int fewest = Integer.MAX_VALUE;
        for (int part = 0; part < components.size(); part++) {
            int g = 0;
            java.util.Arrays.fill(meat, 0, count, 0);
            for (int code = 0; code < cellCount[part]; code++) {
                if (clusterSeen[part][code]) {
                    g++;
                    for (int m = 0; m < count; m++) {
                        meat[m] += clusterSums[part][m][code] * clusterSums[part][m][code];
                    }
                }
            }
            if (g < 2) {
                failure = FitStatus.ONE_CLUSTER;
                return null;
            }
            if (components.get(part).columns().size() == 1) {
                fewest = Math.min(fewest, g);
            }
            double adjust = components.get(part).sign() * (double) g / (g - 1);
            for (int m = 0; m < count; m++) {
                out[m] += adjust * meat[m];
            }
        }
        clusters = fewest;
        if (!multiway) {
            return out;
        }
        double hc1 = (n - 1.0) / (n - k);
        for (int m = 0; m < count; m++) {
            out[m] = out[m] > 0 ? out[m] * hc1 : Double.NaN;
        }
        return out;
    }

    /**
     * (x_i - xbar_l)' S^-1 (x_i - xbar_l) over the kept columns, S = L L' the factored within information
     * ({@code factor}); {@code levelMean} null for rows already projected (xbar 0).
     */
    private double withinLeverage(boolean[] kept, double[] factor, double[] levelMean, double[] x, int at, int l,
            int p) {
        double sum = 0;
        for (int j = 0; j < p; j++) {
            if (!kept[j]) {
                centred[j] = 0;
                continue;
            }
            double s = levelMean == null ? x[at + j] : x[at + j] - levelMean[l * p + j];
            for (int k = 0; k < j; k++) {
                if (kept[k]) {
                    s -= factor[j * p + k] * centred[k];
                }
            }
            centred[j] = s / factor[j * p + j];
            sum += centred[j] * centred[j];
        }
        return sum;
    }

    private void grow(int count, int p, int levels) {
        if (along.length < count || along[0].length < p || alongLevels[0].length < levels) {
            int c = Math.max(count, along.length);
            along = new double[c][Math.max(p, along.length == 0 ? 0 : along[0].length)];
            alongLevels = new double[c][Math.max(levels, alongLevels.length == 0 ? 0 : alongLevels[0].length)];
            meat = new double[c];
        }
        if (centred.length < p) {
            centred = new double[p];
        }
    }

    private void growClusters(int parts, int n, int count) {
        if (componentCodes.length < parts || componentCodes[0].length < n) {
            componentCodes = new int[Math.max(parts, componentCodes.length)][n];
        }
        if (clusterSums.length < parts) {
            clusterSums = java.util.Arrays.copyOf(clusterSums, parts);
            clusterSeen = java.util.Arrays.copyOf(clusterSeen, parts);
            cellCount = new int[parts];
        }
    }

    /** Empties component {@code part}'s cells for codes 0..size-1, growing them as needed. */
    private void clearCells(int part, int size, int count) {
        double[][] sums = clusterSums[part];
        if (sums == null || sums.length < count || sums[0].length < size) {
            sums = new double[Math.max(count, sums == null ? 0 : sums.length)][Math.max(size,
                    sums == null ? 0 : sums[0].length)];
            clusterSums[part] = sums;
        }
        if (clusterSeen[part] == null || clusterSeen[part].length < size) {
            clusterSeen[part] = new boolean[size];
        } else {
            java.util.Arrays.fill(clusterSeen[part], 0, size, false);
        }
        cellCount[part] = size;
        for (int m = 0; m < count; m++) {
            java.util.Arrays.fill(sums[m], 0, size, 0);
        }
    }
}
