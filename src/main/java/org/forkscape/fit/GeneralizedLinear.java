package org.forkscape.fit;

import org.forkscape.plan.ErrorType;
import org.forkscape.plan.ModelFamily;

/**
 * Logit, probit and Poisson regression of one specification by maximum likelihood ({@link Irls}) over its
 * rows, with absorbed fixed effects entered exactly as one coefficient per level (conditional or demeaned
 * estimators are not equivalent for these models), started where the plan fixes ({@link GlmStarts}). Reports
 * the key coefficient with its standard error of the specification's type ({@link GlmCovariance}) on the
 * standard normal reference, the average marginal effect with its delta-method error, the residual deviance,
 * McFadden's pseudo-R-squared 1 - log L / log L0 (McFadden 1974, "Conditional logit analysis of
 * qualitative choice behavior", in Zarembka (ed.), Frontiers in Econometrics, Academic Press) and the
 * likelihood-ratio test against the model with the intercept (or the fixed effects) alone, whose fitted
 * means are the levels' mean outcomes. Not thread safe: one per worker thread.
 */
public final class GeneralizedLinear implements Estimator {
    private final GlmRows rows = new GlmRows();
    private final Irls irls;
    private final GlmCovariance covariance = new GlmCovariance();
    private final ObservedRows observed = new ObservedRows();
    private double[] startAlpha = new double[0];
    // what the last fit's rows alone decide, kept for the next specification on the same rows (the usable
    // rows' statistics object, compared by identity, with the outcome and the model or the key column)
    private Moments nullModelRows;
    private int nullModelOutcome = -1;
    private GlmFamily nullModelFamily;
    private GlmLikelihoods.NullModel nullModel;
    private Moments twoValuedRows;
    private int twoValuedColumn = -1;
    private boolean twoValued;
    private double[] startBeta = new double[0];
    private double[] rowGradient = new double[0];

    /** Whether a start's kept information serves the child's first pass ({@link Irls.Information}). */
    private final boolean reuseInformation;

    public GeneralizedLinear() {
        this(Irls.MAX_ITERATIONS, true);
    }

    /** An estimator that gives up after {@code maxIterations} (for the test of that status). */
    GeneralizedLinear(int maxIterations) {
        this(maxIterations, true);
    }

    /** @param reuseInformation false to sum every start's information in full (for the test that it is the same) */
    GeneralizedLinear(int maxIterations, boolean reuseInformation) {
        irls = new Irls(maxIterations);
        this.reuseInformation = reuseInformation;
    }

    @Override
    public KeyFit fit(SpecificationModel spec, FitData data) {
        DataVariant variant = data.variant();
        Moments mom = data.moments(spec.variableMask());
        ModelFamily family = spec.family();
        int[] cols = spec.factorOrder();
        int y = spec.outcomeColumn();
        KeyFit unfitted = withoutFit(spec, variant, mom);
        if (unfitted != null) {
            return unfitted;
        }
        GlmStarts.Start start = data.observed()
                ? startOf(new GlmStarts.Key(family, y, mom, cols), data, mom, spec.errors())
                : observedFit(family, y, cols, spec.variableMask(), variant.drawOf != null ? variant.drawOf : variant,
                        spec.errors());
        GlmStarts.Key key = new GlmStarts.Key(family, y, mom, cols);
        fitRows(key, data, mom, spec.errors(), start);
        if (data.observed()) {
            variant.glmStarts.put(key, startFor(key, mom, start));
        }
        return report(spec, mom, family, data.observed());
    }

    /** The failed fit of a specification whose rows decide it without iterations, or null. */
    private static KeyFit withoutFit(SpecificationModel spec, DataVariant variant, Moments mom) {
        ModelFamily family = spec.family();
        int n = mom.n;
        int p = spec.factorOrder().length;
        int base = variant.absorbs ? mom.levelsPresent : 1;
        if (n <= base) {
            return KeyFit.failed(family, FitStatus.TOO_FEW_ROWS, n + " row" + (n == 1 ? "" : "s") + " complete on "
                    + "this specification's variables" + (variant.weight != null ? " with positive weight" : ""), n,
                    base + p);
        }
        if (!(mom.totalSquares[spec.outcomeColumn()] > 0)) {
            return KeyFit.failed(family, FitStatus.CONSTANT_OUTCOME, "", n, base + p);
        }
        return null;
    }

