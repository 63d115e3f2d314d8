package org.forkscape.fit;

import java.util.ArrayList;
import java.util.List;
import org.forkscape.plan.ErrorType;

/**
 * The HC2 and HC3 leverages, and the HC0 and HC1 sandwiches that the fourth moments do not serve (beside an
 * absorbed column, or where their guard declines), of a variant whose rows are held in parts
 * ({@link VariantByParts#build}): the driver solves every specification from the statistics first and keeps
 * each such specification's small pieces ({@link RowPassRequest}); then, for a batch of them, one pass over
 * every part's rows sums each specification's meat over its usable rows ({@link VariantByParts#rowPassSums}),
 * reduced in part order, and {@link KeyCoefficientSandwich#finish} makes each variance as one machine does.
 * A batch is bounded by {@link #MAX_PER_BATCH} specifications and {@link #BYTES_PER_BATCH} of their pieces,
 * so that what is shipped to the parts and what each part returns (one double per specification) stay small.
 */
public final class RowPassesByParts {
    /** Specifications per pass at most: a part's work per pass is this many passes over its rows. */
    public static final int MAX_PER_BATCH = 256;
    /** The pieces shipped per pass at most (a single larger specification goes alone). */
    public static final long BYTES_PER_BATCH = 8L << 20;

    private RowPassesByParts() {
    }

    /** A specification solved on the driver whose variance waits for the pass over its rows. */
    public record Deferred(int slot, KeyFit fit, ErrorType errors, RowPassRequest request) {
    }

    /**
     * Every deferred specification's fit with its variance, in the order given (which the caller keeps
     * fixed, so that the batches and their results are the same every time).
     *
     * @param maxPerBatch   at most this many specifications per pass (at most {@link #MAX_PER_BATCH} is usual;
     *                      the numbers do not depend on it)
     * @param beforeEachPass run before each pass (the caller's cancel check, which may throw to stop)
     * @param afterEachPass  told how many specifications each pass finished (the caller's progress)
     */
    public static KeyFit[] finish(DataVariant variant, List<Deferred> deferred, int maxPerBatch,
            Runnable beforeEachPass, java.util.function.IntConsumer afterEachPass) {
        KeyFit[] out = new KeyFit[deferred.size()];
        int from = 0;
        while (from < deferred.size()) {
            beforeEachPass.run();
            int to = from;
            long bytes = 0;
            while (to < deferred.size() && to - from < maxPerBatch
                    && (to == from || bytes + deferred.get(to).request().bytes() <= BYTES_PER_BATCH)) {
                bytes += deferred.get(to).request().bytes();
                to++;
            }
            List<RowPassRequest> batch = new ArrayList<>(to - from);
            for (int i = from; i < to; i++) {
                batch.add(deferred.get(i).request());
            }
            double[] sums = variant.rowPassReduction.sums(batch.toArray(new RowPassRequest[0]));
            variant.rowPassBatches.incrementAndGet();
            variant.rowPassesServed.addAndGet(to - from);
            for (int i = from, at = 0; i < to; at += deferred.get(i).request().answerLength(), i++) {
                out[i] = finished(deferred.get(i), sums, at);
                if (deferred.get(i).request().clusterColumn != null) {
                    variant.clusterScoresBatched.incrementAndGet();
                }
            }
            afterEachPass.accept(to - from);
            from = to;
        }
        return out;
    }

