package org.forkscape.fit;

import java.util.ArrayList;
import java.util.List;
import org.forkscape.plan.ErrorType;
import org.forkscape.plan.ModelFamily;

/**
 * Logit, probit and Poisson regression beside two or more absorbed fixed-effect columns: the same model as R's
 * {@code glm} with a {@code factor()} term for every absorbed column, fitted by {@link SeveralEffectsIrls}
 * (scoring whose weighted least-squares steps absorb the dummies by weighted alternating projections) and
 * reported as {@link GeneralizedLinear} reports one absorbed column: the key coefficient with its classical,
 * HC0-HC3 or cluster-robust standard error ({@link GlmCovariance#variancesAcrossEffects}), the average
 * marginal effect ({@link MarginalEffect}) with its delta-method error, the residual deviance, McFadden's
 * pseudo-R-squared and the likelihood-ratio test against the model with the fixed effects alone (itself
 * fitted by the same iterations with no columns). K counts the dummies by their rank over the rows
 * ({@link FixedEffectRank}: connected components for two columns, the certified exact rank for three or
 * more), as R's {@code fit$rank}. Fits observed rows only: null draws beside such models are refused by the
 * plan check. Not thread safe: one per worker thread.
 */
final class SeveralEffectsGlm implements Estimator {
    private final GlmRows rows = new GlmRows();
    private final SeveralEffectsIrls irls;
    private final SeveralEffectsIrls nullIrls;
    private final GlmRows nullRows = new GlmRows();
    private final GlmCovariance covariance = new GlmCovariance();
    private double[] rowGradient = new double[0];
    private Moments nullModelRows;
    private int nullModelOutcome = -1;
    private GlmFamily nullModelFamily;
    private GlmLikelihoods.NullModel nullModel;
    /** Fits made so far (for the test that this route was taken). */
    long fits;

    /** Whether the last fit factored its information by QR of the weighted within design ({@link SeveralEffectsIrls#orthogonal}). */
    boolean factoredByQr() {
        return irls.orthogonal;
    }

    SeveralEffectsGlm() {
        this(Irls.MAX_ITERATIONS);
    }

    SeveralEffectsGlm(int maxIterations) {
        irls = new SeveralEffectsIrls(maxIterations);
        nullIrls = new SeveralEffectsIrls(maxIterations);
    }

    @Override
    public KeyFit fit(SpecificationModel spec, FitData data) {
        if (!data.observed()) {
            throw new IllegalStateException("null draws of generalized linear models beside two or more absorbed "
                    + "columns are refused by the plan check");
        }
        Moments mom = data.moments(spec.variableMask());
        ModelFamily family = spec.family();
        int n = mom.n;
        int[] cols = spec.factorOrder();
        int base = mom.levelsPresent;
        if (n <= base) {
            return KeyFit.failed(family, FitStatus.TOO_FEW_ROWS, n + " row" + (n == 1 ? "" : "s") + " complete on "
                    + "this specification's variables" + (mom.variant.weight != null ? " with positive weight" : ""), n,
                    base + cols.length);
        }
        if (!mom.rankCertified) {
            return KeyFit.failed(family, FitStatus.RANK_NOT_CERTIFIED,
                    Integer.toString(ModularDummyRank.PRIMES.length), n, base + cols.length);
        }
        if (!mom.demeaned) {
            return KeyFit.failed(family, FitStatus.NOT_CONVERGED, String.format("%,d fixed-effect demeaning",
                    AlternatingProjections.MAX_ITERATIONS), n, base + cols.length);
        }
        int y = spec.outcomeColumn();
        if (!(mom.totalSquares[y] > 0)) {
            return KeyFit.failed(family, FitStatus.CONSTANT_OUTCOME, "", n, base + cols.length);
        }
        data.glmRows(mom, cols, y, spec.errors(), rows);
        int[][] codes = dimensionCodes(mom.variant, rows);
        int[] levels = levelCounts;
        GlmFamily f = GlmFamily.of(family);
        fits++;
        irls.fit(rows, codes, levels, f, GeneralizedLinear.spannedByLevels(mom, cols));
        return report(spec, mom, family, f, codes, levels);
    }

    @Override
    public FullFit fitAll(SpecificationModel spec, FitData data, double confidence, String keyTerm) {
        KeyFit check = fit(spec, data);
        if (!check.ok()) {
            return EveryCoefficient.failed(spec.errors(), check.nObs(), check.nParams(), data.variant(),
                    check.statusText());
        }
        int p = rows.p;
        int[] cols = spec.factorOrder();
        double[][] rowGradients = new double[p][];
        double[][] columnGradients = new double[p][p];
        for (int j = 0; j < p; j++) {
            columnGradients[j][j] = 1;
        }
        Moments mom = data.moments(spec.variableMask());
        double[] variance = covariance.variancesAcrossEffects(irls, spec.errors(), mom.levelsPresent,
                leverages(spec.errors(), lastCodes, levelCounts), rowGradients, columnGradients, p);
        if (variance == null) {
            variance = new double[p];
            java.util.Arrays.fill(variance, Double.NaN);
        }
        double df = Double.POSITIVE_INFINITY;
        double critical = Distributions.critical(df, 1 - confidence);
        List<FullFit.Coefficient> out = new ArrayList<>();
        DataVariant variant = data.variant();
        for (int j = 0; j < p; j++) {
            if (!irls.kept[j]) {
                continue;
            }
            boolean isKey = j == p - 1;
            String term = isKey ? keyTerm : variant.layout.columnName(cols[j]);
            out.add(EveryCoefficient.coefficient(term, isKey ? "key" : "control", irls.beta[j],
                    Math.sqrt(variance[j]), df, critical));
        }
        return new FullFit(out, spec.errors().label(), df, rows.n, mom.levelsPresent + irls.keptCount,
                variant.absorbColumn, mom.levelsPresent, EveryCoefficient.dimensions(variant), covariance.clusters,
                check.r2(), Double.NaN, Double.NaN, check.modelPValue(), "ok", check.note());
    }