    /**
     * The starts that {@link #fit} of {@code spec} on the observed {@code data} would fit first, because no
     * fit has kept them yet: its ancestors from the nearest kept one (exclusive) to its parent, farthest
     * first ({@link GlmStarts}); empty when the specification needs no iterations, and for a null draw, whose
     * fits start from the observed fits.
     */
    static java.util.List<GlmStarts.Key> missingStarts(SpecificationModel spec, FitData data) {
        Moments mom = data.moments(spec.variableMask());
        if (!data.observed() || withoutFit(spec, data.variant(), mom) != null) {
            return java.util.List.of();
        }
        java.util.LinkedList<GlmStarts.Key> missing = new java.util.LinkedList<>();
        GlmStarts.Key parent = new GlmStarts.Key(spec.family(), spec.outcomeColumn(), mom, spec.factorOrder()).parent();
        while (parent != null && data.variant().glmStarts.get(parent) == null) {
            missing.addFirst(parent);
            parent = parent.parent();
        }
        return missing;
    }

    /**
     * Fits the start {@code key}, whose parent's start is kept (or which has no parent), and keeps it: one
     * step of {@link #startOf}'s walk, for a variant held in parts whose starts are fitted a generation of
     * the tree at a time ({@link GlmFitsByParts}).
     */
    void fitStart(GlmStarts.Key key, FitData data, ErrorType errors) {
        if (data.variant().glmStarts.get(key) != null) {
            return;
        }
        GlmStarts.Start parent = key.parent() == null ? null : data.variant().glmStarts.get(key.parent());
        fitRows(key, data, key.rows(), errors, parent);
        data.variant().glmStarts.put(key, startFor(key, key.rows(), parent));
    }

    /** Every coefficient, from the state of the fit just made ({@link GlmFullFit}). */
    @Override
    public FullFit fitAll(SpecificationModel spec, FitData data, double confidence, String keyTerm) {
        KeyFit check = fit(spec, data);
        if (!check.ok()) {
            return EveryCoefficient.failed(spec.errors(), check.nObs(), check.nParams(), data.variant(),
                    check.statusText());
        }
        return GlmFullFit.of(irls, rows, covariance, spec, data.variant(), data.moments(spec.variableMask()), check,
                confidence, keyTerm);
    }

    /** Whether the last fit started from its parent's information ({@link Irls.Information}). */
    boolean startedFromParentInformation() {
        return irls.extended;
    }

    /** Whether the last fit factored its information by QR of the weighted design ({@link Irls#orthogonal}). */
    boolean factoredByQr() {
        return irls.orthogonal;
    }

    /** The start of {@code key}: its parent's fit, fitting the missing ancestors first (nearest first). */
    private GlmStarts.Start startOf(GlmStarts.Key key, FitData data, Moments mom, ErrorType errors) {
        java.util.ArrayDeque<GlmStarts.Key> missing = new java.util.ArrayDeque<>();
        GlmStarts.Key parent = key.parent();
        GlmStarts.Start start = null;
        while (parent != null) {
            start = data.variant().glmStarts.get(parent);
            if (start != null) {
                break;
            }
            missing.push(parent);
            parent = parent.parent();
        }
        while (!missing.isEmpty()) {
            GlmStarts.Key ancestor = missing.pop();
            fitRows(ancestor, data, mom, errors, start);
            start = startFor(ancestor, mom, start);
            data.variant().glmStarts.put(ancestor, start);
        }
        return start;
    }

    /** The observed fit's coefficients, as the start of a null draw's refit. */
    private GlmStarts.Start observedFit(ModelFamily family, int y, int[] cols, long variables, DataVariant variant,
            ErrorType errors) {
        ObservedRows view = observed.of(variant);
        Moments mom = view.moments(variables);
        GlmStarts.Key key = new GlmStarts.Key(family, y, mom, cols);
        GlmStarts.Start start = variant.glmStarts.get(key);
        if (start != null) {
            return start;
        }
        GlmStarts.Start parent = startOf(key, view, mom, errors);
        fitRows(key, view, mom, errors, parent);
        start = startFor(key, mom, parent);
        variant.glmStarts.put(key, start);
        return start;
    }

