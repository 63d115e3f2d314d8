package org.forkscape.fit;

import java.util.ArrayList;
import java.util.LinkedHashSet;
import java.util.List;

/**
 * The QR refits of a variant held in parts, reduced in batches ahead of the fits that wait for them
 * ({@link RefitPending}): each pass over the parts reduces up to {@link #MAX_PER_BATCH} refits' rows to their
 * triangular factors (the tall-skinny QR of {@code VariantByParts}, merged refit by refit in part order, so
 * each factor has the same bits as when reduced alone), kept in the variant for the fits made again.
 */
public final class RefitsByParts {
    /** Refits per pass: each factor is at most (columns + 1)^2 numbers. */
    public static final int MAX_PER_BATCH = 64;

    private RefitsByParts() {
    }

    /**
     * Reduces the distinct {@code requests}, in their order, in passes of at most {@code maxPerBatch}.
     *
     * @param beforeEachPass run before each pass (the caller's cancel check, which may throw to stop)
     */
    public static void reduce(DataVariant variant, List<RefitRequest> requests, int maxPerBatch,
            Runnable beforeEachPass) {
        List<RefitRequest> distinct = new ArrayList<>(new LinkedHashSet<>(requests));
        for (int from = 0; from < distinct.size(); from += maxPerBatch) {
            beforeEachPass.run();
            List<RefitRequest> batch = distinct.subList(from, Math.min(distinct.size(), from + maxPerBatch));
            double[][][] factors = variant.refitReduction.factors(batch);
            variant.refitBatches.incrementAndGet();
            for (int i = 0; i < batch.size(); i++) {
                variant.refitFactors.put(batch.get(i), factors[i]);
            }
        }
    }
}
