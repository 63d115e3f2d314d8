package org.forkscape.fit;

import java.util.Arrays;

/**
 * Maximum likelihood for a generalized linear model by iteratively reweighted least squares (Nelder &amp;
 * Wedderburn 1972, JRSS A 135(3); Green 1984, "Iteratively reweighted least squares for maximum likelihood
 * estimation", JRSS B 46(2)): Fisher scoring, each step solving the weighted normal equations of one pass
 * over the rows. The coefficients are one per fixed-effect level (the intercept when nothing is absorbed)
 * and one per column; the level coefficients are eliminated exactly (their block of the information is
 * diagonal), leaving the weighted within-level cross-products of the columns, accumulated around the
 * weighted level means and factored by Cholesky.
 *
 * <p>Each step is written as a correction, coefficients += I^-1 U (U the score, I the expected
 * information), not as a fresh weighted solve: the score is summed from the rows each time, so rounding in
 * the factored information slows the iteration at worst and does not move the point it converges to. The
 * iteration stops at R's criterion |D - D_old| / (|D| + 0.1) &lt; 1e-10 on the deviance D (R's
 * {@code glm.control} default is 1e-8) once the step is also small in the metric of the information: its
 * quadratic form d'I d (the Newton decrement, Boyd &amp; Vandenberghe 2004, Convex Optimization, Cambridge
 * University Press, section 9.5.1; about the sum of the squared changes in standard errors) below
 * {@link #CANONICAL_DECREMENT} for the logit and Poisson links, whose scoring steps are Newton's and converge
 * quadratically (the next change is about that square), and below {@link #SCORING_DECREMENT} for the
 * probit's Fisher scoring, which converges only linearly. On large data a relative deviance criterion alone
 * stops while a probit's coefficients are still off by 1e-4 of their standard errors. A step that leaves
 * the deviance undefined or larger is halved. Each trial point's one pass over the rows gives its deviance
 * and, speculatively, its information and score, so the next step (and, at the estimate, the covariance)
 * needs no pass of its own. For rows held in parts ({@link GlmRows#fillHeldInParts}) each such pass is
 * one request to the parts ({@link #evaluateInParts}, each part running {@link #partSums}, the same pass over
 * its rows) and everything between passes is this class's own code, unchanged. Not thread safe: one per
 * worker thread, buffers reused.
 */
final class Irls {
    static final double TOLERANCE = 1e-10;
    static final int MAX_ITERATIONS = 100;
    private final int maxIterations;
    private static final int MAX_HALVINGS = 30;
    /** Newton steps: a last step of 1e-4 standard errors leaves about 1e-8. */
    static final double CANONICAL_DECREMENT = 1e-8;
    /** Linear convergence: the last step itself must be about 3e-8 standard errors. */
    static final double SCORING_DECREMENT = 1e-15;
    /**
     * A kept column whose Cholesky pivot is below this share of its own weighted sum of squares has lost up
     * to five of the factor's digits to the squaring of the condition number in the cross-products (Higham,
     * Accuracy and Stability of Numerical Algorithms, 2nd ed., section 10.1): the fit then factors the
     * weighted design itself by Householder QR instead ({@link #orthogonalFactor}), as R's {@code glm.fit}
     * always does, and keeps the column unless its remaining norm is below {@link QrRefit#TOLERANCE} of
     * its own (the rule of the least-squares refit).
     */
    static final double ORTHOGONAL_BELOW_SHARE = 1e-5;

    enum Outcome { CONVERGED, NOT_CONVERGED, SEPARATION, KEY_COLLINEAR }

    Irls() {
        this(MAX_ITERATIONS);
    }

    /** @param maxIterations the iterations after which a fit that has not converged is given up */
    Irls(int maxIterations) {
        this.maxIterations = maxIterations;
    }

    // the state of the last fit, read by GlmCovariance and the estimator
    GlmRows rows;
    GlmFamily family;
    Outcome outcome;
    int iterations;
    /** Coefficients: per compact level, and per column (0 for a dropped column). */
    double[] alpha = new double[0];
    double[] beta = new double[0];
    boolean[] kept = new boolean[0];
    int keptCount;
    double[] eta = new double[0];
    double[] mu = new double[0];
    double deviance;
    /** Rows whose fitted mean ended at the boundary (separation). */
    int boundaryRows;
    // the information at the estimate: level weight sums, weighted level means, the factored within part
    double[] levelWeight = new double[0];
    double[] levelMean = new double[0];
    /** Lower Cholesky factor of the weighted within cross-products of the kept columns, p x p, row-major. */
    double[] factor = new double[0];
    double[] weight = new double[0];
    double[] score = new double[0];

