package org.forkscape.fit;

import java.util.Arrays;

/**
 * Maximum likelihood for a generalized linear model beside two or more absorbed fixed-effect columns, by the
 * same scoring iterations as {@link Irls} (its stopping rule, step halving and separation rule), with each
 * step's weighted least squares over the dummies of every column solved by the weighted within
 * transformation: the working residual and the columns are projected off the dummies in the inner product of
 * the iteration's working weights by {@link AlternatingProjections}, the columns' step solved from the
 * projected columns (Frisch-Waugh-Lovell), and the linear predictors' fixed-effect part recovered as
 * (r - r~) - (X - X~) d + X d = (r - r~) + X~ d (Guimarães &amp; Portugal 2010, "A simple feasible procedure
 * to fit models with high-dimensional fixed effects", Stata Journal 10(4); Gaure 2013, Computational
 * Statistics &amp; Data Analysis 66; for generalized linear models Correia, Guimarães &amp; Zylkin 2020, "Fast
 * Poisson estimation with high-dimensional fixed effects", Stata Journal 20(1)). The level coefficients are
 * never formed: the linear predictors carry them.
 *
 * <p>The first iteration is the weighted least-squares fit of the working response at each row's starting
 * mean (as R's {@code glm.fit} starts), which puts the linear predictors in the span of the dummies and the
 * columns; every later step is a correction from the score, eta += P r with r = (y - mu) / mu'(eta) the
 * working residual and P the weighted projection on that span, so that the projections' rounding (at most
 * {@link AlternatingProjections#TOLERANCE} of the residual's norm, which shrinks to 0) slows the iterations at
 * worst. The information is factored as {@link Irls} factors it, by QR of the weighted within design where
 * its cross-products would cost digits. The step's quadratic form in the information is sum w (P r)^2, Irls's Newton decrement. At the
 * estimate the columns are projected once more at its working weights, for {@link GlmCovariance}. Not thread
 * safe: one per worker thread.
 */
final class SeveralEffectsIrls {
    private final int maxIterations;

    SeveralEffectsIrls(int maxIterations) {
        this.maxIterations = maxIterations;
    }

    // the state of the last fit, read by GlmCovariance and the estimator
    GlmRows rows;
    GlmFamily family;
    Irls.Outcome outcome;
    int iterations;
    /** Whether every projection converged; false makes the fit unusable. */
    boolean demeaned;
    double[] beta = new double[0];
    boolean[] kept = new boolean[0];
    int keptCount;
    double[] eta = new double[0];
    double[] mu = new double[0];
    double[] weight = new double[0];
    double[] score = new double[0];
    double deviance;
    int boundaryRows;
    /** The columns' within transformation at the estimate's working weights, row by row (n x p). */
    double[] within = new double[0];
    /** Lower Cholesky factor of X~'WX~ over the kept columns, p x p row-major. */
    double[] factor = new double[0];
    /** The projections at the estimate's working weights. */
    AlternatingProjections projections;
    /** Whether this fit factors by QR of the weighted within design ({@link Irls#ORTHOGONAL_BELOW_SHARE}). */
    boolean orthogonal;
    private final OrthogonalFactor householder = new OrthogonalFactor();

    private int[][] codes;
    private int[] levels;
    private double[] gram = new double[0];
    private double[] rhs = new double[0];
    private double[] step = new double[0];
    private double[] delta = new double[0];
    private double[] residual = new double[0];
    private double[] column = new double[0];
    private double[] trialBeta = new double[0];
    private double[] trialEta = new double[0];
    private double[] trialMu = new double[0];
    private double[] trialWeight = new double[0];
    private double[] trialScore = new double[0];

