package org.forkscape.fit;

import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.TreeMap;

/**
 * The generalized linear fits of a variant whose rows are held in parts ({@link VariantByParts#build}), by
 * batches of specifications. Each fit is the single-machine estimator itself ({@link GeneralizedLinear},
 * {@link Irls}, {@link GlmCovariance}) with its rows {@link GlmRows#fillHeldInParts held in parts}: wherever
 * it would read its rows (the start's level sums, the deviance, information and score at a point, the
 * average marginal effect's sums and the sandwich's meat at the estimate) it asks for one pass
 * ({@link GlmPassRequest}) instead, and every step between passes (the scoring step, step halving, the
 * convergence and separation rules, the covariance and the delta method) is the same code on the driver.
 *
 * <p>The fits of a batch run side by side, each on a thread of its own that waits at each pass; when every
 * fit under way waits, their passes go to the parts together as one round ({@link DataVariant#glmPassReduction},
 * one reduce, on Spark one job with the requests broadcast), each part summing every request over its rows,
 * merged request by request in part order. A fit's passes depend only on its own sums, so the numbers do not
 * depend on the batch or on the threads; the rounds do not either, since a round holds exactly the next pass
 * of every fit under way. Starts follow the single machine's tree ({@link GlmStarts}): the ancestors no fit has
 * kept are fitted first, a generation at a time (nearest the root first), each generation's fits side by side,
 * then the batch's specifications from their parents. A bootstrap draw's variant ({@link DataVariant#drawOf})
 * has no generations: every fit starts from its observed fit, as one machine's draws start.
 */
public final class GlmFitsByParts {
    /** Fits side by side at most: each round sends one pass of each to every part. */
    public static final int MAX_PER_BATCH = 256;

    private GlmFitsByParts() {
    }

    /**
     * The fits, in the order asked, with null where a specification needs a pass over rows that cannot be
     * made from parts (its reason at the same place in {@code unavailable}).
     */
    public record Fits(KeyFit[] fits, RowPassUnavailable[] unavailable) {
    }

    /**
     * Every specification of {@code models} (generalized linear, on {@code variant}), in the order given.
     *
     * @param maxPerBatch    fits side by side at most ({@link #MAX_PER_BATCH} is usual; the numbers do not
     *                       depend on it)
     * @param beforeEachPass run before each round (the caller's cancel check, which may throw to stop)
     */
    public static Fits fit(DataVariant variant, List<SpecificationModel> models, int maxPerBatch,
            Runnable beforeEachPass) {
        KeyFit[] fits = new KeyFit[models.size()];
        RowPassUnavailable[] unavailable = new RowPassUnavailable[models.size()];
        int from = 0;
        while (from < models.size()) {
            int to = from;
            long bytes = 0;
            while (to < models.size() && to - from < maxPerBatch
                    && (to == from || bytes + bytes(variant, models.get(to)) <= RowPassesByParts.BYTES_PER_BATCH)) {
                bytes += bytes(variant, models.get(to));
                to++;
            }
            fitBatch(variant, models.subList(from, to), beforeEachPass, fits, unavailable, from);
            from = to;
        }
        return new Fits(fits, unavailable);
    }

    /**
     * About the bytes of a specification's largest pass request (its level offsets, its coefficients, at the
     * estimate the information's factor and level means; for multi-way clustering the whole-table keys of
     * its intersections' clusters, which every request carries), which bound a batch.
     */
    private static long bytes(DataVariant variant, SpecificationModel model) {
        long p = model.factorOrder().length;
        long levels = variant.levels;
        long keys = 0;
        if (model.errors().multiway()) {
            for (ClusterComponents.Component c : ClusterComponents.of(model.errors())) {
                if (c.columns().size() > 1) {
                    keys += 8L * variant.clusterCounts.get(c.key());
                }
            }
        }
        return 256 + levels * (24 + 8 * p) + 16 * p * p + 16 * p + keys;
    }

    private static void fitBatch(DataVariant variant, List<SpecificationModel> batch, Runnable beforeEachPass,
            KeyFit[] fits, RowPassUnavailable[] unavailable, int offset) {
        ObservedRows view = new ObservedRows().of(variant);
        // the starts no fit has kept, by generation (columns), each with the error type of a model that needs it
        TreeMap<Integer, Map<GlmStarts.Key, SpecificationModel>> generations = new TreeMap<>();
        for (SpecificationModel model : batch) {
            for (GlmStarts.Key key : GeneralizedLinear.missingStarts(model, view)) {
                generations.computeIfAbsent(key.columns().length, g -> new LinkedHashMap<>()).putIfAbsent(key, model);
            }
        }
        for (Map<GlmStarts.Key, SpecificationModel> generation : generations.values()) {
            List<GlmStarts.Key> keys = new ArrayList<>(generation.keySet());
            // a start that cannot be fitted from parts is not kept: the specification that needs it meets the
            // same pass in its own fit, and is refused there
            sideBySide(variant, keys.size(), beforeEachPass, (task, passes) -> {
                GlmStarts.Key key = keys.get(task);
                new GeneralizedLinear().fitStart(key, new ObservedRows().of(variant).passingGlmsTo(passes),
                        generation.get(key).errors());
                return null;
            }, new KeyFit[keys.size()], new RowPassUnavailable[keys.size()]);
        }
        KeyFit[] out = new KeyFit[batch.size()];
        RowPassUnavailable[] refused = new RowPassUnavailable[batch.size()];
        sideBySide(variant, batch.size(), beforeEachPass, (task, passes) -> new GeneralizedLinear()
                .fit(batch.get(task), new ObservedRows().of(variant).passingGlmsTo(passes)), out, refused);
        System.arraycopy(out, 0, fits, offset, out.length);
        System.arraycopy(refused, 0, unavailable, offset, refused.length);
        variant.glmFitsServed.addAndGet(batch.size());
    }