    private double[] gram = new double[0];
    private double[] levelScore = new double[0];
    private double[] rhs = new double[0];
    private double[] step = new double[0];
    private double[] stepAlpha = new double[0];
    private double[] trialAlpha = new double[0];
    private double[] trialBeta = new double[0];
    private double[] trialEta = new double[0];
    private double[] trialMu = new double[0];
    /** Per column, whether the caller found it spanned by the levels; null for none. */
    private boolean[] spanned;

    private boolean spannedByLevels(int j) {
        return spanned != null && spanned[j];
    }

    /** Whether this fit's start took its parent's information ({@link #extend}). */
    boolean extended;
    /** Whether this fit factors by QR of the weighted design ({@link #ORTHOGONAL_BELOW_SHARE}). */
    boolean orthogonal;
    private final OrthogonalFactor householder = new OrthogonalFactor();
    /** Rows per block of the cross-product pass. */
    private static final int BLOCK = 4;

    /**
     * Fits {@code rows} (kept by reference until the next call).
     *
     * @param startAlpha per compact level, or null for the cold start (each level at its link-scale mean,
     *                   the columns at 0)
     * @param startBeta  per column, or null
     */
    void fit(GlmRows rows, GlmFamily family, double[] startAlpha, double[] startBeta) {
        fit(rows, family, startAlpha, startBeta, null);
    }

    /**
     * @param spanned per column, whether it is known to be spanned by the levels (dropped whatever its
     *                weighted spread), or null for none
     */
    void fit(GlmRows rows, GlmFamily family, double[] startAlpha, double[] startBeta, boolean[] spanned) {
        fit(rows, family, startAlpha, startBeta, spanned, null);
    }

    /**
     * @param parent the information at the estimate of the fit whose coefficients are the start, on the same
     *               rows with the columns of these rows but the one before the last (see {@link Information});
     *               null to sum the start's information in full
     */
    void fit(GlmRows rows, GlmFamily family, double[] startAlpha, double[] startBeta, boolean[] spanned,
            Information parent) {
        this.rows = rows;
        this.family = family;
        int n = rows.n;
        int p = rows.p;
        int levels = rows.levels;
        boolean inParts = rows.heldInParts != null;
        // rows held in parts keep no per-row arrays here: every pass over them is made where they are
        grow(inParts ? 0 : n, p, levels);
        if (startAlpha == null) {
            coldStart(rows, family);
        } else {
            System.arraycopy(startAlpha, 0, alpha, 0, levels);
            System.arraycopy(startBeta, 0, beta, 0, p);
        }
        this.spanned = spanned;
        for (int j = 0; j < p; j++) {
            kept[j] = !spannedByLevels(j);
            if (!kept[j]) {
                beta[j] = 0;
            }
        }
        orthogonal = false;
        extended = parent != null && !inParts;
        deviance = !extended ? evaluate(alpha, beta, eta, mu) : extend(parent);
        int boundaryHere = boundaryOfLastPass;
        boolean decided = false;
        outcome = Outcome.NOT_CONVERGED;
        for (iterations = 1; iterations <= maxIterations; iterations++) {
            if (!factor(p, !decided) || !kept[p - 1]) {
                outcome = Outcome.KEY_COLLINEAR;
                return;
            }
            decided = true;
            double decrement = solveStep(p, levels);
            double before = deviance;
            double t = 1;
            double trial = Double.NaN;
            for (int h = 0; h <= MAX_HALVINGS; h++) {
                for (int l = 0; l < levels; l++) {
                    trialAlpha[l] = alpha[l] + t * stepAlpha[l];
                }
                for (int j = 0; j < p; j++) {
                    trialBeta[j] = kept[j] ? beta[j] + t * step[j] : 0;
                }
                trial = evaluate(trialAlpha, trialBeta, trialEta, trialMu);
                if (Double.isFinite(trial) && trial <= before * (1 + 1e-12) + 1e-300) {
                    break;
                }
                t /= 2;
            }
            if (!Double.isFinite(trial)) {
                break;
            }
            System.arraycopy(trialAlpha, 0, alpha, 0, levels);
            System.arraycopy(trialBeta, 0, beta, 0, p);
            double[] swap = eta;
            eta = trialEta;
            trialEta = swap;
            swap = mu;
            mu = trialMu;
            trialMu = swap;
            deviance = trial;
            boundaryHere = boundaryOfLastPass;
            double enough = family == GlmFamily.PROBIT ? SCORING_DECREMENT : CANONICAL_DECREMENT;
            if (Math.abs(trial - before) / (Math.abs(trial) + 0.1) < TOLERANCE && decrement < enough) {
                outcome = Outcome.CONVERGED;
                break;
            }
        }
        if (outcome == Outcome.NOT_CONVERGED) {
            iterations = maxIterations;
        }
        boundaryRows = inParts ? boundaryHere : countBoundary(mu);
        if (boundaryRows > 0) {
            outcome = Outcome.SEPARATION;
            return;
        }
        if (outcome == Outcome.CONVERGED) {
            // the accepted trial's pass left the information at the estimate
            if (!factor(p, false)) {
                outcome = Outcome.KEY_COLLINEAR;
            }
        }
    }