    /**
     * Fits {@code rows} (kept by reference until the next call; their level codes are not read).
     *
     * @param codes   per absorbed column, the dense level of each of the rows (not modified, kept)
     * @param levels  per absorbed column, the number of levels
     * @param spanned per column, whether it is spanned by the fixed effects (dropped), or null for none
     */
    void fit(GlmRows rows, int[][] codes, int[] levels, GlmFamily family, boolean[] spanned) {
        this.rows = rows;
        this.family = family;
        this.codes = codes;
        this.levels = levels;
        int n = rows.n;
        int p = rows.p;
        grow(n, p);
        keptCount = 0;
        for (int j = 0; j < p; j++) {
            kept[j] = spanned == null || !spanned[j];
            beta[j] = 0;
        }
        demeaned = true;
        orthogonal = false;
        outcome = Irls.Outcome.NOT_CONVERGED;
        // the start: each row's starting mean, its working response z = eta + r projected in full
        for (int i = 0; i < n; i++) {
            eta[i] = family.link(family.startingMean(rows.y[i], 1));
        }
        deviance = evaluate(eta, mu, weight, score);
        boolean first = true;
        for (iterations = 1; iterations <= maxIterations; iterations++) {
            if (!weightedStep(first) || !demeaned) {
                return;
            }
            if (p > 0 && !kept[p - 1]) {
                outcome = Irls.Outcome.KEY_COLLINEAR;
                return;
            }
            double decrement = 0;
            for (int i = 0; i < n; i++) {
                decrement += weight[i] * delta[i] * delta[i];
            }
            double before = deviance;
            double t = 1;
            double trial = Double.NaN;
            for (int h = 0; h <= MAX_HALVINGS; h++) {
                for (int i = 0; i < n; i++) {
                    trialEta[i] = first ? delta[i] : eta[i] + t * delta[i];
                }
                for (int j = 0; j < p; j++) {
                    trialBeta[j] = !kept[j] ? 0 : first ? step[j] : beta[j] + t * step[j];
                }
                trial = evaluate(trialEta, trialMu, trialWeight, trialScore);
                if (Double.isFinite(trial) && (first || trial <= before * (1 + 1e-12) + 1e-300)) {
                    break;
                }
                if (first) {
                    break;
                }
                t /= 2;
            }
            if (!Double.isFinite(trial)) {
                break;
            }
            accept(trial);
            double enough = family == GlmFamily.PROBIT ? Irls.SCORING_DECREMENT : Irls.CANONICAL_DECREMENT;
            if (!first && Math.abs(trial - before) / (Math.abs(trial) + 0.1) < Irls.TOLERANCE && decrement < enough) {
                outcome = Irls.Outcome.CONVERGED;
                break;
            }
            first = false;
        }
        if (outcome == Irls.Outcome.NOT_CONVERGED) {
            iterations = maxIterations;
        }
        boundaryRows = 0;
        for (int i = 0; i < n; i++) {
            if (family.atBoundary(mu[i]) && (family != GlmFamily.POISSON || rows.y[i] == 0)) {
                boundaryRows++;
            }
        }
        if (boundaryRows > 0) {
            outcome = Irls.Outcome.SEPARATION;
            return;
        }
        if (outcome == Irls.Outcome.CONVERGED) {
            // the information at the estimate: the columns projected at its working weights
            projectColumns();
            if (!demeaned) {
                return;
            }
            if (!factor(p, false)) {
                outcome = Irls.Outcome.KEY_COLLINEAR;
            }
        }
    }

    private static final int MAX_HALVINGS = 30;

    /**
     * The step at the current point into {@link #step} (the columns) and {@link #delta} (the linear
     * predictors): the weighted projection of the working residual (of the working response at the
     * start) on the dummies and the kept columns. False when a projection did not converge.
     */
    private boolean weightedStep(boolean first) {
        int n = rows.n;
        int p = rows.p;
        projectColumns();
        if (!demeaned) {
            return false;
        }
        // the working residual r = u / w (the working response eta + r at the start)
        for (int i = 0; i < n; i++) {
            double r = score[i] / weight[i];
            residual[i] = first ? eta[i] + r : r;
        }
        System.arraycopy(residual, 0, column, 0, n);
        centre(column);
        if (!projections.demean(column)) {
            demeaned = false;
            return false;
        }
        // X~'W r~ (= X~'u away from the start, where r = u / w)
        Arrays.fill(rhs, 0, p, 0);
        for (int i = 0, at = 0; i < n; i++, at += p) {
            double wr = weight[i] * column[i];
            for (int j = 0; j < p; j++) {
                rhs[j] += within[at + j] * wr;
            }
        }
        if (!factor(p, first)) {
            outcome = Irls.Outcome.KEY_COLLINEAR;
            return false;
        }
        System.arraycopy(rhs, 0, step, 0, p);
        solveFactored(step, p);
        for (int i = 0, at = 0; i < n; i++, at += p) {
            double fitted = residual[i] - column[i];
            for (int j = 0; j < p; j++) {
                fitted += within[at + j] * step[j];
            }
            delta[i] = fitted;
        }
        return true;
    }

    /** The columns' within transformation at the current working weights, and their weighted cross-products. */
    private void projectColumns() {
        int n = rows.n;
        int p = rows.p;
        projections = new AlternatingProjections(codes, levels, Arrays.copyOf(weight, n));
        for (int j = 0; j < p; j++) {
            for (int i = 0, at = j; i < n; i++, at += p) {
                column[i] = rows.x[at];
            }
            centre(column);
            if (!projections.demean(column)) {
                demeaned = false;
                return;
            }
            for (int i = 0, at = j; i < n; i++, at += p) {
                within[at] = column[i];
            }
        }
        Arrays.fill(gram, 0, p * p, 0);
        for (int i = 0, at = 0; i < n; i++, at += p) {
            double w = weight[i];
            for (int j = 0; j < p; j++) {
                double a = w * within[at + j];
                int go = j * p;
                for (int k = 0; k <= j; k++) {
                    gram[go + k] += a * within[at + k];
                }
            }
        }
    }

