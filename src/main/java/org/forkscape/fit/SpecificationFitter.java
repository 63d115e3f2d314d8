package org.forkscape.fit;

/**
 * One worker's fitter of the observed data: the estimator of each specification's model
 * ({@link ModelDispatch}) and the worker's view of the rows of the variant being fitted. Not thread safe:
 * one per worker thread, reused for every specification and variant.
 */
public final class SpecificationFitter {
    private final Estimator estimator;
    private final ObservedRows rows = new ObservedRows();

    /** A fitter that picks the cheapest exact route for each sandwich. */
    public SpecificationFitter() {
        this(true);
    }

    /**
     * @param allowRowFree false forces the one-row-pass sandwich everywhere (for the benchmark's
     *                     comparison and for tests that hold the routes against each other)
     */
    public SpecificationFitter(boolean allowRowFree) {
        estimator = new ModelDispatch(allowRowFree);
    }

    /**
     * Makes this fitter keep, rather than refuse, the HC0 to HC3 row pass of a variant held in parts: such a
     * fit comes back without its standard error, and {@link #takeDeferred} gives the pieces that
     * {@link RowPassesByParts#finish} completes it with. Returns this.
     */
    public SpecificationFitter deferringRowPasses() {
        rows.deferringRowPasses();
        return this;
    }

    /**
     * Makes this fitter throw {@link RefitPending} for a QR refit of a variant held in parts that has not been
     * reduced yet, so that the runner reduces a variant's refits in batches and fits those specifications
     * again. Returns this.
     */
    public SpecificationFitter deferringRefits() {
        rows.deferringRefits();
        return this;
    }

    public KeyFit fit(DataVariant variant, SpecificationModel spec) {
        return estimator.fit(spec, rows.of(variant));
    }

    /** The row pass the last {@link #fit} left for a batch, or null (then that fit is complete). */
    public RowPassRequest takeDeferred() {
        return rows.takeDeferred();
    }
}