    /** The rows whose fitted mean {@code means} is at the boundary: separation (for Poisson, rows with outcome 0). */
    private int countBoundary(double[] means) {
        int count = 0;
        for (int i = 0; i < rows.n; i++) {
            if (family.atBoundary(means[i]) && (family != GlmFamily.POISSON || rows.y[i] == 0)) {
                count++;
            }
        }
        return count;
    }

    /**
     * Levels at the link of their starting mean ({@link GlmFamily#startingMean}), columns at 0; for rows held
     * in parts from their START pass's level sums ({@link #outcomeSums}, summed where the rows are).
     */
    private void coldStart(GlmRows rows, GlmFamily family) {
        int levels = rows.levels;
        double[] sums = rows.heldInParts != null ? rows.startSums(family) : outcomeSums(rows, new double[2 * levels]);
        for (int l = 0; l < levels; l++) {
            alpha[l] = family.link(family.startingMean(sums[l], (int) sums[levels + l]));
        }
        Arrays.fill(beta, 0, rows.p, 0);
    }

    /** Into {@code out}: per level the outcome's sum, then per level the rows (unweighted). Returns out. */
    static double[] outcomeSums(GlmRows rows, double[] out) {
        int levels = rows.levels;
        for (int i = 0; i < rows.n; i++) {
            out[rows.level[i]] += rows.y[i];
            out[levels + rows.level[i]]++;
        }
        return out;
    }

    /** Rows per chunk of the pass, so that a chunk's rows stay in cache between its steps. */
    private static final int CHUNK = 512;

    /**
     * One pass over the rows at coefficients {@code a}, {@code b}: chunk by chunk in row order, the linear
     * predictors (into {@code etaOut}), the means (into {@code muOut}) and the deviance, then the weights,
     * the scores and their sums of the information and the score (see {@link #accumulate}). A trial step
     * whose deviance is rejected has its information discarded; an accepted one has it ready for the next
     * step, and the last accepted one for the covariance at the estimate, so each iteration reads the rows
     * once.
     *
     * @return the deviance
     */
    private double evaluate(double[] a, double[] b, double[] etaOut, double[] muOut) {
        if (rows.heldInParts != null) {
            return evaluateInParts(a, b);
        }
        double d = sums(a, b, etaOut, muOut);
        boundaryOfLastPass = -1;
        removeLevelMeans();
        return d;
    }

    /** The rows at the boundary at the point of the last pass over rows held in parts ({@link #evaluateInParts}). */
    private int boundaryOfLastPass = -1;

    /**
     * {@link #evaluate} for rows held in parts: every part sums, at the point given, what {@link #sums}
     * sums over its rows ({@link #partSums}), the parts merged in part order; the levels' parts removed
     * here, as for rows held here.
     */
    private double evaluateInParts(double[] a, double[] b) {
        int p = rows.p;
        int levels = rows.levels;
        double[] s = rows.passes.sums(GlmPassRequest.evaluate(rows.heldInParts, family, Arrays.copyOf(a, levels),
                Arrays.copyOf(b, p)));
        boundaryOfLastPass = (int) s[1];
        int at = 2;
        System.arraycopy(s, at, levelWeight, 0, levels);
        System.arraycopy(s, at += levels, levelScore, 0, levels);
        System.arraycopy(s, at += levels, levelMean, 0, levels * p);
        System.arraycopy(s, at += levels * p, gram, 0, p * p);
        System.arraycopy(s, at + p * p, rhs, 0, p);
        removeLevelMeans();
        return s[0];
    }

    /**
     * One part's sums at {@code a}, {@code b} over {@code part} (its share of a specification's rows,
     * {@link GlmRows#fillPart}): the deviance, the rows at the boundary, and the information's and the
     * score's sums before the levels' parts are removed, by the same pass as rows held here ({@link #sums}),
     * in the layout of {@link GlmPassRequest#layout}. Leaves this part's linear predictors, means, weights
     * and scores in {@link #eta}, {@link #mu}, {@link #weight} and {@link #score}.
     */
    double[] partSums(GlmRows part, GlmFamily family, double[] a, double[] b) {
        this.rows = part;
        this.family = family;
        int p = part.p;
        int levels = part.levels;
        grow(part.n, p, levels);
        double d = sums(a, b, eta, mu);
        double[] out = new double[2 + 2 * levels + levels * p + p * p + p];
        out[0] = d;
        out[1] = countBoundary(mu);
        int at = 2;
        System.arraycopy(levelWeight, 0, out, at, levels);
        System.arraycopy(levelScore, 0, out, at += levels, levels);
        System.arraycopy(levelMean, 0, out, at += levels, levels * p);
        System.arraycopy(gram, 0, out, at += levels * p, p * p);
        System.arraycopy(rhs, 0, out, at + p * p, p);
        return out;
    }

