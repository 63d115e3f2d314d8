package org.forkscape.fit;

/**
 * The estimator of each specification's own model: least squares over sufficient statistics, or a
 * generalized linear model by iterations over its rows. Not thread safe: one per worker thread.
 */
public final class ModelDispatch implements Estimator {
    private final LeastSquares leastSquares;
    private GeneralizedLinear generalized;

    /** @param allowRowFree whether least squares may use the sandwich routes without rows */
    public ModelDispatch(boolean allowRowFree) {
        leastSquares = new LeastSquares(allowRowFree);
    }

    @Override
    public KeyFit fit(SpecificationModel spec, FitData data) {
        return of(spec).fit(spec, data);
    }

    @Override
    public FullFit fitAll(SpecificationModel spec, FitData data, double confidence, String keyTerm) {
        return of(spec).fitAll(spec, data, confidence, keyTerm);
    }

    private Estimator of(SpecificationModel spec) {
        if (spec.family().leastSquares()) {
            return leastSquares;
        }
        if (generalized == null) {
            generalized = new GeneralizedLinear();
        }
        return generalized;
    }
}
