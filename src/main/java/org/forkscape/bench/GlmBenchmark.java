package org.forkscape.bench;

import java.io.IOException;
import java.io.PrintStream;
import java.io.UncheckedIOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.SplittableRandom;
import org.forkscape.data.CsvTableReader;
import org.forkscape.data.Table;
import org.forkscape.plan.Plan;
import org.forkscape.plan.PlanReader;
import org.forkscape.run.MultiverseRunner;
import org.forkscape.run.RunProgress;
import org.forkscape.run.RunResult;

/**
 * Logit with HC1 errors on every subset of 10 and 14 controls: the engine, the per-specification IRLS
 * baseline ({@link GlmBaseline}) and R's {@code glm} + {@code sandwich::vcovHC} ({@link RGlmTiming}), in
 * one process run after run. The engine fits every specification; the baseline and R fit the engine's
 * specifications in a seeded random order for a time budget, extrapolated, and are compared with the engine
 * on the specifications they fitted.
 */
final class GlmBenchmark {
    private static final long DATA_SEED = 20261201L;
    private static final long SAMPLE_SEED = 11L;
    private static final String ERRORS = "HC1";
    /**
     * The one-thread case fits every subset of this many controls: a whole plan, so that every warm start
     * the engine looks for is in it, and small enough to take seconds on one thread.
     */
    private static final int PASS_BOUND_CONTROLS = 6;

    private final PrintStream out;
    private final Path folder;
    /** Plans of at most this many specifications are timed as the median of three runs. */
    private static final int SHORT_PLAN = 4096;
    /** Specifications of the engine's warm-up run (a seeded sample of the plan). */
    private static final int WARM_UP = 128;
    private final boolean quick;

    private GlmBenchmark(PrintStream out, Path folder, boolean quick) {
        this.out = out;
        this.folder = folder;
        this.quick = quick;
    }

    /** The cases' figures, one map each, as the benchmark writes them to DIR/CASE.json. */
    static List<Map<String, Object>> run(PrintStream out, Path folder, boolean quick) {
        return new GlmBenchmark(out, folder, quick).cases();
    }