    /** The pass of {@link #evaluate} over rows held here, its sums left before the levels' parts are removed. */
    private double sums(double[] a, double[] b, double[] etaOut, double[] muOut) {
        int n = rows.n;
        int p = rows.p;
        int levels = rows.levels;
        double[] x = rows.x;
        int[] level = rows.level;
        Arrays.fill(levelWeight, 0, levels, 0);
        Arrays.fill(levelMean, 0, levels * p, 0);
        Arrays.fill(levelScore, 0, levels, 0);
        Arrays.fill(gram, 0, p * p, 0);
        Arrays.fill(rhs, 0, p, 0);
        double d = 0;
        for (int from = 0; from < n; from += CHUNK) {
            int to = Math.min(n, from + CHUNK);
            predict(a, b, etaOut, from, to);
            double chunk = family.evaluate(rows.y, etaOut, muOut, weight, score, from, to);
            d += rows.prior == null ? chunk : weigh(muOut, from, to);
            accumulate(from, to);
        }
        return d;
    }

    /**
     * The information at a converged fit's estimate (the within cross-products' lower triangle, row by row;
     * each level's weight and weighted column means), kept for the fits that start from it: a child, the
     * same model on the same rows with one more column before the key, starts from the parent's
     * coefficients with the new one at 0, so its linear predictors, weights and scores are the parent's, and
     * of its information only the new column's cross-products are new. {@link #extend} sums those and the
     * score, and takes the rest from here: p + 1 products a row instead of p (p + 1) / 2. Each entry of the
     * information is the same sum, over the same rows in the same order, whichever columns surround it, so
     * the start's information is the same to the last bit either way.
     */
    record Information(double[] lowerGram, double[] levelWeight, double[] levelMean) {
        /** Doubles kept for a fit of {@code p} columns and {@code levels} levels. */
        static long doubles(int p, int levels) {
            return (long) p * (p + 1) / 2 + (long) levels * (p + 1);
        }
    }

    /** The information at the estimate of the fit just made (which must have converged). */
    Information information() {
        int p = rows.p;
        int levels = rows.levels;
        double[] lower = new double[p * (p + 1) / 2];
        for (int j = 0, at = 0; j < p; j++) {
            System.arraycopy(gram, j * p, lower, at, j + 1);
            at += j + 1;
        }
        return new Information(lower, Arrays.copyOf(levelWeight, levels), Arrays.copyOf(levelMean, levels * p));
    }

    /**
     * The start's pass when the start is {@code parent}'s estimate ({@link Information}): the linear
     * predictors, means, deviance, weights and scores as {@link #evaluate} computes them, the level sums
     * and cross-products of the new column (index p - 2) by the same expressions as {@link #accumulate},
     * the rest of the information copied.
     */
    private double extend(Information parent) {
        int n = rows.n;
        int p = rows.p;
        int levels = rows.levels;
        int added = p - 2;
        System.arraycopy(parent.levelWeight, 0, levelWeight, 0, levels);
        for (int l = 0; l < levels; l++) {
            int from = l * (p - 1);
            int to = l * p;
            System.arraycopy(parent.levelMean, from, levelMean, to, added);
            levelMean[to + added] = 0;
            levelMean[to + p - 1] = parent.levelMean[from + added];
        }
        Arrays.fill(levelScore, 0, levels, 0);
        Arrays.fill(rhs, 0, p, 0);
        Arrays.fill(gram, added * p, added * p + added + 1, 0);
        gram[(p - 1) * p + added] = 0;
        double d = 0;
        for (int from = 0; from < n; from += CHUNK) {
            int to = Math.min(n, from + CHUNK);
            predict(alpha, beta, eta, from, to);
            double chunk = family.evaluate(rows.y, eta, mu, weight, score, from, to);
            d += rows.prior == null ? chunk : weigh(mu, from, to);
            accumulateAdded(from, to, added);
        }
        for (int l = 0; l < levels; l++) {
            levelMean[l * p + added] /= levelWeight[l];
        }
        for (int l = 0; l < levels; l++) {
            double s = levelWeight[l];
            int lo = l * p;
            double u = levelScore[l];
            for (int j = 0; j < p; j++) {
                rhs[j] -= levelMean[lo + j] * u;
            }
            double sm = s * levelMean[lo + added];
            for (int k = 0; k <= added; k++) {
                gram[added * p + k] -= sm * levelMean[lo + k];
            }
            gram[(p - 1) * p + added] -= s * levelMean[lo + p - 1] * levelMean[lo + added];
        }
        for (int j = 0, at = 0; j < p - 1; j++) {
            int row = j == added ? p - 1 : j;
            for (int k = 0; k <= j; k++) {
                gram[row * p + (k == added ? p - 1 : k)] = parent.lowerGram[at++];
            }
        }
        return d;
    }

