package org.forkscape.run;

import java.util.ArrayList;
import java.util.EnumMap;
import java.util.List;
import java.util.Map;
import java.util.concurrent.ExecutorService;
import java.util.concurrent.Executors;
import java.util.concurrent.Future;
import java.util.concurrent.atomic.AtomicBoolean;
import java.util.concurrent.atomic.AtomicInteger;
import java.util.concurrent.atomic.AtomicLong;
import java.util.concurrent.atomic.AtomicLongArray;
import org.forkscape.InputException;
import org.forkscape.data.Table;
import org.forkscape.fit.DataVariant;
import org.forkscape.fit.KeyFit;
import org.forkscape.fit.GlmFitsByParts;
import org.forkscape.fit.GlmPending;
import org.forkscape.fit.RefitPending;
import org.forkscape.fit.RefitRequest;
import org.forkscape.fit.RefitsByParts;
import org.forkscape.fit.RowPassRequest;
import org.forkscape.fit.RowPassUnavailable;
import org.forkscape.fit.RowPassesByParts;
import org.forkscape.fit.SpecificationFitter;
import org.forkscape.fit.SpecificationModel;
import org.forkscape.fit.SpecificationModels;
import org.forkscape.fit.VarianceRoute;
import org.forkscape.fit.VariantSource;
import org.forkscape.plan.Plan;
import org.forkscape.plan.PlanChecker;
import org.forkscape.plan.SpecificationSpace;

/**
 * Turns a checked plan and its data into results: counts the specifications (refusing above the cap
 * unless a sample is asked for), groups them by data variant, builds each variant's cross-products once
 * and fits its specifications on the worker threads. Each specification is computed alone from shared
 * read-only state, so the results are identical whatever the number of threads. The command line and
 * the web pages both run plans through this class. It returns, finished or cancelled, only once its
 * worker threads have ended.
 */
public final class MultiverseRunner {
    /** Specifications handed to a worker at a time: large enough to amortise, small enough to balance. */
    private static final int CHUNK = 256;

    private final int threads;
    private final boolean allowRowFree;
    private final VariantSource variants;
    /** Specifications per pass over the rows of a variant held in parts ({@link RowPassesByParts}). */
    private final int rowPassBatch;
    /** QR refits per pass over the rows of a variant held in parts ({@link RefitsByParts}). */
    private final int refitBatch;

    public MultiverseRunner(int threads) {
        this(threads, true);
    }

    /**
     * @param allowRowFree false forces the one-row-pass sandwich (the benchmark's comparison route)
     */
    public MultiverseRunner(int threads, boolean allowRowFree) {
        this(threads, allowRowFree, null, RowPassesByParts.MAX_PER_BATCH, RefitsByParts.MAX_PER_BATCH);
    }

    private MultiverseRunner(int threads, boolean allowRowFree, VariantSource variants, int rowPassBatch,
            int refitBatch) {
        this.threads = Math.max(1, threads);
        this.allowRowFree = allowRowFree;
        this.variants = variants;
        this.rowPassBatch = rowPassBatch;
        this.refitBatch = refitBatch;
    }

    /**
     * The same runner taking its data variants from {@code variants} (null: coded from the table's rows);
     * a specification that then needs a pass over rows the variant does not hold is refused
     * ({@link RowPassUnavailable}) with its number.
     */
    public MultiverseRunner withVariants(VariantSource variants) {
        return new MultiverseRunner(threads, allowRowFree, variants, rowPassBatch, refitBatch);
    }

    /**
     * The same runner making the row passes of variants held in parts for at most {@code specifications} at a
     * time (default {@link RowPassesByParts#MAX_PER_BATCH}); the results do not depend on it.
     */
    public MultiverseRunner withRowPassBatch(int specifications) {
        return new MultiverseRunner(threads, allowRowFree, variants, Math.max(1, specifications), refitBatch);
    }

    /**
     * The same runner reducing the QR refits of variants held in parts at most {@code refits} per pass
     * (default {@link RefitsByParts#MAX_PER_BATCH}); the results do not depend on it.
     */
    public MultiverseRunner withRefitBatch(int refits) {
        return new MultiverseRunner(threads, allowRowFree, variants, rowPassBatch, Math.max(1, refits));
    }

    public MultiverseRunner() {
        this(Runtime.getRuntime().availableProcessors());
    }

    /**
     * Refuses a plan whose specification count exceeds its cap, with the way out in the message, in the
     * batch command's words; a sample counts as the number of specifications it fits.
     */
    public static void checkCount(Plan plan) {
        checkCount(plan, SettingNames.COMMAND_LINE);
    }