    /** One fit made side by side with the others, its passes through {@code passes}. */
    private interface Task {
        KeyFit run(int task, GlmRows.GlmPasses passes);
    }

    /** Runs {@code count} tasks side by side, each on its own thread, their passes in rounds. */
    private static void sideBySide(DataVariant variant, int count, Runnable beforeEachPass, Task body, KeyFit[] out,
            RowPassUnavailable[] unavailable) {
        Rounds rounds = new Rounds(variant, beforeEachPass, count);
        RuntimeException[] failures = new RuntimeException[count];
        List<Thread> threads = new ArrayList<>(count);
        for (int t = 0; t < count; t++) {
            int task = t;
            Thread thread = new Thread(() -> {
                try {
                    out[task] = body.run(task, request -> rounds.pass(task, request));
                } catch (RowPassUnavailable e) {
                    unavailable[task] = e;
                } catch (RuntimeException e) {
                    failures[task] = e;
                } catch (Exception | Error e) {
                    // a checked exception a library throws undeclared (a task that cannot be serialized, say)
                    failures[task] = new IllegalStateException(e);
                } finally {
                    rounds.done();
                }
            }, "forkscape-glm-parts");
            thread.setDaemon(true);
            threads.add(thread);
        }
        threads.forEach(Thread::start);
        for (Thread thread : threads) {
            try {
                thread.join();
            } catch (InterruptedException e) {
                Thread.currentThread().interrupt();
                rounds.fail(new IllegalStateException("interrupted while fitting from parts", e));
                throw rounds.failure;
            }
        }
        if (rounds.failure != null) {
            throw rounds.failure;
        }
        for (RuntimeException e : failures) {
            if (e != null) {
                throw e;
            }
        }
    }

    /**
     * The rounds of passes of fits side by side: a fit asks for a pass and waits; when every fit under way
     * waits, the last to ask (or to finish) sends every waiting pass, in task order, as one reduction.
     */
    private static final class Rounds {
        private final DataVariant variant;
        private final Runnable beforeEachPass;
        private int running;
        private final TreeMap<Integer, GlmPassRequest> asked = new TreeMap<>();
        private final Map<Integer, double[]> answers = new java.util.HashMap<>();
        private long round;
        private volatile RuntimeException failure;

        Rounds(DataVariant variant, Runnable beforeEachPass, int running) {
            this.variant = variant;
            this.beforeEachPass = beforeEachPass;
            this.running = running;
        }

        synchronized double[] pass(int task, GlmPassRequest request) {
            if (failure != null) {
                throw failure;
            }
            asked.put(task, request);
            long mine = round;
            if (asked.size() == running) {
                send();
            }
            while (round == mine) {
                try {
                    wait();
                } catch (InterruptedException e) {
                    Thread.currentThread().interrupt();
                    fail(new IllegalStateException("interrupted while fitting from parts", e));
                }
            }
            if (failure != null) {
                throw failure;
            }
            return answers.remove(task);
        }

        synchronized void done() {
            running--;
            if (running > 0 && asked.size() == running) {
                send();
            }
        }

        synchronized void fail(RuntimeException e) {
            if (failure == null) {
                failure = e;
            }
            asked.clear();
            round++;
            notifyAll();
        }

        private void send() {
            try {
                beforeEachPass.run();
                GlmPassRequest[] batch = asked.values().toArray(new GlmPassRequest[0]);
                double[][] sums = variant.glmPassReduction.sums(batch);
                int i = 0;
                for (int task : asked.keySet()) {
                    answers.put(task, sums[i++]);
                }
                variant.glmRounds.incrementAndGet();
                variant.glmPasses.addAndGet(batch.length);
                for (GlmPassRequest r : batch) {
                    if (r.stacked()) {
                        variant.glmOrthogonalPasses.incrementAndGet();
                    }
                }
            } catch (RuntimeException e) {
                fail(e);
                return;
            } catch (Exception | Error e) {
                // a checked exception thrown undeclared (Spark's serializer does), or an error: every waiting
                // fit stops, so that none waits for a round that will not come
                fail(new IllegalStateException(e));
                return;
            }
            asked.clear();
            round++;
            notifyAll();
        }
    }
}