    /** What a fit passes on as a start: its own coefficients when it converged, else the start it had. */
    private GlmStarts.Start startFor(GlmStarts.Key key, Moments mom, GlmStarts.Start previous) {
        if (irls.outcome == Irls.Outcome.CONVERGED) {
            return GlmStarts.of(irls, rows, key.columns(), mom, mom.variant.levels);
        }
        return previous;
    }

    private void fitRows(GlmStarts.Key key, FitData data, Moments mom, ErrorType errors, GlmStarts.Start start) {
        data.glmRows(mom, key.columns(), key.outcome(), errors, rows);
        GlmFamily family = GlmFamily.of(key.family());
        if (startAlpha.length < rows.levels || startBeta.length < rows.p) {
            startAlpha = new double[Math.max(rows.levels, startAlpha.length)];
            startBeta = new double[Math.max(rows.p, startBeta.length)];
        }
        boolean[] spanned = spannedByLevels(mom, key.columns());
        if (start != null && GlmStarts.apply(start, rows, key.columns(), mom, startAlpha, startBeta)) {
            // the parent's information, when the start is the parent's own estimate on these rows
            boolean parent = reuseInformation && start.information() != null && start.rows() == mom
                    && start.beta().length == rows.p - 1 && rows.heldInParts == null;
            irls.fit(rows, family, startAlpha, startBeta, spanned, parent ? start.information() : null);
        } else {
            irls.fit(rows, family, null, null, spanned);
        }
    }

    /**
     * The columns the absorbed levels span, by the rule of least squares' QR refit: a within sum of squares
     * below {@link QrRefit#TOLERANCE} squared of the column's total about its mean, over these rows
     * (unweighted, so that a column is in or out of the model whatever the iteration's weights); null when
     * nothing is absorbed. Judged against the column's within spread alone, a column that differs from a
     * function of the levels by rounding would keep a coefficient of noise.
     */
    static boolean[] spannedByLevels(Moments mom, int[] cols) {
        DataVariant variant = mom.variant;
        if (!variant.absorbs) {
            return null;
        }
        boolean[] spanned = null;
        int stride = variant.columns;
        for (int j = 0; j < cols.length; j++) {
            int c = cols[j];
            if (mom.within[c * stride + c] < QrRefit.TOLERANCE * QrRefit.TOLERANCE * mom.totalSquares[c]) {
                if (spanned == null) {
                    spanned = new boolean[cols.length];
                }
                spanned[j] = true;
            }
        }
        return spanned;
    }

    /** @param margins whether to compute the average marginal effect (observed data; not a null draw's) */
    private KeyFit report(SpecificationModel spec, Moments mom, ModelFamily family, boolean margins) {
        DataVariant variant = mom.variant;
        int n = rows.n;
        int p = rows.p;
        int levels = rows.levels;
        int keyColumn = spec.keyColumn();
        switch (irls.outcome) {
            case KEY_COLLINEAR -> {
                return KeyFit.failed(family, keyStatus(mom, keyColumn), variant.layout.columnName(keyColumn), n,
                        levels + p);
            }
            case NOT_CONVERGED -> {
                return KeyFit.failed(family, FitStatus.NOT_CONVERGED, Integer.toString(irls.iterations), n,
                        levels + p);
            }
            case SEPARATION -> {
                return KeyFit.failed(family, FitStatus.SEPARATION, separation(family), n, levels + p);
            }
            default -> {
            }
        }
        int k = levels + irls.keptCount;
        if (n - k <= 0) {
            return KeyFit.failed(family, FitStatus.TOO_FEW_ROWS, n + " rows for " + k + " coefficients", n, k);
        }
        GlmFamily f = irls.family;
        double b = irls.beta[p - 1];
        double[][] levelGradient = new double[2][levels];
        double[][] columnGradient = new double[2][p];
        columnGradient[0][p - 1] = 1;
        double effect = margins ? marginalEffect(f, keyColumn, mom, levelGradient[1], columnGradient[1], b)
                : Double.NaN;
        double[] v = covariance.variances(irls, spec.errors(), levelGradient, columnGradient, margins ? 2 : 1);
        GlmLikelihoods likelihoods = nullModel(mom, spec.outcomeColumn(), f, margins).at(irls.deviance);
        return reported(spec, covariance, v, b, n, k, irls.deviance, irls.keptCount, likelihoods, droppedNote(mom, spec),
                effect);
    }