    private int[] levelCounts = new int[0];
    private int[][] lastCodes;

    /**
     * For HC2 and HC3, the dummies' part of each row's hat value at the estimate's working weights
     * ({@link CrossedDummyLeverage} for two columns, {@link SeveralDummyLeverage} for three or more, as least
     * squares takes them with analytic weights); null for the other types.
     */
    private DummyLeverage leverages(ErrorType errors, int[][] codes, int[] levels) {
        if (errors.kind() != ErrorType.Kind.HC2 && errors.kind() != ErrorType.Kind.HC3) {
            return null;
        }
        int n = rows.n;
        int[] all = new int[n];
        for (int i = 0; i < n; i++) {
            all[i] = i;
        }
        double[] w = java.util.Arrays.copyOf(irls.weight, n);
        return codes.length == 2 ? CrossedDummyLeverage.of(codes[0], levels[0], codes[1], levels[1], w, all)
                : SeveralDummyLeverage.of(codes, levels, all, w, n);
    }

    /** Each absorbed column's level of every row, renumbered densely over these rows. */
    private int[][] dimensionCodes(DataVariant v, GlmRows r) {
        int[][] dims = v.coded.dimensionCodes;
        int[][] codes = new int[dims.length][r.n];
        levelCounts = new int[dims.length];
        int[] source = java.util.Arrays.copyOf(r.source, r.n);
        for (int d = 0; d < dims.length; d++) {
            levelCounts[d] = SeveralEffectsWithin.renumber(dims[d], v.coded.dimensionLevels[d], source, codes[d]);
        }
        lastCodes = codes;
        return codes;
    }

    private KeyFit report(SpecificationModel spec, Moments mom, ModelFamily family, GlmFamily f, int[][] codes,
            int[] levels) {
        int n = rows.n;
        int p = rows.p;
        int rank = mom.levelsPresent;
        if (!irls.demeaned) {
            return KeyFit.failed(family, FitStatus.NOT_CONVERGED, String.format("%,d fixed-effect demeaning",
                    AlternatingProjections.MAX_ITERATIONS), n, rank + p);
        }
        switch (irls.outcome) {
            case KEY_COLLINEAR -> {
                return KeyFit.failed(family, GeneralizedLinear.keyStatus(mom, spec.keyColumn()),
                        mom.variant.layout.columnName(spec.keyColumn()), n, rank + p);
            }
            case NOT_CONVERGED -> {
                return KeyFit.failed(family, FitStatus.NOT_CONVERGED, Integer.toString(irls.iterations), n, rank + p);
            }
            case SEPARATION -> {
                return KeyFit.failed(family, FitStatus.SEPARATION,
                        GeneralizedLinear.separation(family, irls.boundaryRows), n, rank + p);
            }
            default -> {
            }
        }
        int k = rank + irls.keptCount;
        if (n - k <= 0) {
            return KeyFit.failed(family, FitStatus.TOO_FEW_ROWS, n + " rows for " + k + " coefficients", n, k);
        }
        double b = irls.beta[p - 1];
        if (rowGradient.length < n) {
            rowGradient = new double[n];
        }
        double[][] rowGradients = new double[2][];
        double[][] columnGradients = new double[2][p];
        columnGradients[0][p - 1] = 1;
        double[] recorded = mom.variant.coded.recorded[spec.keyColumn()];
        double effect = MarginalEffect.of(f, rows, irls.eta, irls.mu, irls.kept, recorded,
                MarginalEffect.otherThanZeroOrOne(rows, recorded) == 0, b, rowGradient, columnGradients[1]);
        double total = MarginalEffect.total(rows);
        rowGradients[1] = new double[n];
        for (int i = 0; i < n; i++) {
            rowGradients[1][i] = rowGradient[i] / total;
        }
        double[] v = covariance.variancesAcrossEffects(irls, spec.errors(), rank, leverages(spec.errors(), codes,
                levels), rowGradients, columnGradients, 2);
        GlmLikelihoods.NullModel none = nullModel(mom, spec.outcomeColumn(), f, codes, levels);
        if (none == null) {
            return KeyFit.failed(family, FitStatus.NOT_CONVERGED, "the null model's " + nullIrls.iterations, n, k);
        }
        return GeneralizedLinear.reported(spec, covariance, v, b, n, k, irls.deviance, irls.keptCount,
                none.at(irls.deviance), GeneralizedLinear.droppedNote(mom, spec, irls.kept), effect);
    }

    /**
     * The model with the fixed effects alone on these rows, kept from the last call for the next specification
     * on the same rows, outcome and family; null when its iterations did not converge.
     */
    private GlmLikelihoods.NullModel nullModel(Moments mom, int outcome, GlmFamily family, int[][] codes,
            int[] levels) {
        if (mom != nullModelRows || outcome != nullModelOutcome || family != nullModelFamily) {
            nullRows.fillWithoutColumns(rows);
            nullIrls.fit(nullRows, codes, levels, family, null);
            nullModel = nullIrls.outcome == Irls.Outcome.CONVERGED && nullIrls.demeaned
                    ? GlmLikelihoods.ofDeviance(rows, family, nullIrls.deviance) : null;
            nullModelRows = mom;
            nullModelOutcome = outcome;
            nullModelFamily = family;
        }
        return nullModel;
    }
}