    private List<Map<String, Object>> cases() {
        int rows = quick ? 1_000 : 100_000;
        Path data = folder.resolve("glm-data-" + rows + ".csv");
        Table table;
        try {
            if (!Files.exists(data)) {
                GlmBenchData.write(data, rows, DATA_SEED);
            }
            table = new CsvTableReader().read(data);
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
        out.printf("%n%-20s %7s %16s %15s %7s %13s %7s %13s %10s %11s%n", "logit case", "fitted", "Forkscape spec/s",
                "baseline spec/s", "ratio", "R glm spec/s", "ratio", "R glm.fit", "iterations", "max relerr");
        List<Map<String, Object>> results = new ArrayList<>();
        for (int k : quick ? new int[] {10} : new int[] {10, 14}) {
            results.add(compare(table, data, k));
        }
        results.add(passBound(table, data, PASS_BOUND_CONTROLS, (double) results.get(0).get("baseline_mean_iterations")));
        return results;
    }

    private Map<String, Object> compare(Table table, Path data, int optional) {
        String name = "logit-n" + table.rowCount() + "-k" + optional + "-" + ERRORS;
        Plan plan = new PlanReader(false).read(GlmBenchData.plan(data.getFileName().toString(), optional, ERRORS),
                folder);
        MultiverseRunner runner = new MultiverseRunner();
        // about a second of fitting, as the baseline's warm-up below, so that the loops are compiled
        int warmUp = quick ? 16 : WARM_UP;
        runner.run(plan.withSample(warmUp, 3), table, RunProgress.SILENT, null);
        // a plan that runs in seconds is run three times and the median rate kept; one that runs for minutes once
        int repetitions = (1 << optional) <= SHORT_PLAN ? 3 : 1;
        double[] rates = new double[repetitions];
        RunResult run = null;
        for (int r = 0; r < repetitions; r++) {
            long start = System.nanoTime();
            run = runner.run(plan, table, RunProgress.SILENT, null);
            rates[r] = run.results().size() / ((System.nanoTime() - start) / 1e9);
        }
        double engine = Medians.of(rates);
        long[] masks = shuffled(1 << optional);
        GlmBaseline baseline = new GlmBaseline(table);
        double budget = quick ? 0.3 : 3;
        Agreement baselineAgreement = new Agreement(run);
        long baselineIterations = 0;
        int baselineFits = 0;
        long warm = System.nanoTime();
        for (int w = 0; w < 2 || (System.nanoTime() - warm) / 1e9 < budget / 3; w++) {
            baseline.fit(masks[w % masks.length]);
        }
        long baselineStart = System.nanoTime();
        while (baselineFits < 2 || (System.nanoTime() - baselineStart) / 1e9 < budget) {
            long mask = masks[baselineFits % masks.length];
            GlmBaseline.Fit fit = baseline.fit(mask);
            baselineAgreement.add(mask, fit.estimate(), fit.stdError());
            baselineIterations += fit.iterations();
            baselineFits++;
        }
        double base = baselineFits / ((System.nanoTime() - baselineStart) / 1e9);
        RGlmTiming.Outcome r = RGlmTiming.time(data, masks, quick ? 1 : 20, folder);
        Agreement rAgreement = new Agreement(run);
        if (r.skipped() == null) {
            for (RGlmTiming.Spec s : r.specs()) {
                rAgreement.add(s.mask(), s.estimate(), s.stdError());
            }
        }
        double iterations = (double) baselineIterations / baselineFits;
        out.printf("%-20s %,7d %,16.1f %,15.2f %,7.1f %13s %7s %13s %10.1f %11.1e%n", name, run.results().size(), engine,
                base, engine / base, r.skipped() == null ? String.format("%,.2f", r.glmRate()) : "skipped",
                r.skipped() == null ? String.format("%,.1f", engine / r.glmRate()) : "-",
                r.skipped() == null ? String.format("%,.2f", r.glmFitRate()) : "-", iterations,
                Math.max(baselineAgreement.max, rAgreement.max));
        if (r.skipped() != null) {
            out.println("  R row skipped: " + r.skipped());
        }
        Map<String, Object> json = new LinkedHashMap<>();
        json.put("case", name);
        json.put("rows", table.rowCount());
        json.put("specifications", 1L << optional);
        json.put("engine_specifications_fitted", run.results().size());
        json.put("model", "logit");
        json.put("errors", ERRORS);
        json.put("engine_specs_per_second", engine);
        json.put("engine_measures", "loaded table to filled result table, after a warm-up on a seeded sample of " + warmUp
                + " specifications; " + (repetitions == 1 ? "one run" : "median of " + repetitions + " runs"));
        json.put("engine_runs_specs_per_second", rates);
        json.put("baseline_specs_per_second", base);
        json.put("baseline_note", "per-specification IRLS from mu = (y + 0.5) / 2, Commons Math Householder QR "
                + "for each weighted least-squares step, HC1 sandwich; timed on a seeded random order of the "
                + "engine's specifications for about " + budget + " s and extrapolated");
        json.put("baseline_specifications_timed", baselineFits);
        json.put("ratio_to_baseline", engine / base);
        json.put("baseline_mean_iterations", iterations);
        json.put("max_relative_difference_vs_baseline", baselineAgreement.max);
        if (r.skipped() == null) {
            json.put("r_version", r.version());
            json.put("r_glm_vcovhc_specs_per_second", r.glmRate());
            json.put("r_glm_fit_specs_per_second", r.glmFitRate());
            json.put("r_specifications_timed", r.specs().size());
            json.put("r_mean_iterations", r.meanIterations());
            json.put("ratio_to_r_glm_vcovhc", engine / r.glmRate());
            json.put("ratio_to_r_glm_fit", engine / r.glmFitRate());
            json.put("max_relative_difference_vs_r", rAgreement.max);
        } else {
            json.put("r_skipped", r.skipped());
        }
        return json;
    }

    /**
     * One thread on every specification of a small plan against what its passes over the rows must read: each
     * IRLS iteration is one weighted pass (the linear predictor, the weights and the weighted cross-products
     * of the specification's columns), and the HC1 scores at the estimate one more.
     */
    private Map<String, Object> passBound(Table table, Path data, int optional, double iterations) {
        String name = "logit-n" + table.rowCount() + "-k" + optional + "-" + ERRORS + "-passes";
        Plan plan = new PlanReader(false).read(GlmBenchData.plan(data.getFileName().toString(), optional, ERRORS),
                folder);
        MultiverseRunner runner = new MultiverseRunner(1);
        runner.run(plan, table, RunProgress.SILENT, null);
        long start = System.nanoTime();
        RunResult run = runner.run(plan, table, RunProgress.SILENT, null);
        double rate = run.results().size() / ((System.nanoTime() - start) / 1e9);
        double columns = 0;
        double products = 0;
        for (int i = 0; i < run.results().size(); i++) {
            int p = run.results().nParams(i);
            columns += p;
            products += p * (p + 1) / 2.0 + 2.0 * p;
        }
        int n = table.rowCount();
        columns /= run.results().size();
        products /= run.results().size();
        double passes = iterations + 1;
        // a pass reads the specification's columns and the outcome, eight bytes a value
        double bytes = passes * 8.0 * n * (columns + 1);
        double multiplyAdds = passes * n * products;
        double bandwidth = MemoryBandwidth.readBytesPerSecond();
        double bound = bandwidth / bytes;
        out.printf("%s (one thread, all %d): %,.2f spec/s; a plain IRLS needs %.1f iterations + 1 score pass "
                + "over %,d rows x %.1f columns = %.1f MB read and %.1f M multiply-adds per specification: "
                + "streaming-read bound %,.0f spec/s at %.1f GB/s, the engine at %.1f%% of it; %.3f G multiply-adds/s%n",
                name, run.results().size(), rate, iterations,
                n, columns, bytes / 1e6, multiplyAdds / 1e6, bound, bandwidth / 1e9, 100 * rate / bound,
                rate * multiplyAdds / 1e9);
        Map<String, Object> json = new LinkedHashMap<>();
        json.put("case", name);
        json.put("threads", 1);
        json.put("specifications", run.results().size());
        json.put("specs_per_second", rate);
        json.put("iterations_per_specification", iterations);
        json.put("passes_per_specification", passes);
        json.put("mean_columns", columns);
        json.put("bytes_per_specification", bytes);
        json.put("multiply_adds_per_specification", multiplyAdds);
        json.put("read_bandwidth_bytes_per_second", bandwidth);
        json.put("bound_specs_per_second", bound);
        json.put("share_of_bound", rate / bound);
        json.put("multiply_adds_per_second", rate * multiplyAdds);
        return json;
    }

    /**
     * The control masks of every specification in a seeded random order, for the baseline and R to fit a
     * prefix of (with every specification fitted, the engine's slot of a mask is the mask).
     */
    private static long[] shuffled(int count) {
        long[] masks = new long[count];
        for (int i = 0; i < count; i++) {
            masks[i] = i;
        }
        SplittableRandom random = new SplittableRandom(SAMPLE_SEED);
        for (int i = count - 1; i > 0; i--) {
            int j = random.nextInt(i + 1);
            long t = masks[i];
            masks[i] = masks[j];
            masks[j] = t;
        }
        return masks;
    }

    /** The largest relative difference of key estimates and standard errors from the engine's. */
    private static final class Agreement {
        private final RunResult run;
        private double max;

        Agreement(RunResult run) {
            this.run = run;
        }

        void add(long mask, double estimate, double stdError) {
            int slot = (int) mask;
            max = Math.max(max, Math.abs(run.results().estimate(slot) - estimate)
                    / Math.max(Math.abs(estimate), stdError));
            max = Math.max(max, Math.abs(run.results().stdError(slot) - stdError) / stdError);
        }
    }
}
