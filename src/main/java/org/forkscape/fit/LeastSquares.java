package org.forkscape.fit;

import org.forkscape.plan.ErrorType;

/**
 * Least squares over sufficient statistics: the Cholesky route from the data's moments, with the QR
 * refit from rows when the precision guard asks for it, then the requested standard error by the
 * cheapest route that keeps its digits (see {@link SandwichRoute}). Not thread safe: one per worker
 * thread, reused for every specification (its solvers keep their workspaces).
 */
public final class LeastSquares implements Estimator {
    private final CholeskySubsetSolver cholesky = new CholeskySubsetSolver();
    private final QrRefit qr = new QrRefit();
    private final KeyCoefficientSandwich sandwich = new KeyCoefficientSandwich();
    private final RowFreeSandwich rowFree = new RowFreeSandwich();
    private final boolean allowRowFree;

    /**
     * @param allowRowFree false forces the one-row-pass sandwich everywhere (for the benchmark's
     *                     comparison and for tests that hold the routes against each other)
     */
    public LeastSquares(boolean allowRowFree) {
        this.allowRowFree = allowRowFree;
    }

    @Override
    public KeyFit fit(SpecificationModel spec, FitData data) {
        DataVariant variant = data.variant();
        Moments mom = data.moments(spec.variableMask());
        int n = mom.n;
        int base = variant.absorbs ? mom.levelsPresent : 1;
        int[] cols = spec.factorOrder();
        if (n <= base) {
            return KeyFit.failed(FitStatus.TOO_FEW_ROWS, n + " row" + (n == 1 ? "" : "s") + " complete on this "
                    + "specification's variables" + (variant.weighted ? " with positive weight" : ""), n,
                    base + cols.length);
        }
        if (!mom.rankCertified) {
            return KeyFit.failed(FitStatus.RANK_NOT_CERTIFIED, Integer.toString(ModularDummyRank.PRIMES.length), n,
                    base + cols.length);
        }
        if (!mom.demeaned) {
            return KeyFit.failed(FitStatus.NOT_CONVERGED, String.format("%,d fixed-effect demeaning",
                    AlternatingProjections.MAX_ITERATIONS), n, base + cols.length);
        }
        int y = spec.outcomeColumn();
        if (!(mom.totalSquares[y] > 0)) {
            return KeyFit.failed(FitStatus.CONSTANT_OUTCOME, "", n, base + cols.length);
        }
        // the n - 1 of both standard deviations cancels in their ratio
        double sdRatio = Math.sqrt(mom.totalSquares[spec.keyColumn()] / mom.totalSquares[y]);
        KeySolution s = cholesky.solve(mom, cols, y);
        int[] positions;
        boolean refit = s == null;
        if (refit) {
            s = qr.solve(data.refitRows(mom, cols, y, spec.errors()), mom, cols);
            if (s == null) {
                if (n < base + cols.length) {
                    // with fewer rows than coefficients every column is a combination of the others
                    return KeyFit.failed(FitStatus.TOO_FEW_ROWS, n + " rows for " + (base + cols.length)
                            + " coefficients", n, base + cols.length);
                }
                FitStatus status = switch (qr.keyDropReason) {
                    case CONSTANT -> FitStatus.CONSTANT_KEY;
                    case FIXED_EFFECTS -> FitStatus.KEY_IN_FIXED_EFFECTS;
                    case OTHER_COLUMNS -> FitStatus.KEY_IN_CONTROLS;
                };
                return KeyFit.failed(status, variant.layout.columnName(spec.keyColumn()), n, base + cols.length);
            }
            positions = s.keptPositions;
        } else {
            positions = identity(s.p);
        }
        int k = base + s.p;
        int dfResidual = n - k;
        if (dfResidual <= 0) {
            return KeyFit.failed(FitStatus.TOO_FEW_ROWS, n + " rows for " + k + " coefficients", n, k);
        }
        double tss = mom.totalSquares[y];
        double r2 = 1 - s.rss / tss;
        double f = ((tss - s.rss) / (k - 1)) / (s.rss / dfResidual);
        double modelF = k > 1 ? f : Double.NaN;
        double df = dfResidual;
        if (spec.errors().kind() == ErrorType.Kind.CLASSICAL) {
            double variance = s.rss / dfResidual * s.keyInverseDiagonal();
            return new KeyFit(s.keyEstimate(), Math.sqrt(variance), df, n, k, r2, s.rss, modelF, FitStatus.OK, "", s.note(), refit,
                    VarianceRoute.CLASSICAL, sdRatio);
        }
        if (spec.errors().multiway()) {
            return multiway(spec.errors(), data, mom, s, positions, y, refit,
                    new KeyFit(s.keyEstimate(), Double.NaN, Double.NaN, n, k, r2, s.rss, modelF, FitStatus.OK, "",
                            s.note(), refit, VarianceRoute.ROW_PASS, sdRatio));
        }
        RowFreeSandwich.Meat free = data.momentRoutes() ? rowFreeMeat(variant, mom, s, y, spec.errors()) : null;
        if (free != null) {
            if (spec.errors().kind() == ErrorType.Kind.CLUSTER) {
                int g = free.clusters();
                if (g < 2) {
                    return new KeyFit(s.keyEstimate(), Double.NaN, Double.NaN, n, k, r2, s.rss, modelF,
                            FitStatus.ONE_CLUSTER, "", "", refit, free.route(), sdRatio);
                }
                df = g - 1;
                double variance = free.value() * g / (g - 1) * (n - 1.0) / (n - k);
                return new KeyFit(s.keyEstimate(), Math.sqrt(variance), df, n, k, r2, s.rss, modelF, FitStatus.OK, "", s.note(),
                        refit, free.route(), sdRatio);
            }
            double variance = spec.errors().kind() == ErrorType.Kind.HC1 ? free.value() * n / (n - k) : free.value();
            return new KeyFit(s.keyEstimate(), Math.sqrt(variance), df, n, k, r2, s.rss, modelF, FitStatus.OK, "", s.note(), refit,
                    free.route(), sdRatio);
        }
        if (mom.crossedEffects != null && mom.crossedEffects.illConditioned()
                && (spec.errors().kind() == ErrorType.Kind.HC2 || spec.errors().kind() == ErrorType.Kind.HC3)) {
            // beside two absorbed columns held in parts: the status one machine's row pass gives
            return new KeyFit(s.keyEstimate(), Double.NaN, Double.NaN, n, k, r2, s.rss, modelF,
                    FitStatus.LEVERAGE_ILL_CONDITIONED, spec.errors().label(), "", refit, VarianceRoute.ROW_PASS,
                    sdRatio);
        }
        boolean crossedClusters = spec.errors().kind() == ErrorType.Kind.CLUSTER && !spec.errors().multiway()
                && mom.crossedEffects != null && mom.variant.wholeClusterCounts != null;
        if ((spec.errors().kind() != ErrorType.Kind.CLUSTER || crossedClusters) && data.defersRowPass()) {
            // the rows are held in parts: the variance follows from a pass over them for a batch of
            // specifications (RowPassesByParts.finish, with KeyCoefficientSandwich.finish as below); beside two
            // absorbed columns a one-way cluster error type too, whose scores the parts sum cluster by cluster
            data.defer(crossedClusters ? RowPassRequest.ofClusters(mom, s, y, spec.errors().clusterColumn())
                    : RowPassRequest.of(mom, s, y, spec.errors().kind()));
            return new KeyFit(s.keyEstimate(), Double.NaN, df, n, k, r2, s.rss, modelF, FitStatus.OK, "", s.note(),
                    refit, VarianceRoute.ROW_PASS, sdRatio);
        }
        KeyCoefficientSandwich.Variance v = rowPassVariance(data, mom, s, positions, y, spec.errors(), refit, k);
        if (v.failure() != null) {
            return new KeyFit(s.keyEstimate(), Double.NaN, Double.NaN, n, k, r2, s.rss, modelF, v.failure(), v.failureDetail(), "",
                    refit, VarianceRoute.ROW_PASS, sdRatio);
        }
        if (spec.errors().kind() == ErrorType.Kind.CLUSTER) {
            df = v.clusters() - 1;
        }
        return new KeyFit(s.keyEstimate(), Math.sqrt(v.value()), df, n, k, r2, s.rss, modelF, FitStatus.OK, "", s.note(), refit,
                VarianceRoute.ROW_PASS, sdRatio);
    }