    /**
     * {@link #accumulate}'s sums that involve column {@code added} (its level sums and cross-products),
     * with the levels' scores and the columns' score, by the same expressions, rows grouped as there.
     */
    private void accumulateAdded(int from, int to, int added) {
        int p = rows.p;
        double[] x = rows.x;
        int[] level = rows.level;
        boolean oneLevel = rows.levels == 1;
        int key = p - 1;
        int blocks = from + (to - from) - (to - from) % BLOCK;
        for (int i = from; i < blocks; i += BLOCK) {
            int b0 = i * p;
            int b1 = b0 + p;
            int b2 = b1 + p;
            int b3 = b2 + p;
            double w0 = weight[i];
            double w1 = weight[i + 1];
            double w2 = weight[i + 2];
            double w3 = weight[i + 3];
            double u0 = score[i];
            double u1 = score[i + 1];
            double u2 = score[i + 2];
            double u3 = score[i + 3];
            double a0 = w0 * x[b0 + added];
            double a1 = w1 * x[b1 + added];
            double a2 = w2 * x[b2 + added];
            double a3 = w3 * x[b3 + added];
            if (oneLevel) {
                levelScore[0] += u0 + u1 + u2 + u3;
                levelMean[added] += a0 + a1 + a2 + a3;
            } else {
                for (int r = 0; r < BLOCK; r++) {
                    int l = level[i + r];
                    levelScore[l] += score[i + r];
                    levelMean[l * p + added] += weight[i + r] * x[(i + r) * p + added];
                }
            }
            for (int j = 0; j < p; j++) {
                rhs[j] = fma4(x[b0 + j], u0, x[b1 + j], u1, x[b2 + j], u2, x[b3 + j], u3, rhs[j]);
            }
            int go = added * p;
            for (int k = 0; k <= added; k++) {
                gram[go + k] = fma4(a0, x[b0 + k], a1, x[b1 + k], a2, x[b2 + k], a3, x[b3 + k], gram[go + k]);
            }
            int gk = key * p + added;
            gram[gk] = fma4(w0 * x[b0 + key], x[b0 + added], w1 * x[b1 + key], x[b1 + added], w2 * x[b2 + key],
                    x[b2 + added], w3 * x[b3 + key], x[b3 + added], gram[gk]);
        }
        for (int i = blocks; i < to; i++) {
            int at = i * p;
            double w = weight[i];
            double u = score[i];
            int l = level[i];
            levelScore[l] += u;
            levelMean[l * p + added] += w * x[at + added];
            for (int j = 0; j < p; j++) {
                rhs[j] = Math.fma(x[at + j], u, rhs[j]);
            }
            double a = w * x[at + added];
            int go = added * p;
            for (int k = 0; k <= added; k++) {
                gram[go + k] = Math.fma(a, x[at + k], gram[go + k]);
            }
            gram[key * p + added] = Math.fma(w * x[at + key], x[at + added], gram[key * p + added]);
        }
    }

    /**
     * Prior weights (R's {@code glm(weights = w)}; McCullagh &amp; Nelder 1989, Generalized Linear Models,
     * 2nd ed., section 2.5): row i's deviance, working weight and score are w_i times the family's, so the
     * information, the score and every sandwich built from them are those of the weighted likelihood.
     * Scales rows from..to-1's working weights and scores in place; returns their weighted deviance.
     */
    private double weigh(double[] muOut, int from, int to) {
        double[] prior = rows.prior;
        double d = 0;
        for (int i = from; i < to; i++) {
            d += prior[i] * family.unitDeviance(rows.y[i], muOut[i]);
            weight[i] *= prior[i];
            score[i] *= prior[i];
        }
        return d;
    }

    /**
     * The linear predictors of rows from..to-1, four rows at a time so that their four sums are independent
     * chains of additions (one row's sum alone waits on each addition before the next); each row's own
     * sum is in column order either way, so the values do not depend on the grouping.
     */
    private void predict(double[] a, double[] b, double[] etaOut, int from, int to) {
        int p = rows.p;
        double[] x = rows.x;
        int[] level = rows.level;
        int blocks = from + (to - from) - (to - from) % BLOCK;
        for (int i = from; i < blocks; i += BLOCK) {
            int b0 = i * p;
            int b1 = b0 + p;
            int b2 = b1 + p;
            int b3 = b2 + p;
            double e0 = a[level[i]];
            double e1 = a[level[i + 1]];
            double e2 = a[level[i + 2]];
            double e3 = a[level[i + 3]];
            for (int j = 0; j < p; j++) {
                double c = b[j];
                e0 = Math.fma(x[b0 + j], c, e0);
                e1 = Math.fma(x[b1 + j], c, e1);
                e2 = Math.fma(x[b2 + j], c, e2);
                e3 = Math.fma(x[b3 + j], c, e3);
            }
            etaOut[i] = e0;
            etaOut[i + 1] = e1;
            etaOut[i + 2] = e2;
            etaOut[i + 3] = e3;
        }
        for (int i = blocks, at = blocks * p; i < to; i++, at += p) {
            double e = a[level[i]];
            for (int j = 0; j < p; j++) {
                e = Math.fma(x[at + j], b[j], e);
            }
            etaOut[i] = e;
        }
    }

