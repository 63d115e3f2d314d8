package org.forkscape.fit;

/**
 * Thrown by a fit of a variant held in parts whose precision guard needs a QR refit not yet reduced, when
 * the runner batches the refits ({@link SpecificationFitter#deferringRefits}): the runner reduces the
 * pending refits of the variant in passes over its parts and fits the specification again.
 */
public final class RefitPending extends RuntimeException {
    private final transient RefitRequest request;

    RefitPending(RefitRequest request) {
        super("a QR refit waits for its pass over the rows", null, false, false);
        this.request = request;
    }

    public RefitRequest request() {
        return request;
    }
}
