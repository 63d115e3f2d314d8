package org.forkscape.fit;

import org.forkscape.plan.ErrorType;

/**
 * What an estimator reads to fit one specification of a data variant: the sufficient statistics of the
 * rows it may use, and those rows themselves where a route needs them (a QR refit, a pass over rows
 * for the sandwich). The observed data ({@link ObservedRows}) and a null draw's resampled data
 * ({@link ResampledVariant}) are the two sources; an estimator never knows which one it reads.
 * Implementations keep workspaces: one per worker thread.
 */
public sealed interface FitData permits ObservedRows, ResampledVariant {
    /** The variant whose layout, levels and clusters the data has. */
    DataVariant variant();

    /** The statistics of the rows complete on {@code variableMask}'s variables. */
    Moments moments(long variableMask);

    /**
     * The rows of {@code mom} in within coordinates, columns {@code cols} (key last) and the outcome,
     * with the cluster codes that {@code errors} needs; owned by this source, valid until its next call.
     */
    DesignRows refitRows(Moments mom, int[] cols, int y, ErrorType errors);

    /**
     * The same rows as {@link #refitRows}, row by row as a generalized linear model reads them, the outcome
     * as recorded, into {@code into}.
     */
    void glmRows(Moments mom, int[] cols, int y, ErrorType errors, GlmRows into);

    /**
     * The rows the sandwich of solution {@code s} reads: after a QR refit, those of the last
     * {@link #refitRows} call ({@code positions} the kept columns' places in them); after a Cholesky
     * solve, the stored rows.
     */
    KeyCoefficientSandwich.RowView sandwichRows(Moments mom, KeySolution s, int[] positions, int y, ErrorType errors,
            boolean refit);

    /**
     * Whether the HC0 to HC3 row pass of the fit being made is to wait for a pass over rows held elsewhere,
     * made for a batch of specifications after the variant's solves ({@link RowPassesByParts}): then the
     * estimator hands its pieces to {@link #defer} instead of asking for {@link #sandwichRows}.
     */
    default boolean defersRowPass() {
        return false;
    }

    /** Keeps the pieces of the fit being made for the later pass; see {@link #defersRowPass}. */
    default void defer(RowPassRequest request) {
        throw new UnsupportedOperationException("these rows make their own passes");
    }

    /** Whether these are the observed rows (not a null draw's resample). */
    boolean observed();

    /** Whether the routes without rows (fourth moments, cluster cells) were built for these statistics. */
    boolean momentRoutes();
}