    /**
     * Adds rows from..to-1 (weights and scores already computed) to the weighted sums of each level
     * (weight, score, columns), the weighted cross-products and the columns' score. Rows go four at a time,
     * so that each cross-product entry is loaded and stored once per four rows, and the entries two rows of
     * the matrix at a time, so that each column value read serves two entries. Each entry's sum is the same
     * expression either way, so the grouping does not change its value.
     */
    private void accumulate(int from, int to) {
        int p = rows.p;
        double[] x = rows.x;
        int[] level = rows.level;
        boolean oneLevel = rows.levels == 1;
        int blocks = from + (to - from) - (to - from) % BLOCK;
        for (int i = from; i < blocks; i += BLOCK) {
            int b0 = i * p;
            int b1 = b0 + p;
            int b2 = b1 + p;
            int b3 = b2 + p;
            double w0 = weight[i];
            double w1 = weight[i + 1];
            double w2 = weight[i + 2];
            double w3 = weight[i + 3];
            double u0 = score[i];
            double u1 = score[i + 1];
            double u2 = score[i + 2];
            double u3 = score[i + 3];
            if (oneLevel) {
                levelWeight[0] += w0 + w1 + w2 + w3;
                levelScore[0] += u0 + u1 + u2 + u3;
            } else {
                for (int r = 0; r < BLOCK; r++) {
                    addToLevel(level[i + r], weight[i + r], score[i + r], x, (i + r) * p, p);
                }
            }
            int j = 0;
            for (; j + 1 < p; j += 2) {
                // two rows of the cross-products at once, sharing each load of the four rows' columns
                double x0 = x[b0 + j];
                double x1 = x[b1 + j];
                double x2 = x[b2 + j];
                double x3 = x[b3 + j];
                double y0 = x[b0 + j + 1];
                double y1 = x[b1 + j + 1];
                double y2 = x[b2 + j + 1];
                double y3 = x[b3 + j + 1];
                double a0 = w0 * x0;
                double a1 = w1 * x1;
                double a2 = w2 * x2;
                double a3 = w3 * x3;
                double c0 = w0 * y0;
                double c1 = w1 * y1;
                double c2 = w2 * y2;
                double c3 = w3 * y3;
                if (oneLevel) {
                    levelMean[j] += a0 + a1 + a2 + a3;
                    levelMean[j + 1] += c0 + c1 + c2 + c3;
                }
                rhs[j] = fma4(x0, u0, x1, u1, x2, u2, x3, u3, rhs[j]);
                rhs[j + 1] = fma4(y0, u0, y1, u1, y2, u2, y3, u3, rhs[j + 1]);
                int go = j * p;
                int gn = go + p;
                for (int k = 0; k <= j; k++) {
                    double v0 = x[b0 + k];
                    double v1 = x[b1 + k];
                    double v2 = x[b2 + k];
                    double v3 = x[b3 + k];
                    gram[go + k] = fma4(a0, v0, a1, v1, a2, v2, a3, v3, gram[go + k]);
                    gram[gn + k] = fma4(c0, v0, c1, v1, c2, v2, c3, v3, gram[gn + k]);
                }
                gram[gn + j + 1] = fma4(c0, y0, c1, y1, c2, y2, c3, y3, gram[gn + j + 1]);
            }
            if (j < p) {
                double x0 = x[b0 + j];
                double x1 = x[b1 + j];
                double x2 = x[b2 + j];
                double x3 = x[b3 + j];
                double a0 = w0 * x0;
                double a1 = w1 * x1;
                double a2 = w2 * x2;
                double a3 = w3 * x3;
                if (oneLevel) {
                    levelMean[j] += a0 + a1 + a2 + a3;
                }
                rhs[j] = fma4(x0, u0, x1, u1, x2, u2, x3, u3, rhs[j]);
                int go = j * p;
                for (int k = 0; k <= j; k++) {
                    gram[go + k] = fma4(a0, x[b0 + k], a1, x[b1 + k], a2, x[b2 + k], a3, x[b3 + k], gram[go + k]);
                }
            }
        }
        for (int i = blocks; i < to; i++) {
            int at = i * p;
            double w = weight[i];
            double u = score[i];
            addToLevel(level[i], w, u, x, at, p);
            for (int j = 0; j < p; j++) {
                double a = w * x[at + j];
                rhs[j] = Math.fma(x[at + j], u, rhs[j]);
                int go = j * p;
                for (int k = 0; k <= j; k++) {
                    gram[go + k] = Math.fma(a, x[at + k], gram[go + k]);
                }
            }
        }
    }

