package org.forkscape.fit;

import java.util.concurrent.ExecutorService;

/**
 * Where a run's data variants come from. By default each is coded from the rows of the table in memory
 * ({@link VariantBuilder}); a runner that holds the rows elsewhere (on a cluster) sums their statistics
 * there and hands back variants without rows ({@link VariantByParts}). The solvers read either alike.
 */
public interface VariantSource {
    /**
     * The variant {@code key}; plan errors that only the data reveal are thrown as
     * {@link org.forkscape.plan.PlanException}.
     *
     * @param pool where to sum row blocks (the result does not depend on it), or null
     */
    DataVariant variant(VariantKey key, ExecutorService pool);

    /**
     * Bootstrap draws made where the rows are held ({@link BootstrapByParts}), or null when the variants hold
     * their rows and the draws resample them in memory ({@link ResampledVariant}), as by default.
     */
    default BootstrapByParts bootstrap(BootstrapDesign design) {
        return null;
    }
}
