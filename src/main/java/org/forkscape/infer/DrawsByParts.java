package org.forkscape.infer;

import java.util.ArrayList;
import java.util.List;
import java.util.concurrent.ExecutorService;
import java.util.concurrent.Executors;
import java.util.concurrent.Future;
import java.util.concurrent.atomic.AtomicBoolean;
import java.util.concurrent.atomic.AtomicInteger;
import org.forkscape.fit.BootstrapByParts;
import org.forkscape.fit.DataVariant;
import org.forkscape.fit.KeyFit;
import org.forkscape.fit.RowPassesByParts;
import org.forkscape.fit.SpecificationFitter;
import org.forkscape.fit.SpecificationModels;
import org.forkscape.run.RunCancelledException;
import org.forkscape.run.RunProgress;
import org.forkscape.run.WorkerPools;

/**
 * The bootstrap null draws of a run whose rows are held in parts ({@link BootstrapByParts}, the Spark
 * runner): draws go in batches, each batch one pass over the parts per data variant, which returns the
 * variant in every draw of the batch; the driver then fits each specification of each draw with the
 * engine's estimator (each draw by one worker thread; a generalized linear specification is refit from the
 * observed fit, its passes in rounds over that draw's parts, {@link RowPassesByParts#fitEach}) and hands the
 * draws' fits to the same statistics as
 * {@link NullDraws} on one machine, in the same order (variants in order, their specifications in slot order),
 * so the numbers do not depend on the thread count. A specification whose standard error in a draw would need a
 * pass over the rows (its sandwich from the draw's sums could lose digits, as in a draw of copies of one cluster
 * alone, whose scores cancel) is left out of that draw and counted among the failed fits, where one machine's row
 * pass would give it a standard error; so is a generalized linear fit whose information cannot be factored from
 * the draw's sums (where one machine would factor the weighted design by QR).
 */
final class DrawsByParts {
    private DrawsByParts() {
    }

    /**
     * Fits every draw; {@code scorer} turns each draw's fits into its statistics.
     *
     * @return specification fits that failed in some draw
     */
    static long run(RunVariants variants, BootstrapByParts source, double[] observedEstimate, int draws, int threads,
            RunProgress progress, AtomicBoolean cancel, DrawScorer scorer) {
        SpecificationModels models = variants.run().models();
        int size = variants.size();
        int batch = Integer.MAX_VALUE;
        for (int v = 0; v < variants.variantCount(); v++) {
            if (variants.specificationsOf(v).length > 0) {
                batch = Math.min(batch, source.drawsPerPass(variants.variant(v)));
            }
        }
        int workers = Math.max(1, Math.min(threads, Math.min(batch, draws)));
        ExecutorService pool = Executors.newFixedThreadPool(workers, r -> {
            Thread t = new Thread(r, "forkscape-null-draws");
            t.setDaemon(true);
            return t;
        });
        long failed = 0;
        try {
            for (int from = 0; from < draws; from += batch) {
                int to = Math.min(draws, from + batch);
                int count = to - from;
                double[][] estimate = new double[count][size];
                double[][] error = new double[count][size];
                double[][] df = new double[count][size];
                boolean[][] ok = new boolean[count][size];
                for (int v = 0; v < variants.variantCount(); v++) {
                    int[] specs = variants.specificationsOf(v);
                    if (specs.length == 0) {
                        continue;
                    }
                    if (cancel != null && cancel.get()) {
                        throw new RunCancelledException();
                    }
                    DataVariant[] inDraw = source.draws(models.variantKey(v), variants.variant(v), from, to);
                    List<org.forkscape.fit.SpecificationModel> specModels = new ArrayList<>(specs.length);
                    for (int i : specs) {
                        specModels.add(variants.model(i));
                    }
                    AtomicInteger next = new AtomicInteger();
                    List<Future<?>> futures = new ArrayList<>();
                    for (int w = 0; w < workers; w++) {
                        futures.add(pool.submit(() -> {
                            SpecificationFitter fitter = new SpecificationFitter().deferringRowPasses().deferringRefits();
                            int b;
                            while ((b = next.getAndIncrement()) < count) {
                                // the row passes of HC2, HC3 (and HC0, HC1 beside an absorbed column) by batches
                                // over this draw's parts
                                KeyFit[] fits = RowPassesByParts.fitEach(fitter, inDraw[b], specModels, () -> {
                                    if (cancel != null && cancel.get()) {
                                        throw new RunCancelledException();
                                    }
                                });
                                for (int s = 0; s < specs.length; s++) {
                                    int i = specs[s];
                                    KeyFit fit = fits[s];
                                    if (fit == null) {
                                        // its sandwich from sums could lose digits in this draw (say, copies
                                        // of one cluster alone): left out of the draw, as a failed fit is
                                        continue;
                                    }
                                    if (fit.ok() && fit.stdError() > 0) {
                                        estimate[b][i] = fit.estimate() - observedEstimate[i];
                                        error[b][i] = fit.stdError();
                                        df[b][i] = fit.df();
                                        ok[b][i] = true;
                                    }
                                }
                            }
                        }));
                    }
                    for (Future<?> f : futures) {
                        WorkerPools.await(f);
                    }
                }
                for (int b = 0; b < count; b++) {
                    failed += scorer.score(from + b, estimate[b], error[b], df[b], ok[b]);
                    progress.update(from + b + 1, draws);
                }
            }
        } finally {
            WorkerPools.stop(pool);
        }
        return failed;
    }

    /** Turns one draw's fits, indexed by fitted specification, into the draw's statistics. */
    interface DrawScorer {
        /** @return the specifications not fitted in this draw */
        long score(int draw, double[] estimate, double[] error, double[] df, boolean[] ok);
    }
}