    /**
     * Every specification of {@code models} fitted on {@code variant} by {@code fitter} (which defers its row
     * passes, and may defer its QR refits: those are then reduced in batches, {@link RefitsByParts}, and
     * their specifications fitted again), the deferred ones finished by batches; the generalized linear ones
     * ({@link GlmPending}) fitted side by side by {@link GlmFitsByParts}, their passes in rounds over the
     * variant's parts; null for a specification that needs a pass over rows that cannot be made
     * ({@link RowPassUnavailable}).
     */
    public static KeyFit[] fitEach(SpecificationFitter fitter, DataVariant variant, List<SpecificationModel> models,
            Runnable beforeEachPass) {
        KeyFit[] out = new KeyFit[models.size()];
        List<Deferred> deferred = new ArrayList<>();
        List<Integer> glms = new ArrayList<>();
        List<Integer> round = new ArrayList<>();
        for (int i = 0; i < out.length; i++) {
            round.add(i);
        }
        boolean first = true;
        while (!round.isEmpty()) {
            List<Integer> waiting = new ArrayList<>();
            List<RefitRequest> refits = new ArrayList<>();
            for (int i : round) {
                try {
                    out[i] = fitter.fit(variant, models.get(i));
                } catch (RowPassUnavailable e) {
                    continue;
                } catch (GlmPending e) {
                    glms.add(i);
                    continue;
                } catch (RefitPending e) {
                    waiting.add(i);
                    refits.add(e.request());
                    continue;
                }
                RowPassRequest later = fitter.takeDeferred();
                if (later != null) {
                    deferred.add(new Deferred(i, out[i], models.get(i).errors(), later));
                }
            }
            RefitsByParts.reduce(variant, refits, RefitsByParts.MAX_PER_BATCH, beforeEachPass);
            if (!first && !waiting.isEmpty() && waiting.size() == round.size()) {
                // every factor was reduced and kept, so a fit that asks again would ask forever
                throw new IllegalStateException("the QR refits of a variant held in parts were reduced but not found");
            }
            round = waiting;
            first = false;
        }
        if (!glms.isEmpty()) {
            List<SpecificationModel> glmModels = new ArrayList<>(glms.size());
            for (int i : glms) {
                glmModels.add(models.get(i));
            }
            KeyFit[] fitted = GlmFitsByParts.fit(variant, glmModels, GlmFitsByParts.MAX_PER_BATCH, beforeEachPass)
                    .fits();
            for (int j = 0; j < fitted.length; j++) {
                out[glms.get(j)] = fitted[j];
            }
        }
        deferred.sort(java.util.Comparator.comparingInt(Deferred::slot));
        KeyFit[] finished = finish(variant, deferred, MAX_PER_BATCH, beforeEachPass, served -> { });
        for (int j = 0; j < finished.length; j++) {
            out[deferred.get(j).slot()] = finished[j];
        }
        return out;
    }

    /** The fit with the variance from its meat summed over every part, as {@link LeastSquares} ends a row pass. */
    private static KeyFit finished(Deferred d, double[] sums, int at) {
        KeyFit fit = d.fit();
        RowPassRequest r = d.request();
        if (r.clusterColumn != null) {
            // the clusters with a usable row on some part, in code order, as the clusters' scores route keeps them
            double[] present = new double[r.clusters];
            int groups = 0;
            for (int g = 0; g < r.clusters; g++) {
                if (sums[at + r.clusters + g] > 0) {
                    present[groups++] = sums[at + g];
                }
            }
            KeyCoefficientSandwich.Variance v = ClusterScoresByParts.ofScores(present, groups, fit.nObs(),
                    fit.nParams());
            if (v.failure() != null) {
                return fit.withError(Double.NaN, Double.NaN, v.failure(), v.failureDetail(), "",
                        VarianceRoute.ROW_PASS);
            }
            return fit.withError(Math.sqrt(v.value()), v.clusters() - 1, FitStatus.OK, "", fit.note(),
                    VarianceRoute.ROW_PASS);
        }
        KeyCoefficientSandwich.Variance v = KeyCoefficientSandwich.finish(sums[at], d.errors(), fit.nObs(),
                fit.nParams());
        if (v.failure() != null) {
            return fit.withError(Double.NaN, Double.NaN, v.failure(), v.failureDetail(), "", VarianceRoute.ROW_PASS);
        }
        return fit.withError(Math.sqrt(v.value()), fit.df(), FitStatus.OK, "", fit.note(), VarianceRoute.ROW_PASS);
    }

}