    /**
     * acc + a0 b0 + a1 b1 + a2 b2 + a3 b3, row by row in that order, each product added by a fused
     * multiply-add (one rounding instead of two, and one instruction where the processor has it: the
     * cross-products' pass is bound by its arithmetic, p (p + 1) / 2 products a row).
     */
    private static double fma4(double a0, double b0, double a1, double b1, double a2, double b2, double a3,
            double b3, double acc) {
        return Math.fma(a3, b3, Math.fma(a2, b2, Math.fma(a1, b1, Math.fma(a0, b0, acc))));
    }

    /**
     * Turns the sums into the within information and score: the levels' parts removed,
     * S = sum w x x' - sum_l s_l m_l m_l' and r = sum x u - sum_l m_l U_l (m_l the level's weighted column
     * means). The rows are in within coordinates already (each column's mean over its level's rows is 0),
     * so the weighted means are of the order of the columns' spread and the subtraction cancels little.
     */
    private void removeLevelMeans() {
        int p = rows.p;
        for (int l = 0; l < rows.levels; l++) {
            double s = levelWeight[l];
            int lo = l * p;
            for (int j = 0; j < p; j++) {
                levelMean[lo + j] /= s;
            }
            double u = levelScore[l];
            for (int j = 0; j < p; j++) {
                double m = levelMean[lo + j];
                rhs[j] -= m * u;
                double sm = s * m;
                int go = j * p;
                for (int k = 0; k <= j; k++) {
                    gram[go + k] -= sm * levelMean[lo + k];
                }
            }
        }
    }

    private void addToLevel(int l, double w, double u, double[] x, int at, int p) {
        levelWeight[l] += w;
        levelScore[l] += u;
        int lo = l * p;
        for (int j = 0; j < p; j++) {
            levelMean[lo + j] += w * x[at + j];
        }
    }

    /**
     * The lower factor L of the kept columns' block of the within information (L L' = I). When
     * {@code decide}, first drops, in order, each column nearly spanned by the levels and the kept columns
     * before it (the QR's rule; here, a column with no weighted within spread) and counts the kept ones; otherwise returns false when a kept column's pivot is no longer
     * positive. By Cholesky of the cross-products, unless a pivot is small enough to have cost digits
     * ({@link #ORTHOGONAL_BELOW_SHARE}): then, for the rest of the fit, by QR of the weighted design.
     */
    private boolean factor(int p, boolean decide) {
        if (orthogonal) {
            return orthogonalFactor(p, decide);
        }
        boolean[] considered = new boolean[p];
        for (int j = 0; j < p; j++) {
            considered[j] = kept[j] || (decide && !spannedByLevels(j));
        }
        int result = cholesky(gram, factor, considered, kept, beta, p, decide);
        if (result == SWITCH_TO_QR) {
            orthogonal = true;
            return orthogonalFactor(p, decide);
        }
        if (decide && result >= 0) {
            keptCount = result;
        }
        return result >= 0;
    }

    /** {@link #cholesky}'s answer where a pivot is small enough to have cost digits. */
    static final int SWITCH_TO_QR = -2;

    /**
     * The Cholesky factor of the {@code considered} columns' cross-products {@code gram} into {@code factor}
     * (lower, p x p row-major), the rule both scoring iterations share: when {@code decide}, a column with no
     * spread is dropped ({@code kept} set, its {@code beta} 0); a kept column whose pivot is at most
     * {@link #ORTHOGONAL_BELOW_SHARE} of its own sum of squares stops the factorisation for the QR of the
     * weighted design ({@link #SWITCH_TO_QR}).
     *
     * @return the kept columns' count, -1 when (not deciding) a kept pivot is not positive, or {@link #SWITCH_TO_QR}
     */
    static int cholesky(double[] gram, double[] factor, boolean[] considered, boolean[] kept, double[] beta, int p,
            boolean decide) {
        int count = 0;
        for (int j = 0; j < p; j++) {
            if (!considered[j]) {
                continue;
            }
            double own = gram[j * p + j];
            double pivot = own;
            for (int k = 0; k < j; k++) {
                if (kept[k]) {
                    double f = factor[j * p + k];
                    pivot -= f * f;
                }
            }
            if (own > 0 && !(pivot > ORTHOGONAL_BELOW_SHARE * own)) {
                return SWITCH_TO_QR;
            }
            if (decide) {
                // a column with a small pivot has gone to the QR above; one with no spread at all is dropped
                kept[j] = own > 0;
                if (!kept[j]) {
                    beta[j] = 0;
                    continue;
                }
            } else if (!(pivot > 0)) {
                return -1;
            }
            count++;
            double d = Math.sqrt(pivot);
            factor[j * p + j] = d;
            for (int i = j + 1; i < p; i++) {
                if (!decide && !kept[i]) {
                    continue;
                }
                double s = gram[i * p + j];
                for (int k = 0; k < j; k++) {
                    if (kept[k]) {
                        s -= factor[i * p + k] * factor[j * p + k];
                    }
                }
                factor[i * p + j] = s / d;
            }
        }
        return count;
    }

