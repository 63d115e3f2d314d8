package org.forkscape.fit;

/**
 * The estimator of each specification's own model: least squares over sufficient statistics, or a
 * generalized linear model by iterations over its rows. Not thread safe: one per worker thread.
 */
public final class ModelDispatch implements Estimator {
    private final LeastSquares leastSquares;
    private GeneralizedLinear generalized;
    private SeveralEffectsGlm severalEffects;

    /** @param allowRowFree whether least squares may use the sandwich routes without rows */
    public ModelDispatch(boolean allowRowFree) {
        leastSquares = new LeastSquares(allowRowFree);
    }

    @Override
    public KeyFit fit(SpecificationModel spec, FitData data) {
        return of(spec, data).fit(spec, data);
    }

    @Override
    public FullFit fitAll(SpecificationModel spec, FitData data, double confidence, String keyTerm) {
        return of(spec, data).fitAll(spec, data, confidence, keyTerm);
    }

    /** Generalized linear fits made beside two or more absorbed columns (for the test that the route was taken). */
    public long severalEffectsFits() {
        return severalEffects == null ? 0 : severalEffects.fits;
    }

    /** Whether the last fit beside two or more absorbed columns factored its information by QR (for the route's test). */
    public boolean severalEffectsFactoredByQr() {
        return severalEffects != null && severalEffects.factoredByQr();
    }

    private Estimator of(SpecificationModel spec, FitData data) {
        if (spec.family().leastSquares()) {
            return leastSquares;
        }
        if (data.variant().absorbsSeveral) {
            if (severalEffects == null) {
                severalEffects = new SeveralEffectsGlm();
            }
            return severalEffects;
        }
        if (generalized == null) {
            generalized = new GeneralizedLinear();
        }
        return generalized;
    }
}