    /** The same, with the way out in {@code names}, the door's own words. */
    public static void checkCount(Plan plan, SettingNames names) {
        SpecificationSpace space = new SpecificationSpace(plan);
        if (plan.sampleSize() > 0 && Math.min(plan.sampleSize(), space.size()) > plan.maxSpecifications()) {
            throw new InputException("sample", String.format("a sample of %,d specifications is above the cap of "
                    + "%,d; ask for a smaller sample, or raise the cap with %s", Math.min(plan.sampleSize(),
                    space.size()), plan.maxSpecifications(), names.cap()));
        }
        if (plan.sampleSize() <= 0 && space.size() > plan.maxSpecifications()) {
            throw new InputException("decisions", "the plan has " + String.format("%,d", space.count())
                    + " specifications, above the cap of "
                    + String.format("%,d", plan.maxSpecifications()) + "; fit a seeded random sample instead with "
                    + names.sample() + ", or raise the cap with " + names.cap());
        }
    }

    public RunResult run(Plan plan, Table table, RunProgress progress, AtomicBoolean cancel) {
        long start = System.nanoTime();
        PlanChecker.check(plan, table);
        checkCount(plan);
        SpecificationModels models = new SpecificationModels(plan, table, variants);
        SpecificationSpace space = models.space();
        long[] indices = space.indices(plan.sampleSize(), plan.seed());
        boolean all = plan.sampleSize() <= 0 || plan.sampleSize() >= space.size();
        ResultTable results = new ResultTable(indices.length, all ? null : indices, plan.generalized(), space);

        // bucket the slots by data variant, keeping slot order inside each bucket
        int variants = (int) models.variantCount();
        int[] variantOf = new int[indices.length];
        int[] counts = new int[variants];
        long[] choices = new long[space.decisionCount()];
        for (int slot = 0; slot < indices.length; slot++) {
            space.decode(indices[slot], choices);
            variantOf[slot] = models.variantOrdinal(choices);
            counts[variantOf[slot]]++;
        }
        int[][] slotsByVariant = new int[variants][];
        for (int v = 0; v < variants; v++) {
            slotsByVariant[v] = new int[counts[v]];
            counts[v] = 0;
        }
        for (int slot = 0; slot < indices.length; slot++) {
            int v = variantOf[slot];
            slotsByVariant[v][counts[v]++] = slot;
        }

        AtomicLong done = new AtomicLong();
        AtomicLong refits = new AtomicLong();
        AtomicLongArray routes = new AtomicLongArray(VarianceRoute.values().length);
        ExecutorService pool = Executors.newFixedThreadPool(threads, r -> {
            Thread t = new Thread(r, "forkscape-fit");
            t.setDaemon(true);
            return t;
        });
        try {
            for (int v = 0; v < variants; v++) {
                if (slotsByVariant[v].length == 0) {
                    continue;
                }
                checkCancel(cancel);
                DataVariant variant = models.variant(models.variantKey(v), pool);
                int[] slots = slotsByVariant[v];
                describeWork(variant, slots, indices, space, models, pool);
                AtomicInteger next = new AtomicInteger();
                java.util.Queue<RowPassesByParts.Deferred> deferred = new java.util.concurrent.ConcurrentLinkedQueue<>();
                java.util.Queue<PendingRefit> pendingRefits = new java.util.concurrent.ConcurrentLinkedQueue<>();
                java.util.Queue<Integer> pendingGlms = new java.util.concurrent.ConcurrentLinkedQueue<>();
                List<Future<?>> futures = new ArrayList<>();
                for (int t = 0; t < threads; t++) {
                    futures.add(pool.submit(() -> {
                        SpecificationFitter fitter = new SpecificationFitter(allowRowFree).deferringRowPasses()
                                .deferringRefits();
                        long[] c = new long[space.decisionCount()];
                        // counted per worker and added once per chunk: no shared counter in the per-fit loop
                        long[] routed = new long[VarianceRoute.values().length];
                        int from;
                        while ((from = next.getAndAdd(CHUNK)) < slots.length) {
                            // stopped by the cancel flag, or by the pool when another worker failed
                            if (cancel != null && cancel.get() || Thread.currentThread().isInterrupted()) {
                                return;
                            }
                            int to = Math.min(slots.length, from + CHUNK);
                            int waiting = 0;
                            for (int i = from; i < to; i++) {
                                int slot = slots[i];
                                space.decode(indices[slot], c);
                                KeyFit fit;
                                try {
                                    fit = fitOne(fitter, variant, models.model(c), results, slot);
                                } catch (RefitPending e) {
                                    // fitted again once the variant's pending refits are reduced in batches
                                    pendingRefits.add(new PendingRefit(slot, e.request()));
                                    waiting++;
                                    continue;
                                } catch (GlmPending e) {
                                    // fitted with the variant's other such fits, their passes in rounds
                                    pendingGlms.add(slot);
                                    waiting++;
                                    continue;
                                }
                                RowPassRequest later = fitter.takeDeferred();
                                if (later != null) {
                                    // set once its variance is known (finishRowPasses)
                                    deferred.add(new RowPassesByParts.Deferred(slot, fit,
                                            models.model(c).errors(), later));
                                    waiting++;
                                } else {
                                    results.set(slot, fit);
                                }
                                if (fit.refitByQr()) {
                                    refits.incrementAndGet();
                                }
                                routed[fit.route().ordinal()]++;
                            }
                            for (int r = 0; r < routed.length; r++) {
                                if (routed[r] > 0) {
                                    routes.addAndGet(r, routed[r]);
                                    routed[r] = 0;
                                }
                            }
                            // a specification waiting for its pass over the rows is counted when it is done
                            progress.update(done.addAndGet(to - from - waiting), indices.length);
                        }
                    }));
                }
                for (Future<?> f : futures) {
                    WorkerPools.await(f);
                }
                checkCancel(cancel);
                fitPendingGlms(variant, pendingGlms, models, space, indices, results, routes, cancel,
                        () -> progress.update(done.incrementAndGet(), indices.length));
                fitPendingRefits(variant, pendingRefits, models, space, indices, results, deferred, refits, routes,
                        cancel, () -> progress.update(done.incrementAndGet(), indices.length));
                finishRowPasses(variant, deferred, results, cancel,
                        served -> progress.update(done.addAndGet(served), indices.length));
            }
        } finally {
            WorkerPools.stop(pool);
        }
        Map<VarianceRoute, Long> routeCounts = new EnumMap<>(VarianceRoute.class);
        for (VarianceRoute route : VarianceRoute.values()) {
            if (route != VarianceRoute.NONE && routes.get(route.ordinal()) > 0) {
                routeCounts.put(route, routes.get(route.ordinal()));
            }
        }
        return new RunResult(plan, table, models, results, refits.get(), routeCounts,
                (System.nanoTime() - start) / 1e9);
    }