    /**
     * The fit's report from its variances {@code v} (the key coefficient's, then the marginal effect's when
     * {@code v} has two; null with {@code covariance}'s failure set when undefined, NaN where a multi-way sum is
     * not positive), McFadden's pseudo-R-squared and the likelihood-ratio test against {@code likelihoods}' null
     * model: one report for one absorbed column and for several ({@link SeveralEffectsGlm}).
     */
    static KeyFit reported(SpecificationModel spec, GlmCovariance covariance, double[] v, double b, int n, int k,
            double deviance, int keptCount, GlmLikelihoods likelihoods, String note, double effect) {
        ModelFamily family = spec.family();
        double r2 = 1 - likelihoods.logLik() / likelihoods.nullLogLik();
        double lr = Distributions.chiSquareUpperP(Math.max(0, likelihoods.nullDeviance() - deviance), keptCount);
        if (v != null && Double.isNaN(v[0])) {
            // a multi-way sum that is not positive (GlmCovariance.clustered): no error, as least squares
            return new KeyFit(b, Double.NaN, Double.NaN, n, k, r2, deviance, Double.NaN,
                    FitStatus.VARIANCE_NOT_POSITIVE, spec.errors().label(), "", false, VarianceRoute.ROW_PASS,
                    Double.NaN, family, effect, Double.NaN, lr);
        }
        if (v == null) {
            return new KeyFit(b, Double.NaN, Double.NaN, n, k, r2, deviance, Double.NaN, covariance.failure,
                    covariance.failureDetail, "", false, VarianceRoute.ROW_PASS, Double.NaN, family, effect,
                    Double.NaN, lr);
        }
        VarianceRoute route = spec.errors().kind() == ErrorType.Kind.CLASSICAL ? VarianceRoute.CLASSICAL
                : VarianceRoute.ROW_PASS;
        return new KeyFit(b, Math.sqrt(v[0]), Double.POSITIVE_INFINITY, n, k, r2, deviance, Double.NaN,
                FitStatus.OK, "", note, false, route, Double.NaN, family, effect, v.length > 1 ? Math.sqrt(v[1])
                        : Double.NaN, lr);
    }

    /**
     * The average marginal effect of the key predictor ({@link MarginalEffect}), its gradient summed per
     * level for the delta method.
     */
    private double marginalEffect(GlmFamily f, int keyColumn, Moments mom, double[] levelGradient,
            double[] columnGradient, double b) {
        int p = rows.p;
        boolean twoValued = twoValued(mom, keyColumn);
        double[] sums;
        if (rows.heldInParts != null) {
            sums = rows.passes.sums(GlmPassRequest.margins(rows.heldInParts, f, java.util.Arrays.copyOf(irls.alpha,
                    rows.levels), java.util.Arrays.copyOf(irls.beta, p), twoValued));
            System.arraycopy(sums, 2, levelGradient, 0, rows.levels);
            System.arraycopy(sums, 2 + rows.levels, columnGradient, 0, p);
        } else {
            if (rowGradient.length < rows.n) {
                rowGradient = new double[rows.n];
            }
            sums = marginSums(rows, irls, f, mom.variant.coded.recorded[keyColumn], twoValued, b, rowGradient,
                    levelGradient, columnGradient);
        }
        double sum = sums[0];
        double total = sums[1];
        for (int l = 0; l < rows.levels; l++) {
            levelGradient[l] /= total;
        }
        for (int j = 0; j < p; j++) {
            columnGradient[j] = irls.kept[j] ? columnGradient[j] / total : 0;
        }
        return twoValued ? sum / total : b * sum / total;
    }

    /**
     * The average marginal effect's sums over {@code rows} at the fit {@code irls} (its linear predictors and
     * means for these rows, {@link MarginalEffect#sums}): returns {the effect's sum, the rows' weight} and adds
     * each row's gradient terms into {@code levelGradient} (by the row's level) and {@code columnGradient};
     * every sum adds over parts of the rows.
     *
     * @param recorded    the key predictor as recorded, by {@link GlmRows#source} row
     * @param rowGradient a buffer of at least the rows' count
     */
    static double[] marginSums(GlmRows rows, Irls irls, GlmFamily f, double[] recorded, boolean twoValued, double b,
            double[] rowGradient, double[] levelGradient, double[] columnGradient) {
        double[] sums = MarginalEffect.sums(f, rows, irls.eta, irls.mu, recorded, twoValued, b, rowGradient,
                columnGradient);
        for (int i = 0; i < rows.n; i++) {
            levelGradient[rows.level[i]] += rowGradient[i];
        }
        return sums;
    }

