package org.forkscape.fit;

import java.util.Arrays;
import java.util.concurrent.ConcurrentHashMap;
import org.forkscape.plan.ModelFamily;

/**
 * Where each generalized linear fit of a variant starts, fixed by the plan alone so that every result is
 * the same whatever the thread count or chunking: a specification starts from the fit of its parent, the
 * same model on the same rows without its last control column (the new column's coefficient at 0); the
 * specification with no controls starts cold. The tree is walked from the nearest ancestor already fitted;
 * as a parent's result depends only on its own start, a fit computed twice by two threads is the same
 * fit. A null draw starts from the observed fit of its specification.
 *
 * <p>Starts are kept in coordinates that do not depend on the rows' level means: eta = kappa_l + sum_j
 * b_j s_ij over the stored shifted columns s, so one start serves any set of usable rows. Safe for
 * concurrent use.
 */
final class GlmStarts {
    /**
     * A fit's identity: the model, the outcome, the usable rows (the variant's one statistics object per
     * set of usable rows, compared by identity) and the columns in order (key last). The parent of a
     * specification is then itself a specification whenever dropping a control leaves the rows as they are.
     */
    record Key(ModelFamily family, int outcome, Moments rows, int[] columns) {
        @Override
        public boolean equals(Object o) {
            return o instanceof Key k && k.family == family && k.outcome == outcome && k.rows == rows
                    && Arrays.equals(k.columns, columns);
        }

        @Override
        public int hashCode() {
            return ((family.hashCode() * 31 + outcome) * 31 + System.identityHashCode(rows)) * 31
                    + Arrays.hashCode(columns);
        }

        /** The parent: without the last control column; null for a fit with no controls. */
        Key parent() {
            if (columns.length < 2) {
                return null;
            }
            int[] c = Arrays.copyOf(columns, columns.length - 1);
            c[c.length - 1] = columns[columns.length - 1];
            return new Key(family, outcome, rows, c);
        }
    }

    /**
     * Coefficients in level-free coordinates: kappa per variant level (NaN where absent), b per column; and,
     * for a fit on the same rows (the usable rows' statistics object {@code rows}), the level coefficients
     * exactly as fitted ({@code alpha}, per compact level) and the information at the estimate, or null
     * when it is larger than {@link #KEPT_INFORMATION} doubles.
     */
    record Start(double[] kappa, double[] beta, Moments rows, double[] alpha, Irls.Information information) {
    }

    /**
     * The largest information kept with a start, in doubles (32 KiB): a few columns over up to a few hundred
     * levels. Larger ones (many absorbed levels) are summed again by the child, to the same bits.
     */
    static final int KEPT_INFORMATION = 4096;

    /** What a fit that did not converge from a cold start passes on: a cold start again. */
    static final Start COLD = new Start(new double[0], new double[0], null, null, null);

    private final ConcurrentHashMap<Key, Start> fitted = new ConcurrentHashMap<>();

    /** The start a fit of {@code key} passes on, or null when it has not been made. */
    Start get(Key key) {
        return fitted.get(key);
    }

    void put(Key key, Start start) {
        fitted.putIfAbsent(key, start == null ? COLD : start);
    }

    /**
     * The start of {@code fit}'s coefficients in level-free coordinates, given the rows' level offsets, with
     * its exact level coefficients and information for children on the same rows {@code mom}.
     */
    static Start of(Irls fit, GlmRows rows, int[] columns, Moments mom, int variantLevels) {
        double[][] levelOffset = mom.levelMeanOffset;
        int p = rows.p;
        double[] kappa = new double[variantLevels];
        Arrays.fill(kappa, Double.NaN);
        for (int c = 0; c < rows.levels; c++) {
            int l = rows.variantLevel[c];
            double k = fit.alpha[c];
            for (int j = 0; j < p; j++) {
                k -= fit.beta[j] * levelOffset[l][columns[j]];
            }
            kappa[l] = k;
        }
        Irls.Information information = Irls.Information.doubles(p, rows.levels) <= KEPT_INFORMATION
                ? fit.information() : null;
        return new Start(kappa, Arrays.copyOf(fit.beta, p), mom, Arrays.copyOf(fit.alpha, rows.levels), information);
    }

    /**
     * Writes {@code start} into the coefficients of {@code rows} (levels compact, columns {@code columns},
     * whose first {@code start.beta.length - 1} entries and last one are the start's, a new column in
     * between at 0), on the rows {@code mom}: the level coefficients exactly as fitted when the start was
     * fitted on these rows, else from its level-free coordinates. Returns false for {@link #COLD} and when a
     * level present here is absent from the start.
     */
    static boolean apply(Start start, GlmRows rows, int[] columns, Moments mom, double[] alpha, double[] beta) {
        if (start == COLD) {
            return false;
        }
        int p = rows.p;
        int from = start.beta.length;
        for (int j = 0; j < p; j++) {
            beta[j] = j < from - 1 ? start.beta[j] : j == p - 1 ? start.beta[from - 1] : 0;
        }
        if (start.rows == mom) {
            System.arraycopy(start.alpha, 0, alpha, 0, rows.levels);
            return true;
        }
        double[][] levelOffset = mom.levelMeanOffset;
        for (int c = 0; c < rows.levels; c++) {
            int l = rows.variantLevel[c];
            double k = start.kappa[l];
            if (Double.isNaN(k)) {
                return false;
            }
            for (int j = 0; j < p; j++) {
                k += beta[j] * levelOffset[l][columns[j]];
            }
            alpha[c] = k;
        }
        return true;
    }
}
