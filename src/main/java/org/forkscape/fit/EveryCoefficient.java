package org.forkscape.fit;

import java.util.ArrayList;
import java.util.List;
import org.forkscape.plan.ErrorType;

/**
 * Every coefficient of one least-squares specification, from its rows and their QR solution, with the
 * standard error of the specification's type, t statistic, p-value and interval.
 *
 * <p>Each coefficient is a linear function of the outcome, b_j = sum_i W_ij y_i, with W_i = (X'X)^-1 x_i in
 * the centered (within) coordinates and, for the intercept, c_i = 1/n - xbar'W_i. The robust variances
 * are then sum_i e_i^2 W_ij^2 (HC0, White 1980, Econometrica 48(4)), times N/(N-K) (HC1), with each term
 * divided by 1-h_i or (1-h_i)^2 (HC2, HC3; MacKinnon &amp; White 1985, J. Econometrics 29(3)), and
 * G/(G-1) (N-1)/(N-K) sum over clusters of (sum_i e_i W_ij)^2 (CR1; Cameron &amp; Miller 2015, J. Human
 * Resources 50(2)), for multi-way clustering the signed sum of that over the intersections of its columns
 * ({@link ClusterComponents}); classical ones are s^2 (X'X)^-1, with s^2 (1/n + xbar'(X'X)^-1 xbar) for the intercept.
 * The leverage h_i = 1/n_level + x_i'(X'X)^-1 x_i is that of the model with explicit intercept or dummies;
 * beside two absorbed columns the first term is the crossed dummies' leverage ({@link CrossedDummyLeverage}).
 */
final class EveryCoefficient {
    private EveryCoefficient() {
    }