    /**
     * The null model's part of the likelihoods, the same for every specification on these rows; kept from
     * the last call only for the observed data ({@code observed}), whose statistics objects stand for one
     * set of rows each.
     */
    private GlmLikelihoods.NullModel nullModel(Moments mom, int outcome, GlmFamily family, boolean observed) {
        if (!observed || mom != nullModelRows || outcome != nullModelOutcome || family != nullModelFamily) {
            nullModel = GlmLikelihoods.nullModel(rows, family);
            nullModelRows = observed ? mom : null;
            nullModelOutcome = outcome;
            nullModelFamily = family;
        }
        return nullModel;
    }

    /**
     * Whether the key predictor is recorded as 0 and 1 alone in these rows (observed data; kept from the last
     * call); for rows held in parts, from their START pass.
     */
    private boolean twoValued(Moments mom, int keyColumn) {
        if (mom != twoValuedRows || keyColumn != twoValuedColumn || rows.heldInParts != null) {
            twoValued = rows.heldInParts != null ? rows.startSums(irls.family)[4 * rows.levels + 2] == 0
                    : MarginalEffect.otherThanZeroOrOne(rows, mom.variant.coded.recorded[keyColumn]) == 0;
            twoValuedRows = rows.heldInParts != null ? null : mom;
            twoValuedColumn = keyColumn;
        }
        return twoValued;
    }

    static FitStatus keyStatus(Moments mom, int keyColumn) {
        return switch (dropReason(mom, keyColumn)) {
            case CONSTANT -> FitStatus.CONSTANT_KEY;
            case FIXED_EFFECTS -> FitStatus.KEY_IN_FIXED_EFFECTS;
            case OTHER_COLUMNS -> FitStatus.KEY_IN_CONTROLS;
        };
    }

    /**
     * Why a column was dropped: constant in the rows, nearly spanned by the fixed effects (its within sum of
     * squares below {@link CholeskySubsetSolver#MIN_WITHIN_SHARE} of its total), or by the other columns.
     */
    private static DropReason dropReason(Moments mom, int column) {
        double total = mom.totalSquares[column];
        if (!(total > 0)) {
            return DropReason.CONSTANT;
        }
        int stride = mom.variant.columns;
        if (mom.variant.absorbs && mom.within[column * stride + column] < CholeskySubsetSolver.MIN_WITHIN_SHARE * total) {
            return DropReason.FIXED_EFFECTS;
        }
        return DropReason.OTHER_COLUMNS;
    }

    private String separation(ModelFamily family) {
        return separation(family, irls.boundaryRows);
    }

    /** The separation status's detail for {@code count} rows at the boundary. */
    static String separation(ModelFamily family, int count) {
        String rowsText = count + " row" + (count == 1 ? "" : "s");
        return family == ModelFamily.POISSON
                ? "the fitted means of " + rowsText + " with outcome 0 are 0; the maximum likelihood estimate does "
                        + "not exist"
                : "the fitted probabilities of " + rowsText + " are 0 or 1; the maximum likelihood estimate does "
                        + "not exist";
    }

    /** The controls dropped as collinear, in the words of the least-squares note. */
    private String droppedNote(Moments mom, SpecificationModel spec) {
        return droppedNote(mom, spec, irls.kept);
    }

    /** The controls not {@code kept}, in the words of the least-squares note. */
    static String droppedNote(Moments mom, SpecificationModel spec, boolean[] kept) {
        int[] cols = spec.factorOrder();
        java.util.Map<String, java.util.List<String>> dropped = new java.util.LinkedHashMap<>();
        for (int j = 0; j < cols.length - 1; j++) {
            if (!kept[j]) {
                dropped.computeIfAbsent(dropReason(mom, cols[j]).words, r -> new java.util.ArrayList<>())
                        .add(mom.variant.layout.columnName(cols[j]));
            }
        }
        return DropReason.note(dropped);
    }
}
