package org.forkscape.infer;

import java.util.ArrayList;
import java.util.List;
import java.util.SplittableRandom;
import java.util.concurrent.ExecutorService;
import java.util.concurrent.Executors;
import java.util.concurrent.Future;
import java.util.concurrent.atomic.AtomicBoolean;
import java.util.concurrent.atomic.AtomicInteger;
import java.util.concurrent.atomic.AtomicLong;
import org.forkscape.InputException;
import org.forkscape.fit.BootstrapByParts;
import org.forkscape.fit.BootstrapDesign;
import org.forkscape.fit.DataVariant;
import org.forkscape.fit.DrawFit;
import org.forkscape.fit.ResampledVariant;
import org.forkscape.run.ResultTable;
import org.forkscape.run.RunCancelledException;
import org.forkscape.run.RunProgress;
import org.forkscape.run.WorkerPools;

/**
 * Null draws for the whole curve (Simonsohn, Simmons &amp; Nelson 2020, "Specification curve analysis",
 * Nature Human Behaviour 4, 1208-1214): every fitted specification re-estimated on data where the
 * effect is absent, the same draw for every specification, and the curve's statistics compared with
 * their distribution over the draws.
 *
 * <p>Bootstrap: for specification s with estimate b_s, the effect-removed outcome is y - b_s x. Because
 * x is one of its own regressors, the least-squares coefficient of y - b_s x in any resample is the
 * resample's coefficient of y minus b_s, with the same residuals and so the same standard error of any
 * type; a draw therefore only needs each specification's fit in the resample, which
 * {@link ResampledVariant} gets from one weighted pass over each data variant's rows and the engine's
 * sub-matrix solves. Permutation: the key predictor's values are shuffled between rows and every
 * specification is refitted as it is.
 *
 * <p>Each draw is computed alone from its own random stream ({@link DrawStreams}) by one thread, in a fixed
 * order, so the numbers are identical whatever the number of threads.
 *
 * <p>Variants whose rows are held in parts (the Spark runner's) are resampled where the rows are, by the
 * Poisson bootstrap ({@link BootstrapByParts}, {@link DrawsByParts}): each unit's count in a draw is a hash of the
 * seed, the unit and the draw rather than a multinomial draw from one stream, so that no part needs the others;
 * the draws' fits then go through the same statistics.
 *
 * <p>Besides the whole run's statistics, each draw is judged on the {@link ScaleCurves}: per comparable
 * group as fitted and on the unit-free t and partial-correlation scales, so that no median, and no band,
 * pools estimates in different units.
 */
public final class NullDraws {
    private NullDraws() {
    }

