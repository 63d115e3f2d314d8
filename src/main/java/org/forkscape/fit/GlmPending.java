package org.forkscape.fit;

/**
 * Thrown by a generalized linear fit of a variant held in parts when the runner batches such fits
 * ({@link SpecificationFitter#deferringRowPasses}): the runner fits the variant's waiting specifications
 * together afterwards, their passes over the parts made in rounds ({@link GlmFitsByParts}).
 */
public final class GlmPending extends RuntimeException {
    GlmPending() {
        super("a generalized linear fit waits for its passes over the rows", null, false, false);
    }
}