    /** A specification whose fit waits for its QR refit to be reduced where the rows are held. */
    private record PendingRefit(int slot, RefitRequest request) {
    }

    private static KeyFit fitOne(SpecificationFitter fitter, DataVariant variant, SpecificationModel model,
            ResultTable results, int slot) {
        try {
            return fitter.fit(variant, model);
        } catch (RowPassUnavailable e) {
            throw refused(results, slot, e);
        }
    }

    private static InputException refused(ResultTable results, int slot, RowPassUnavailable e) {
        return new InputException("decisions", "specification " + results.specNumber(slot) + " cannot be "
                + "fitted here: " + e.getMessage() + "; run the plan on one machine, or leave out the choice "
                + "that needs it");
    }

    /**
     * The specifications of a variant held in parts whose precision guard asked for a QR refit: their refits
     * reduced in batches ({@link RefitsByParts}), one pass over the parts each (in slot order, so that the
     * batches do not depend on which worker met which), then those specifications fitted again, in slot
     * order, from the reduced factors (the same bits as one refit per pass, see
     * {@code VariantByParts.refits}). A fit that then asks for another refit waits for the next round.
     */
    private void fitPendingRefits(DataVariant variant, java.util.Collection<PendingRefit> pending,
            SpecificationModels models, SpecificationSpace space, long[] indices, ResultTable results,
            java.util.Collection<RowPassesByParts.Deferred> deferred, AtomicLong refits, AtomicLongArray routes,
            AtomicBoolean cancel, Runnable fitted) {
        List<PendingRefit> round = new ArrayList<>(pending);
        SpecificationFitter fitter = new SpecificationFitter(allowRowFree).deferringRowPasses().deferringRefits();
        long[] c = new long[space.decisionCount()];
        while (!round.isEmpty()) {
            round.sort(java.util.Comparator.comparingInt(PendingRefit::slot));
            RefitsByParts.reduce(variant, round.stream().map(PendingRefit::request).toList(), refitBatch,
                    () -> checkCancel(cancel));
            List<PendingRefit> next = new ArrayList<>();
            for (PendingRefit p : round) {
                space.decode(indices[p.slot()], c);
                SpecificationModel model = models.model(c);
                KeyFit fit;
                try {
                    fit = fitOne(fitter, variant, model, results, p.slot());
                } catch (RefitPending e) {
                    next.add(new PendingRefit(p.slot(), e.request()));
                    continue;
                }
                RowPassRequest later = fitter.takeDeferred();
                if (later != null) {
                    deferred.add(new RowPassesByParts.Deferred(p.slot(), fit, model.errors(), later));
                } else {
                    results.set(p.slot(), fit);
                    fitted.run();
                }
                if (fit.refitByQr()) {
                    refits.incrementAndGet();
                }
                routes.incrementAndGet(fit.route().ordinal());
            }
            if (next.size() == round.size()) {
                // every factor was reduced and kept, so a fit that asks again would ask forever
                throw new IllegalStateException("the QR refits of a variant held in parts were reduced but not found");
            }
            round = next;
        }
    }