    /**
     * Runs the draws.
     *
     * @param variants the fitted specifications to re-estimate
     * @param settings how many draws, which method, the seed and the bootstrap's cluster column; the result
     *                 carries a warning when these draws split up clusters the plan's errors use
     * @param threads  worker threads (at least 1)
     * @param progress receives draws done / total
     * @param cancel   checked between draws; may be null
     * @throws InputException when no specification was fitted
     */
    public static NullDrawResult run(RunVariants variants, NullDrawSettings settings, int threads,
            RunProgress progress, AtomicBoolean cancel) {
        long start = System.nanoTime();
        int size = variants.size();
        if (size == 0) {
            throw new InputException("nullDraws", "null draws need at least one fitted specification, and none "
                    + "could be fitted");
        }
        ResultTable results = variants.run().results();
        double alpha = variants.run().plan().alpha();
        double[] observedEstimate = new double[size];
        double[] observedError = new double[size];
        double[] observedDf = new double[size];
        for (int i = 0; i < size; i++) {
            int slot = variants.slot(i);
            observedEstimate[i] = results.estimate(slot);
            observedError[i] = results.stdError(slot);
            observedDf[i] = results.df(slot);
        }
        CurveStatistics observed = CurveStatistics.of(observedEstimate, observedError, observedDf, size, alpha,
                new double[size]);
        ScaleCurves curves = ScaleCurves.of(variants);
        int[] everySpec = new int[size];
        for (int i = 0; i < size; i++) {
            everySpec[i] = i;
        }
        double[] observedP = new double[size];
        double[] observedZ = new double[size];
        CurveStatistics.score(observedEstimate, observedError, observedDf, size, observedP, observedZ);
        ScaleCurves.DrawCurve[] observedCurves = curves.evaluate(observedEstimate, observedError, observedDf,
                observedP, observedZ, everySpec, size, alpha, new ScaleCurves.Workspace(curves, size));

        int draws = settings.draws();
        boolean bootstrap = settings.method() == NullMethod.BOOTSTRAP;
        BootstrapByParts byParts = bootstrap ? variants.run().models().bootstrap(new BootstrapDesign(settings.seed(),
                settings.clusterColumn())) : null;
        if (byParts != null) {
            return byParts(variants, settings, byParts, observed, observedEstimate, curves, observedCurves, threads,
                    progress, cancel, start);
        }
        if (!variants.run().table().holdsRows()) {
            throw new IllegalStateException("null draws over variants without rows are made by their source "
                    + "(VariantSource.bootstrap)");
        }
        SplittableRandom[] streams = DrawStreams.of(settings.seed(), draws);
        ResampleDesign design = ResampleDesign.of(variants.run().table(), settings.clusterColumn());
        int predictors = variants.run().plan().predictor().alternatives().size();
        CurveStatistics[] out = new CurveStatistics[draws];
        ScaleCurves.DrawCurve[][] outCurves = new ScaleCurves.DrawCurve[draws][];
        AtomicInteger next = new AtomicInteger();
        AtomicLong done = new AtomicLong();
        AtomicLong failed = new AtomicLong();
        int workers = Math.max(1, Math.min(threads, draws));
        ExecutorService pool = Executors.newFixedThreadPool(workers, r -> {
            Thread t = new Thread(r, "forkscape-null-draws");
            t.setDaemon(true);
            return t;
        });
        try {
            List<Future<?>> futures = new ArrayList<>();
            for (int w = 0; w < workers; w++) {
                futures.add(pool.submit(() -> {
                    ResampledVariant[] local = new ResampledVariant[variants.variantCount()];
                    double[] estimate = new double[size];
                    double[] error = new double[size];
                    double[] df = new double[size];
                    double[] scratch = new double[size];
                    double[] p = new double[size];
                    double[] z = new double[size];
                    int[] spec = new int[size];
                    ScaleCurves.Workspace curveWork = new ScaleCurves.Workspace(curves, size);
                    int[] weights = new int[design.rows()];
                    int[] unitDraws = new int[design.unitCount()];
                    int[] order = new int[design.rows()];
                    int d;
                    while ((d = next.getAndIncrement()) < draws) {
                        // stopped by the cancel flag, or by the pool when another worker failed
                        if (cancel != null && cancel.get() || Thread.currentThread().isInterrupted()) {
                            return;
                        }
                        if (bootstrap) {
                            design.weights(streams[d], unitDraws, weights);
                        } else {
                            design.order(streams[d], order);
                        }
                        int m = 0;
                        long failures = 0;
                        for (int v = 0; v < variants.variantCount(); v++) {
                            int[] specs = variants.specificationsOf(v);
                            if (specs.length == 0) {
                                continue;
                            }
                            ResampledVariant rv = local[v];
                            if (rv == null) {
                                DataVariant base = variants.variant(v);
                                rv = local[v] = new ResampledVariant(base, predictors);
                            }
                            if (bootstrap) {
                                rv.bootstrap(weights, design.units());
                            } else {
                                rv.permute(order);
                            }
                            for (int i : specs) {
                                DrawFit fit = rv.fit(variants.model(i));
                                if (fit == null || !(fit.stdError() > 0)) {
                                    failures++;
                                    continue;
                                }
                                estimate[m] = bootstrap ? fit.estimate() - observedEstimate[i] : fit.estimate();
                                error[m] = fit.stdError();
                                df[m] = fit.df();
                                spec[m] = i;
                                m++;
                            }
                            rv.finishDraw();
                        }
                        // each specification's p and normal score once, for the whole curve and every other
                        CurveStatistics.score(estimate, error, df, m, p, z);
                        out[d] = CurveStatistics.ofScored(estimate, estimate, p, z, m, alpha, scratch);
                        outCurves[d] = curves.evaluate(estimate, error, df, p, z, spec, m, alpha, curveWork);
                        failed.addAndGet(failures);
                        progress.update(done.incrementAndGet(), draws);
                    }
                }));
            }
            for (Future<?> f : futures) {
                WorkerPools.await(f);
            }
        } finally {
            WorkerPools.stop(pool);
        }
        if (cancel != null && cancel.get()) {
            throw new RunCancelledException();
        }
        String warning = IgnoredClustering.warning(settings, variants.run().plan().errorClusterColumns(),
                variants.run().table(), design);
        return new NullDrawResult(settings, warning, observed, out, curves, observedCurves, outCurves, failed.get(),
                (System.nanoTime() - start) / 1e9);
    }

    /**
     * Poisson bootstrap draws made where the rows are held ({@link DrawsByParts}): each draw's fits become its
     * statistics here, in the order the single-machine loop above takes them.
     */
    private static NullDrawResult byParts(RunVariants variants, NullDrawSettings settings, BootstrapByParts source,
            CurveStatistics observed, double[] observedEstimate, ScaleCurves curves,
            ScaleCurves.DrawCurve[] observedCurves, int threads, RunProgress progress, AtomicBoolean cancel,
            long start) {
        int size = variants.size();
        int draws = settings.draws();
        double alpha = variants.run().plan().alpha();
        CurveStatistics[] out = new CurveStatistics[draws];
        ScaleCurves.DrawCurve[][] outCurves = new ScaleCurves.DrawCurve[draws][];
        double[] estimate = new double[size];
        double[] error = new double[size];
        double[] df = new double[size];
        double[] scratch = new double[size];
        double[] p = new double[size];
        double[] z = new double[size];
        int[] spec = new int[size];
        ScaleCurves.Workspace curveWork = new ScaleCurves.Workspace(curves, size);
        long failed = DrawsByParts.run(variants, source, observedEstimate, draws, threads, progress, cancel,
                (d, drawEstimate, drawError, drawDf, ok) -> {
                    int m = 0;
                    long failures = 0;
                    for (int v = 0; v < variants.variantCount(); v++) {
                        for (int i : variants.specificationsOf(v)) {
                            if (!ok[i]) {
                                failures++;
                                continue;
                            }
                            estimate[m] = drawEstimate[i];
                            error[m] = drawError[i];
                            df[m] = drawDf[i];
                            spec[m] = i;
                            m++;
                        }
                    }
                    CurveStatistics.score(estimate, error, df, m, p, z);
                    out[d] = CurveStatistics.ofScored(estimate, estimate, p, z, m, alpha, scratch);
                    outCurves[d] = curves.evaluate(estimate, error, df, p, z, spec, m, alpha, curveWork);
                    return failures;
                });
        String warning = IgnoredClustering.warning(settings, variants.run().plan().errorClusterColumns(),
                source.keptWhole());
        return new NullDrawResult(settings, warning, observed, out, curves, observedCurves, outCurves, failed,
                (System.nanoTime() - start) / 1e9);
    }
}