    /**
     * Multi-way cluster-robust variance: the signed sum of the one-way CR1 variances of its components
     * ({@link ClusterComponents}; Cameron, Gelbach &amp; Miller 2011, Journal of Business &amp; Economic
     * Statistics 29(2)), each from the cheapest exact one-way route, with df = the fewest clusters of one
     * column, minus 1. A sum that is not positive has no standard error; its status says so.
     *
     * @param fit the fit without its standard error (not modified; the result is a copy)
     */
    private KeyFit multiway(ErrorType type, FitData data, Moments mom, KeySolution s, int[] positions, int y,
            boolean refit, KeyFit fit) {
        int n = fit.nObs();
        int k = fit.nParams();
        double variance = 0;
        int fewest = Integer.MAX_VALUE;
        VarianceRoute route = VarianceRoute.CLUSTER_CELLS;
        for (ClusterComponents.Component c : ClusterComponents.of(type)) {
            ErrorType one = c.oneWay();
            RowFreeSandwich.Meat free = data.momentRoutes() ? rowFreeMeat(data.variant(), mom, s, y, one) : null;
            double part;
            int g;
            if (free != null) {
                g = free.clusters();
                part = g < 2 ? Double.NaN : free.value() * g / (g - 1) * (n - 1.0) / (n - k);
            } else {
                KeyCoefficientSandwich.Variance v = rowPassVariance(data, mom, s, positions, y, one, refit, k);
                g = v.clusters();
                part = v.value();
                route = VarianceRoute.ROW_PASS;
            }
            if (g < 2) {
                return fit.withError(Double.NaN, Double.NaN, FitStatus.ONE_CLUSTER, "", "", route);
            }
            if (c.columns().size() == 1) {
                fewest = Math.min(fewest, g);
            }
            variance += c.sign() * part;
        }
        if (!(variance > 0)) {
            return fit.withError(Double.NaN, fewest - 1, FitStatus.VARIANCE_NOT_POSITIVE, type.label(), "", route);
        }
        return fit.withError(Math.sqrt(variance), fewest - 1, FitStatus.OK, "", fit.note(), route);
    }