    /**
     * The generalized linear specifications of a variant held in parts, fitted together in slot order (so
     * that the batches do not depend on which worker met which) by {@link GlmFitsByParts}, their passes over
     * the parts in rounds; a specification that needs a pass that cannot be made from parts is refused with
     * its number, as {@link #fitOne} refuses one.
     */
    private void fitPendingGlms(DataVariant variant, java.util.Collection<Integer> pending, SpecificationModels models,
            SpecificationSpace space, long[] indices, ResultTable results, AtomicLongArray routes, AtomicBoolean cancel,
            Runnable fitted) {
        if (pending.isEmpty()) {
            return;
        }
        List<Integer> slots = new ArrayList<>(pending);
        java.util.Collections.sort(slots);
        List<SpecificationModel> batch = new ArrayList<>(slots.size());
        for (int slot : slots) {
            long[] c = new long[space.decisionCount()];
            space.decode(indices[slot], c);
            batch.add(models.model(c));
        }
        GlmFitsByParts.Fits fits = GlmFitsByParts.fit(variant, batch, GlmFitsByParts.MAX_PER_BATCH,
                () -> checkCancel(cancel));
        for (int i = 0; i < slots.size(); i++) {
            if (fits.fits()[i] == null) {
                throw refused(results, slots.get(i), fits.unavailable()[i]);
            }
        }
        for (int i = 0; i < slots.size(); i++) {
            results.set(slots.get(i), fits.fits()[i]);
            routes.incrementAndGet(fits.fits()[i].route().ordinal());
            fitted.run();
        }
    }

    /**
     * The variances of the specifications whose rows are held in parts, by batches of passes over the parts
     * in slot order (so that the batches, and the bits, do not depend on which worker solved what).
     */
    private void finishRowPasses(DataVariant variant, java.util.Collection<RowPassesByParts.Deferred> deferred,
            ResultTable results, AtomicBoolean cancel, java.util.function.IntConsumer served) {
        if (deferred.isEmpty()) {
            return;
        }
        List<RowPassesByParts.Deferred> inOrder = new ArrayList<>(deferred);
        inOrder.sort(java.util.Comparator.comparingInt(RowPassesByParts.Deferred::slot));
        KeyFit[] fits = RowPassesByParts.finish(variant, inOrder, rowPassBatch, () -> checkCancel(cancel), served);
        for (int i = 0; i < fits.length; i++) {
            results.set(inOrder.get(i).slot(), fits[i]);
        }
    }

    /** Specifications {@link #describeWork} decodes at most. */
    private static final int WORK_SAMPLE = 512;

    /**
     * Tells the variant what it is about to fit (counts of robust-error least-squares specifications and
     * their mean size, from all of them or a seeded random sample of {@value #WORK_SAMPLE}), so that it
     * builds the row-free sandwich structures only where they pay. An evenly spaced sample would alias with
     * the mixed radix: with the error type the last decision, every eighth specification of 4,096 has the
     * same type.
     */
    static void describeWork(DataVariant variant, int[] slots, long[] indices, SpecificationSpace space,
            SpecificationModels models, ExecutorService pool) {
        boolean every = slots.length <= WORK_SAMPLE;
        int draws = every ? slots.length : WORK_SAMPLE;
        java.util.SplittableRandom random = new java.util.SplittableRandom(WORK_SAMPLE);
        long[] c = new long[space.decisionCount()];
        int seen = 0;
        int hc = 0;
        double columns = 0;
        java.util.Map<String, Long> clusters = new java.util.HashMap<>();
        for (int i = 0; i < draws; i++) {
            space.decode(indices[slots[every ? i : random.nextInt(slots.length)]], c);
            org.forkscape.fit.SpecificationModel m = models.model(c);
            seen++;
            if (!m.family().leastSquares()) {
                // a generalized linear model reads its rows; the row-free sandwich structures are least squares'
                continue;
            }
            columns += m.controlColumns().length + 1;
            switch (m.errors().kind()) {
                case HC0, HC1 -> hc++;
                case CLUSTER -> org.forkscape.fit.ClusterComponents.of(m.errors())
                        .forEach(part -> clusters.merge(part.key(), 1L, Long::sum));
                default -> {
                }
            }
        }
        double scale = (double) slots.length / seen;
        clusters.replaceAll((k, count) -> Math.round(count * scale));
        variant.expect(Math.round(hc * scale), clusters, columns / seen, pool);
    }

    private static void checkCancel(AtomicBoolean cancel) {
        if (cancel != null && cancel.get()) {
            throw new RunCancelledException();
        }
    }
}