    /** Subtracts the working-weighted mean (a function of the dummies), so the projections' stopping rule is relative to the spread. */
    void centre(double[] v) {
        int n = rows.n;
        double s = 0;
        double total = 0;
        for (int i = 0; i < n; i++) {
            s += weight[i] * v[i];
            total += weight[i];
        }
        double m = s / total;
        for (int i = 0; i < n; i++) {
            v[i] -= m;
        }
    }

    /**
     * The lower factor of the kept columns' X~'WX~. When {@code decide}, drops a column with no weighted
     * within spread; otherwise false when a kept pivot is not positive. By Cholesky of the cross-products,
     * unless a pivot is small enough to have cost digits ({@link Irls#ORTHOGONAL_BELOW_SHARE}, the rule of
     * {@link Irls}): then, for the rest of the fit, by QR of the weighted within design W^1/2 X~
     * ({@link OrthogonalFactor}), which drops in order each column whose remaining norm is below
     * {@link QrRefit#TOLERANCE} of its own (the rule of least squares' QR refit).
     */
    private boolean factor(int p, boolean decide) {
        if (orthogonal) {
            return orthogonalFactor(p, decide);
        }
        int result = Irls.cholesky(gram, factor, java.util.Arrays.copyOf(kept, p), kept, beta, p, decide);
        if (result == Irls.SWITCH_TO_QR) {
            orthogonal = true;
            return orthogonalFactor(p, decide);
        }
        if (decide && result >= 0) {
            keptCount = result;
        }
        return result >= 0;
    }

    /** The factor from Householder QR of W^1/2 X~, the projected columns at the working weights. */
    private boolean orthogonalFactor(int p, boolean decide) {
        int n = rows.n;
        boolean[] considered = java.util.Arrays.copyOf(kept, p);
        int rank = householder.factor(n, p, (j, a) -> {
            for (int i = 0, at = j; i < n; i++, at += p) {
                a[i] = Math.sqrt(weight[i]) * within[at];
            }
        }, considered, kept, decide, factor);
        if (decide) {
            keptCount = OrthogonalFactor.dropped(rank, kept, beta, p);
        }
        return rank >= 0;
    }

    /** Solves (L L') v = b in place over the kept columns (dropped entries set to 0; {@link Irls#solveFactored}). */
    void solveFactored(double[] v, int p) {
        Irls.solveFactored(factor, kept, v, p);
    }

    /** The means, working weights and scores at {@code at} (times the prior weights), and the deviance. */
    private double evaluate(double[] at, double[] muOut, double[] weightOut, double[] scoreOut) {
        int n = rows.n;
        double d = family.evaluate(rows.y, at, muOut, weightOut, scoreOut, 0, n);
        double[] prior = rows.prior;
        if (prior == null) {
            return d;
        }
        d = 0;
        for (int i = 0; i < n; i++) {
            d += prior[i] * family.unitDeviance(rows.y[i], muOut[i]);
            weightOut[i] *= prior[i];
            scoreOut[i] *= prior[i];
        }
        return d;
    }

    private void accept(double trial) {
        double[] swap = eta;
        eta = trialEta;
        trialEta = swap;
        swap = mu;
        mu = trialMu;
        trialMu = swap;
        swap = weight;
        weight = trialWeight;
        trialWeight = swap;
        swap = score;
        score = trialScore;
        trialScore = swap;
        System.arraycopy(trialBeta, 0, beta, 0, rows.p);
        deviance = trial;
    }

    private void grow(int n, int p) {
        if (eta.length < n) {
            eta = new double[n];
            mu = new double[n];
            weight = new double[n];
            score = new double[n];
            trialEta = new double[n];
            trialMu = new double[n];
            trialWeight = new double[n];
            trialScore = new double[n];
            delta = new double[n];
            residual = new double[n];
            column = new double[n];
        }
        if (within.length < n * p) {
            within = new double[n * p];
        }
        if (beta.length < p) {
            beta = new double[p];
            kept = new boolean[p];
            step = new double[p];
            rhs = new double[p];
            trialBeta = new double[p];
        }
        if (gram.length < p * p) {
            gram = new double[p * p];
            factor = new double[p * p];
        }
    }
}