    /**
     * The variance by a pass over the specification's rows: where the variant holds them, the one fused pass;
     * for cluster errors of a variant whose rows are held in parts, each cluster's score summed where the rows
     * are ({@link ClusterScoresByParts}).
     */
    private KeyCoefficientSandwich.Variance rowPassVariance(FitData data, Moments mom, KeySolution s, int[] positions,
            int y, ErrorType type, boolean refit, int k) {
        DataVariant v = data.variant();
        if (type.kind() == ErrorType.Kind.CLUSTER && !v.holdsRows() && v.clusterScoreReduction != null) {
            return ClusterScoresByParts.variance(v, RowPassRequest.of(mom, s, y, type.kind()), type.clusterColumn(),
                    mom.n, k);
        }
        return sandwich.variance(data.sandwichRows(mom, s, positions, y, type, refit), s, type, k);
    }

    /** Every coefficient from a QR refit of the specification's rows ({@link EveryCoefficient}). */
    @Override
    public FullFit fitAll(SpecificationModel spec, FitData data, double confidence, String keyTerm) {
        KeyFit check = fit(spec, data);
        DataVariant variant = data.variant();
        if (!check.ok()) {
            return EveryCoefficient.failed(spec.errors(), check.nObs(), check.nParams(), variant, check.statusText());
        }
        Moments mom = data.moments(spec.variableMask());
        int[] cols = spec.factorOrder();
        DesignRows rows = data.refitRows(mom, cols, spec.outcomeColumn(), spec.errors());
        KeySolution s = qr.solve(rows, mom, cols);
        if (s == null) {
            return EveryCoefficient.failed(spec.errors(), check.nObs(), check.nParams(), variant, check.statusText());
        }
        return EveryCoefficient.of(variant, mom, rows, s, spec.errors(), spec.outcomeColumn(), confidence, keyTerm);
    }

    /**
     * The sandwich meat by a route that needs no rows, or {@code null} when no such route applies here,
     * pays here, or could lose digits (the routes' own bounds, see {@link RowFreeSandwich}).
     */
    private RowFreeSandwich.Meat rowFreeMeat(DataVariant variant, Moments mom, KeySolution s, int y,
            ErrorType type) {
        if (!allowRowFree) {
            return null;
        }
        if ((type.kind() == ErrorType.Kind.HC0 || type.kind() == ErrorType.Kind.HC1) && variant.useFourthMoments) {
            return rowFree.hc0(mom, s, y);
        }
        if (type.kind() == ErrorType.Kind.CLUSTER && variant.clustersServedByFourthMoments(type.clusterColumn())) {
            // one row per cluster: sum over clusters of (e u)^2 is the HC0 meat, and every row is a cluster
            RowFreeSandwich.Meat hc0 = rowFree.hc0(mom, s, y);
            return hc0 == null ? null : new RowFreeSandwich.Meat(hc0.value(), mom.n, VarianceRoute.FOURTH_MOMENTS);
        }
        if (type.kind() == ErrorType.Kind.CLUSTER && variant.usesClusterMoments(type.clusterColumn())) {
            return variant.absorbsSeveral ? rowFree.clusterWithinRows(mom, s, y, type.clusterColumn())
                    : rowFree.cluster(mom, s, y, type.clusterColumn());
        }
        return null;
    }

    private int[] identity = new int[0];

    private int[] identity(int p) {
        if (identity.length < p) {
            identity = new int[p];
            for (int i = 0; i < p; i++) {
                identity[i] = i;
            }
        }
        return identity;
    }
}
