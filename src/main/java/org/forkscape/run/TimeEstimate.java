package org.forkscape.run;

import java.util.concurrent.ExecutorService;
import java.util.concurrent.Executors;
import org.forkscape.data.Table;
import org.forkscape.fit.DataVariant;
import org.forkscape.fit.SpecificationFitter;
import org.forkscape.fit.SpecificationModels;
import org.forkscape.plan.Plan;
import org.forkscape.plan.PlanChecker;
import org.forkscape.plan.SpecificationSpace;

/**
 * How long a run will take on this machine, measured before it starts rather than guessed: up to
 * {@value #MEASURED_VARIANTS} of the run's data variants, evenly spread over them, are built (their
 * cross-products, with the run's threads) and {@value #TIMED} specifications in all, evenly spread over
 * those variants, are fitted on one thread, and the run is extrapolated from those times: every variant
 * taken to cost what the measured ones did on average, every specification what the measured ones did,
 * shared among the threads. A null draw redoes both
 * on resampled data: each draw is taken to cost one variant build per variant and one fit per
 * specification, which is about what a generalized linear model's draws cost (each draw refits every
 * specification, warm-started) and more than least squares' draws, whose refits reuse the variant's
 * statistics. A rough guide, then, not a promise: the first specifications of a generalized linear model
 * also fit their parents (see the warm starts), the rest of the machine's work changes the pace, and the
 * inference stage and the writing of files are not counted.
 *
 * @param seconds         the whole estimate: fitting and null draws
 * @param fittingSeconds  of which fitting every specification
 * @param nullDrawSeconds of which the null draws
 * @param specifications  the specifications the run will fit
 * @param variants        the data variants they fall into
 * @param built           the variants built to measure
 * @param timed           the specifications fitted to measure
 */
public record TimeEstimate(double seconds, double fittingSeconds, double nullDrawSeconds, long specifications,
        int variants, int built, int timed) {
    static final int TIMED = 32;
    /** Data variants built to measure. */
    static final int MEASURED_VARIANTS = 4;

    /**
     * Measures and extrapolates. Builds one data variant and fits up to {@value #TIMED} specifications, so it
     * takes about as long as that (a fraction of a second on data of 100,000 rows).
     *
     * @param threads the run's fitting threads
     */
    public static TimeEstimate of(Plan plan, Table table, int threads) {
        PlanChecker.check(plan, table);
        MultiverseRunner.checkCount(plan);
        SpecificationModels models = new SpecificationModels(plan, table);
        SpecificationSpace space = models.space();
        long[] indices = space.indices(plan.sampleSize(), plan.seed());
        int variantCount = (int) models.variantCount();
        int[] counts = new int[variantCount];
        long[] choices = new long[space.decisionCount()];
        for (long index : indices) {
            space.decode(index, choices);
            counts[models.variantOrdinal(choices)]++;
        }
        int used = 0;
        for (int v = 0; v < variantCount; v++) {
            if (counts[v] > 0) {
                used++;
            }
        }
        // evenly spread over the variants the run will build
        int[] present = new int[used];
        for (int v = 0, k = 0; v < variantCount; v++) {
            if (counts[v] > 0) {
                present[k++] = v;
            }
        }
        int m = Math.min(MEASURED_VARIANTS, used);
        int[] measured = new int[m];
        for (int j = 0; j < m; j++) {
            measured[j] = present[(int) ((long) j * used / m)];
        }
        ExecutorService pool = Executors.newFixedThreadPool(threads, r -> {
            Thread t = new Thread(r, "forkscape-estimate");
            t.setDaemon(true);
            return t;
        });
        double building = 0;
        double fitting = 0;
        int timed = 0;
        try {
            for (int j = 0; j < m; j++) {
                int v = measured[j];
                int[] slots = new int[counts[v]];
                int k = 0;
                for (int slot = 0; slot < indices.length; slot++) {
                    space.decode(indices[slot], choices);
                    if (models.variantOrdinal(choices) == v) {
                        slots[k++] = slot;
                    }
                }
                long start = System.nanoTime();
                DataVariant variant = models.variant(models.variantKey(v), pool);
                MultiverseRunner.describeWork(variant, slots, indices, space, models, pool);
                building += (System.nanoTime() - start) / 1e9;
                SpecificationFitter fitter = new SpecificationFitter(true);
                int here = Math.min(TIMED / m, slots.length);
                long fitStart = System.nanoTime();
                for (int i = 0; i < here; i++) {
                    space.decode(indices[slots[(int) ((long) i * slots.length / here)]], choices);
                    fitter.fit(variant, models.model(choices));
                }
                fitting += (System.nanoTime() - fitStart) / 1e9;
                timed += here;
            }
        } finally {
            WorkerPools.stop(pool);
        }
        double build = building / m;
        double perFit = fitting / Math.max(1, timed);
        double onePass = used * build + indices.length * perFit / threads;
        double draws = (double) plan.nullDraws() * onePass;
        return new TimeEstimate(onePass + draws, onePass, draws, indices.length, used, m, timed);
    }

    /** "about 2 min 10 s", "about 40 s", "under a second": the estimate in words, to two significant figures. */
    public static String words(double seconds) {
        if (seconds < 1) {
            return "under a second";
        }
        long s = Math.round(seconds < 60 ? seconds : seconds < 600 ? Math.round(seconds / 10) * 10.0
                : Math.round(seconds / 60) * 60.0);
        long hours = s / 3600;
        long minutes = s % 3600 / 60;
        long rest = s % 60;
        StringBuilder b = new StringBuilder("about ");
        if (hours > 0) {
            b.append(hours).append(" h");
            if (minutes > 0) {
                b.append(' ').append(minutes).append(" min");
            }
        } else if (minutes > 0) {
            b.append(minutes).append(" min");
            if (rest > 0) {
                b.append(' ').append(rest).append(" s");
            }
        } else {
            b.append(rest).append(" s");
        }
        return b.toString();
    }

    /** One line for a person: the estimate, its parts and what it rests on. */
    public String text(int threads) {
        String parts = nullDrawSeconds > 0 ? " (fitting " + words(fittingSeconds) + ", null draws "
                + words(nullDrawSeconds) + ")" : "";
        return words(seconds) + " on " + threads + " thread" + (threads == 1 ? "" : "s") + parts + ", from "
                + timed + " of the " + String.format("%,d", specifications) + " specifications fitted on this "
                + "machine and " + built + " of the " + variants + " data variant" + (variants == 1 ? "" : "s")
                + " built; a rough guide that leaves out the inference stage and the writing of files";
    }
}