    /**
     * @param rows the specification's rows in within coordinates (not modified)
     * @param s    their QR solution, in the order of {@code rows}' columns
     */
    static FullFit of(DataVariant variant, Moments mom, DesignRows rows, KeySolution s, ErrorType errors, int yCol,
            double confidence, String keyTerm) {
        List<ClusterComponents.Component> components = errors.kind() == ErrorType.Kind.CLUSTER
                ? ClusterComponents.of(errors) : List.of();
        int parts = components.size();
        int[][] clusterCodes = new int[parts][];
        for (int c = 0; c < parts; c++) {
            clusterCodes[c] = variant.clusters.get(components.get(c).key());
        }
        int n = rows.n;
        int p = s.p;
        boolean intercept = !variant.absorbs;
        int k = (intercept ? 1 : mom.levelsPresent) + p;
        int dfResidual = n - k;
        int[] at = s.keptPositions;

        // the intercept's share of each row: 1/n, or sqrt(w_i)/W on rows scaled by sqrt(w_i) (weighted
        // least squares: the intercept is the weighted mean of y - x'b, whose variance is sigma^2 / W plus
        // the controls' part)
        double totalWeight = 0;
        for (double wl : mom.levelWeight) {
            totalWeight += wl;
        }
        double[] xbar = new double[p];
        double ybar = 0;
        if (intercept) {
            for (int c = 0; c < p; c++) {
                xbar[c] = variant.levelShift[0][s.kept[c]] + mom.levelMeanOffset[0][s.kept[c]];
            }
            ybar = variant.levelShift[0][yCol] + mom.levelMeanOffset[0][yCol];
        }

        // per row: t = M x_i, W_i = M't, the residual and the leverage; accumulate each coefficient's meat
        int q = p + (intercept ? 1 : 0);
        double[] meat = new double[q];
        // per component clustering (one for one-way errors): each cluster's score, and the clusters seen
        double[][][] clusterScore = new double[parts][][];
        boolean[][] clusterSeen = new boolean[parts][];
        int[] clusters = new int[parts];
        for (int c = 0; c < parts; c++) {
            int count = variant.clusterCounts.get(components.get(c).key());
            clusterScore[c] = new double[count][q];
            clusterSeen[c] = new boolean[count];
        }
        double[] t = new double[p];
        double[] w = new double[q];
        double[] m = s.m;
        boolean leverageOne = false;
        boolean leverages = errors.kind() == ErrorType.Kind.HC2 || errors.kind() == ErrorType.Kind.HC3;
        // beside two absorbed columns the crossed dummies' own part of each leverage (usable: the key fit that
        // precedes a full fit has the status of an ill-conditioned one)
        DummyLeverage dummies = leverages && variant.absorbsSeveral ? mom.dummyLeverage() : null;
        for (int i = 0; i < n; i++) {
            double e = rows.y[i];
            for (int c = 0; c < p; c++) {
                e -= s.b[c] * rows.x[at[c]][i];
            }
            double tt = 0;
            for (int j = 0; j < p; j++) {
                double v = 0;
                for (int c = 0; c <= j; c++) {
                    v += m[j * p + c] * rows.x[at[c]][i];
                }
                t[j] = v;
                tt += v * v;
            }
            double interceptWeight = rows.weighted ? Math.sqrt(rows.weight[i]) / totalWeight : 1.0 / n;
            for (int c = 0; c < p; c++) {
                double v = 0;
                for (int j = c; j < p; j++) {
                    v += m[j * p + c] * t[j];
                }
                w[c] = v;
                interceptWeight -= xbar[c] * v;
            }
            if (intercept) {
                w[p] = interceptWeight;
            }
            double h = (dummies != null ? dummies.at(rows.source[i]) : rows.weighted
                    ? rows.weight[i] / mom.levelWeight[rows.level[i]] : 1.0 / mom.levelCount[rows.level[i]]) + tt;
            double divisor = 1;
            if (leverages) {
                if (h > KeyCoefficientSandwich.LEVERAGE_ONE) {
                    leverageOne = true;
                }
                divisor = errors.kind() == ErrorType.Kind.HC2 ? 1 - h : (1 - h) * (1 - h);
            }
            if (parts > 0) {
                for (int part = 0; part < parts; part++) {
                    int g = clusterCodes[part][rows.source[i]];
                    if (!clusterSeen[part][g]) {
                        clusterSeen[part][g] = true;
                        clusters[part]++;
                    }
                    double[] score = clusterScore[part][g];
                    for (int c = 0; c < q; c++) {
                        score[c] += e * w[c];
                    }
                }
            } else {
                for (int c = 0; c < q; c++) {
                    double ew = e * w[c];
                    meat[c] += ew * ew / divisor;
                }
            }
        }

        double sigma2 = s.rss / dfResidual;
        double df = dfResidual;
        int clusterTotal = 0;
        double[] variance = new double[q];
        switch (errors.kind()) {
            case CLASSICAL -> {
                for (int c = 0; c < p; c++) {
                    double d = 0;
                    for (int j = c; j < p; j++) {
                        d += m[j * p + c] * m[j * p + c];
                    }
                    variance[c] = sigma2 * d;
                }
                if (intercept) {
                    double mx = 0;
                    for (int j = 0; j < p; j++) {
                        double v = 0;
                        for (int c = 0; c <= j; c++) {
                            v += m[j * p + c] * xbar[c];
                        }
                        mx += v * v;
                    }
                    variance[p] = sigma2 * ((rows.weighted ? 1.0 / totalWeight : 1.0 / n) + mx);
                }
            }
            case HC0, HC2, HC3 -> System.arraycopy(meat, 0, variance, 0, q);
            case HC1 -> {
                for (int c = 0; c < q; c++) {
                    variance[c] = meat[c] * n / (n - k);
                }
            }
            case CLUSTER -> {
                // one-way CR1 per component, added with the component's sign (multi-way: Cameron, Gelbach
                // & Miller 2011, Journal of Business & Economic Statistics 29(2)); a sum that is not positive
                // has no standard error (NaN)
                int fewest = Integer.MAX_VALUE;
                double[] part = new double[q];
                for (int j = 0; j < parts; j++) {
                    java.util.Arrays.fill(part, 0);
                    for (double[] score : clusterScore[j]) {
                        for (int c = 0; c < q; c++) {
                            part[c] += score[c] * score[c];
                        }
                    }
                    double adjust = components.get(j).sign() * (double) clusters[j] / (clusters[j] - 1)
                            * (n - 1.0) / (n - k);
                    for (int c = 0; c < q; c++) {
                        variance[c] += part[c] * adjust;
                    }
                    if (components.get(j).columns().size() == 1) {
                        fewest = Math.min(fewest, clusters[j]);
                    }
                }
                for (int c = 0; c < q; c++) {
                    if (!(variance[c] > 0)) {
                        variance[c] = Double.NaN;
                    }
                }
                clusterTotal = fewest;
                df = fewest - 1;
            }
            default -> throw new IllegalStateException("unknown error type " + errors);
        }
        if (leverageOne) {
            java.util.Arrays.fill(variance, Double.NaN);
        }

        double critical = Distributions.critical(df, 1 - confidence);
        List<FullFit.Coefficient> out = new ArrayList<>();
        if (intercept) {
            double a = ybar;
            for (int c = 0; c < p; c++) {
                a -= xbar[c] * s.b[c];
            }
            out.add(coefficient("(intercept)", "intercept", a, Math.sqrt(variance[p]), df, critical));
        }
        for (int c = 0; c < p; c++) {
            boolean isKey = c == p - 1;
            String term = isKey ? keyTerm : variant.layout.columnName(s.kept[c]);
            out.add(coefficient(term, isKey ? "key" : "control", s.b[c], Math.sqrt(variance[c]), df, critical));
        }
        double tss = mom.totalSquares[yCol];
        double r2 = 1 - s.rss / tss;
        double f = k > 1 ? ((tss - s.rss) / (k - 1)) / sigma2 : Double.NaN;
        double modelP = k > 1 ? Distributions.fUpperP(f, k - 1, dfResidual) : Double.NaN;
        return new FullFit(out, errors.label(), df, n, k, variant.absorbs ? variant.absorbColumn : "",
                variant.absorbs ? mom.levelsPresent : 0, dimensions(variant), clusterTotal, r2, 1 - (1 - r2) * (n - 1.0) / dfResidual, f,
                modelP, "ok", s.note());
    }

    static FullFit.Coefficient coefficient(String term, String role, double b, double se, double df,
            double critical) {
        double statistic = b / se;
        return new FullFit.Coefficient(term, role, b, se, statistic, Distributions.twoSidedP(statistic, df),
                b - critical * se, b + critical * se);
    }

    static FullFit failed(ErrorType errors, int n, int k, DataVariant variant, String status) {
        return new FullFit(List.of(), errors.label(), Double.NaN, n, k, variant.absorbs ? variant.absorbColumn : "", 0,
                dimensions(variant), 0, Double.NaN, Double.NaN, Double.NaN, Double.NaN, status, "");
    }

    /** How many columns {@code variant} absorbs. */
    static int dimensions(DataVariant variant) {
        return !variant.absorbs ? 0 : variant.absorbsSeveral ? variant.coded.dimensionCodes.length : 1;
    }
}
