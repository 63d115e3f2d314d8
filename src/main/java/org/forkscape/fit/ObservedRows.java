package org.forkscape.fit;

import org.forkscape.plan.ErrorType;

/**
 * The observed data of one variant as an estimator reads it, with one worker's row buffers. Not thread
 * safe: one per worker thread, pointed at each variant in turn.
 */
public final class ObservedRows implements FitData {
    private DataVariant variant;
    private final DesignRows rows = new DesignRows();
    private final KeyCoefficientSandwich.RowView view = new KeyCoefficientSandwich.RowView();
    /** Whether row passes of variants held in parts wait for a batch ({@link RowPassesByParts}). */
    private boolean deferring;
    private boolean deferringRefits;
    private RowPassRequest deferred;
    /** Where a generalized linear fit's passes over rows held in parts are made, or null ({@link GlmFitsByParts}). */
    private GlmRows.GlmPasses glmPasses;

    /** Points this worker's view at {@code v}; returns this. */
    ObservedRows of(DataVariant v) {
        variant = v;
        return this;
    }

    @Override
    public DataVariant variant() {
        return variant;
    }

    @Override
    public Moments moments(long variableMask) {
        return variant.moments(variableMask);
    }

    @Override
    public DesignRows refitRows(Moments mom, int[] cols, int y, ErrorType errors) {
        if (!variant.holdsRows() && variant.refitReduction != null) {
            // the rows are held elsewhere: their triangular factor, reduced there, stands for them
            if (!deferringRefits) {
                return variant.refitReduction.rows(mom, cols, y);
            }
            RefitRequest request = new RefitRequest(mom, cols.clone(), y);
            double[][] factor = variant.refitFactors.get(request);
            if (factor == null) {
                throw new RefitPending(request);
            }
            return DesignRows.ofFactor(factor, cols.length);
        }
        requireRows("the precision guard's QR refit (its cross-product matrix is too poorly conditioned to solve "
                + "from sums)");
        rows.fill(mom, cols, y, clusterCodes(errors));
        return rows;
    }

    /** Gathered straight from the variant's columns, with no column-by-column copy in between. */
    @Override
    public void glmRows(Moments mom, int[] cols, int y, ErrorType errors, GlmRows into) {
        if (!variant.holdsRows() && glmPasses != null) {
            into.fillHeldInParts(mom, cols, y, errors.kind() == ErrorType.Kind.CLUSTER ? ClusterComponents.of(errors)
                    : java.util.List.of(), glmPasses);
            return;
        }
        if (!variant.holdsRows() && deferring && variant.glmPassReduction != null) {
            throw new GlmPending();
        }
        requireRows("the iterations of a generalized linear model");
        into.fill(mom, cols, variant.coded.recorded[y], clusterCodes(errors));
    }

    @Override
    public KeyCoefficientSandwich.RowView sandwichRows(Moments mom, KeySolution s, int[] positions, int y,
            ErrorType errors, boolean refit) {
        requireRows(errors.kind() == ErrorType.Kind.HC2 || errors.kind() == ErrorType.Kind.HC3
                ? errors.label() + " leverages" : "a row pass for its " + errors.label() + " standard error (the "
                + "route from stored sums could lose digits here)");
        int[] codes = clusterCodes(errors);
        boolean leverages = errors.kind() == ErrorType.Kind.HC2 || errors.kind() == ErrorType.Kind.HC3;
        DummyLeverage dummies = leverages && variant.absorbsSeveral ? mom.dummyLeverage() : null;
        if (refit) {
            if (codes != null) {
                // a multi-way error type reads the refit rows once per component clustering
                for (int i = 0; i < rows.n; i++) {
                    rows.cluster[i] = codes[rows.source[i]];
                }
            }
            return view.overRows(rows, positions, s.p, mom, clusterCountOf(rows)).withDummyLeverage(dummies);
        }
        int count = codes == null ? 0 : variant.clusterCounts.get(errors.clusterColumn());
        return view.over(variant.rowColumns(mom), s.kept, s.p, y, mom, mom.n == variant.rows ? null : mom.usableRows(), codes,
                count).withDummyLeverage(dummies);
    }

    /** Makes this worker keep the row passes of variants held in parts for a batch; returns this. */
    /** Makes a refit of a variant held in parts wait for a batch ({@link RefitPending}) unless already reduced. */
    ObservedRows deferringRefits() {
        deferringRefits = true;
        return this;
    }

    /** Makes this view's generalized linear fits of a variant held in parts pass over the rows through {@code passes}. */
    ObservedRows passingGlmsTo(GlmRows.GlmPasses passes) {
        glmPasses = passes;
        return this;
    }

    ObservedRows deferringRowPasses() {
        deferring = true;
        return this;
    }

    @Override
    public boolean defersRowPass() {
        return deferring && !variant.holdsRows() && variant.rowPassReduction != null;
    }

    @Override
    public void defer(RowPassRequest request) {
        deferred = request;
    }

    /** The pieces the last fit kept for a later pass, or null; cleared. */
    RowPassRequest takeDeferred() {
        RowPassRequest r = deferred;
        deferred = null;
        return r;
    }

    /** False for a bootstrap draw's variant held in parts ({@link DataVariant#drawOf}), read as observed rows are. */
    @Override
    public boolean observed() {
        return variant.drawOf == null;
    }

    @Override
    public boolean momentRoutes() {
        return true;
    }

    private void requireRows(String pass) {
        if (!variant.holdsRows()) {
            throw new RowPassUnavailable(pass);
        }
    }

    private int[] clusterCodes(ErrorType errors) {
        return errors.clusterColumn() != null ? variant.clusters.get(errors.clusterColumn()) : null;
    }

    private static int clusterCountOf(DesignRows rows) {
        int max = -1;
        for (int i = 0; i < rows.n; i++) {
            max = Math.max(max, rows.cluster[i]);
        }
        return max + 1;
    }
}