    /**
     * The factor from Householder QR of the weighted within design A = W^1/2 (X - M), M each row's level's
     * weighted column means, so that A'A is the within information ({@link OrthogonalFactor}); for rows held
     * in parts, from the parts' triangular factors of their rows of A (one more pass per iteration).
     */
    private boolean orthogonalFactor(int p, boolean decide) {
        boolean[] considered = new boolean[p];
        for (int j = 0; j < p; j++) {
            considered[j] = kept[j] || (decide && !spannedByLevels(j));
        }
        int rank;
        if (rows.heldInParts != null) {
            // the parts' factors of their rows of the same design, stacked (tall-skinny QR): its p x p factor R
            // is the design's up to the signs of its rows, and the same Householder steps over R's rows take
            // the same decisions as over the design's, since Q preserves every norm and projection
            double[] r = rows.passes.sums(GlmPassRequest.orthogonal(rows.heldInParts, family,
                    Arrays.copyOf(alpha, rows.levels), Arrays.copyOf(beta, p), Arrays.copyOf(levelMean, rows.levels * p),
                    considered));
            rank = householder.factor(p, p, (j, a) -> {
                for (int i = 0; i < p; i++) {
                    a[i] = r[i * p + j];
                }
            }, considered, kept, decide, factor);
        } else {
            int n = rows.n;
            double[] x = rows.x;
            int[] level = rows.level;
            rank = householder.factor(n, p, (j, a) -> {
                for (int i = 0, at = j; i < n; i++, at += p) {
                    a[i] = Math.sqrt(weight[i]) * (x[at] - levelMean[level[i] * p + j]);
                }
            }, considered, kept, decide, factor);
        }
        if (decide) {
            keptCount = OrthogonalFactor.dropped(rank, kept, beta, p);
        }
        return rank >= 0;
    }

    /**
     * The correction: columns from the within system, then each level's from its own equation. Returns its
     * quadratic form d'I d = d_b'r + sum_l U_l^2 / s_l (r the within score, U_l a level's score, s_l its
     * weight), without forming I.
     */
    private double solveStep(int p, int levels) {
        System.arraycopy(rhs, 0, step, 0, p);
        solveFactored(step, p);
        double decrement = 0;
        for (int j = 0; j < p; j++) {
            decrement += step[j] * rhs[j];
        }
        for (int l = 0; l < levels; l++) {
            double s = levelScore[l] / levelWeight[l];
            for (int j = 0; j < p; j++) {
                if (kept[j]) {
                    s -= levelMean[l * p + j] * step[j];
                }
            }
            stepAlpha[l] = s;
            decrement += levelScore[l] * levelScore[l] / levelWeight[l];
        }
        return decrement;
    }

    /** Solves (L L') v = b in place over the kept columns (dropped entries set to 0). */
    void solveFactored(double[] v, int p) {
        solveFactored(factor, kept, v, p);
    }

    /**
     * Solves (L L') v = b in place over the {@code kept} columns (dropped entries set to 0), L the lower
     * factor {@code factor} (p x p, row-major): the one solve of both scoring iterations ({@link SeveralEffectsIrls}).
     */
    static void solveFactored(double[] factor, boolean[] kept, double[] v, int p) {
        for (int j = 0; j < p; j++) {
            if (!kept[j]) {
                v[j] = 0;
                continue;
            }
            double s = v[j];
            for (int k = 0; k < j; k++) {
                if (kept[k]) {
                    s -= factor[j * p + k] * v[k];
                }
            }
            v[j] = s / factor[j * p + j];
        }
        for (int j = p - 1; j >= 0; j--) {
            if (!kept[j]) {
                continue;
            }
            double s = v[j];
            for (int k = j + 1; k < p; k++) {
                if (kept[k]) {
                    s -= factor[k * p + j] * v[k];
                }
            }
            v[j] = s / factor[j * p + j];
        }
    }

    private void grow(int n, int p, int levels) {
        if (eta.length < n) {
            eta = new double[n];
            mu = new double[n];
            weight = new double[n];
            score = new double[n];
            trialEta = new double[n];
            trialMu = new double[n];
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
        if (alpha.length < levels || levelMean.length < levels * p) {
            alpha = new double[levels];
            stepAlpha = new double[levels];
            trialAlpha = new double[levels];
            levelWeight = new double[levels];
            levelScore = new double[levels];
            levelMean = new double[levels * p];
        }
    }
}
