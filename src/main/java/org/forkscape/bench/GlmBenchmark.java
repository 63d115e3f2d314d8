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
 * one process run after run. The baseline and R fit seeded random samples of the specifications and are
 * extrapolated; both are compared with the engine on the specifications they fitted.
 */
final class GlmBenchmark {
    private static final long DATA_SEED = 20261201L;
    private static final long SAMPLE_SEED = 11L;
    private static final String ERRORS = "HC1";

    private final PrintStream out;
    private final Path folder;
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
        int rows = quick ? 5_000 : 100_000;
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
        out.printf("%n%-20s %15s %15s %9s %13s %9s %13s %11s %11s%n", "logit case", "Forkscape spec/s",
                "baseline spec/s", "ratio", "R glm spec/s", "ratio", "R glm.fit", "iterations", "max relerr");
        List<Map<String, Object>> results = new ArrayList<>();
        int largest = quick ? 10 : 14;
        double iterations = Double.NaN;
        for (int k : quick ? new int[] {10} : new int[] {10, 14}) {
            Map<String, Object> json = compare(table, data, k);
            iterations = (double) json.get("baseline_mean_iterations");
            results.add(json);
        }
        results.add(passBound(table, data, largest, iterations));
        return results;
    }

    private Map<String, Object> compare(Table table, Path data, int optional) {
        String name = "logit-n" + table.rowCount() + "-k" + optional + "-" + ERRORS;
        Plan plan = new PlanReader(false).read(GlmBenchData.plan(data.getFileName().toString(), optional, ERRORS),
                folder);
        MultiverseRunner runner = new MultiverseRunner();
        runner.run(plan.withSample(Math.min(256, 1L << optional), 3), table, RunProgress.SILENT, null);
        GlmBaseline baseline = new GlmBaseline(table);
        int reps = quick ? 2 : 3;
        double budget = quick ? 0.3 : 1.5;
        SplittableRandom pick = new SplittableRandom(SAMPLE_SEED);
        List<Double> engineRates = new ArrayList<>();
        List<Double> baselineRates = new ArrayList<>();
        Agreement baselineAgreement = new Agreement();
        RunResult last = null;
        long baselineIterations = 0;
        long baselineColumns = 0;
        int baselineFits = 0;
        for (int r = 0; r < reps; r++) {
            long start = System.nanoTime();
            last = runner.run(plan, table, RunProgress.SILENT, null);
            engineRates.add(last.results().size() / ((System.nanoTime() - start) / 1e9));
            int fitted = 0;
            long baselineStart = System.nanoTime();
            while (fitted < 2 || (System.nanoTime() - baselineStart) / 1e9 < budget) {
                long mask = pick.nextLong(1L << optional);
                GlmBaseline.Fit fit = baseline.fit(mask);
                baselineAgreement.add(last, mask, fit.estimate(), fit.stdError());
                baselineIterations += fit.iterations();
                baselineColumns += Long.bitCount(mask) + 2;
                fitted++;
            }
            baselineRates.add(fitted / ((System.nanoTime() - baselineStart) / 1e9));
            baselineFits += fitted;
        }
        double engine = median(engineRates);
        double base = median(baselineRates);
        RGlmTiming.Outcome r = RGlmTiming.time(data, sampleMasks(optional), quick ? 2 : 20, folder);
        Agreement rAgreement = new Agreement();
        if (r.skipped() == null) {
            for (RGlmTiming.Spec s : r.specs()) {
                rAgreement.add(last, s.mask(), s.estimate(), s.stdError());
            }
        }
        double iterations = (double) baselineIterations / baselineFits;
        out.printf("%-20s %,15.0f %,15.2f %,9.0f %13s %9s %13s %11.1f %11.1e%n", name, engine, base, engine / base,
                r.skipped() == null ? String.format("%,.2f", r.glmRate()) : "skipped",
                r.skipped() == null ? String.format("%,.0f", engine / r.glmRate()) : "-",
                r.skipped() == null ? String.format("%,.2f", r.glmFitRate()) : "-", iterations,
                Math.max(baselineAgreement.max, rAgreement.max));
        if (r.skipped() != null) {
            out.println("  R row skipped: " + r.skipped());
        }
        Map<String, Object> json = new LinkedHashMap<>();
        json.put("case", name);
        json.put("rows", table.rowCount());
        json.put("specifications", last.results().size());
        json.put("model", "logit");
        json.put("errors", ERRORS);
        json.put("engine_specs_per_second", engine);
        json.put("engine_specs_per_second_runs", engineRates);
        json.put("baseline_specs_per_second", base);
        json.put("baseline_note", "per-specification IRLS from mu = (y + 0.5) / 2, Commons Math Householder QR "
                + "for each weighted least-squares step, HC1 sandwich; timed on a seeded random sample for about "
                + budget + " s per repetition and extrapolated");
        json.put("ratio_to_baseline", engine / base);
        json.put("baseline_mean_iterations", iterations);
        json.put("baseline_mean_columns", (double) baselineColumns / baselineFits);
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
     * One thread on a sample of the specifications against what its passes over the rows must read: each
     * IRLS iteration is one weighted pass (the linear predictor, the weights and the weighted cross-products
     * of the specification's columns), and the HC1 scores at the estimate one more.
     */
    private Map<String, Object> passBound(Table table, Path data, int optional, double iterations) {
        String name = "logit-n" + table.rowCount() + "-k" + optional + "-" + ERRORS + "-passes";
        int sample = quick ? 64 : 512;
        Plan plan = new PlanReader(false).read(GlmBenchData.plan(data.getFileName().toString(), optional, ERRORS),
                folder).withSample(sample, 5);
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
        out.printf("%s (one thread, sample of %d): %,.0f spec/s; %.1f IRLS iterations + 1 score pass over %,d rows x "
                + "%.1f columns = %.0f MB read and %.0f M multiply-adds per specification; streaming-read bound "
                + "%,.0f spec/s at %.1f GB/s: %.0f%% of it; %.2f G multiply-adds/s%n", name, sample, rate, iterations,
                n, columns, bytes / 1e6, multiplyAdds / 1e6, bound, bandwidth / 1e9, 100 * rate / bound,
                rate * multiplyAdds / 1e9);
        Map<String, Object> json = new LinkedHashMap<>();
        json.put("case", name);
        json.put("threads", 1);
        json.put("sample", sample);
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

    /** A seeded random order of distinct specifications for R, which fits a prefix of it. */
    private static long[] sampleMasks(int optional) {
        long[] masks = new long[Math.min(1 << optional, 400)];
        SplittableRandom random = new SplittableRandom(SAMPLE_SEED + optional);
        java.util.Set<Long> seen = new java.util.HashSet<>();
        for (int i = 0; i < masks.length; i++) {
            long m;
            do {
                m = random.nextLong(1L << optional);
            } while (!seen.add(m));
            masks[i] = m;
        }
        return masks;
    }

    /** The largest relative difference of key estimates and standard errors from the engine's. */
    private static final class Agreement {
        private double max;

        void add(RunResult run, long mask, double estimate, double stdError) {
            int slot = (int) mask;
            max = Math.max(max, Math.abs(run.results().estimate(slot) - estimate)
                    / Math.max(Math.abs(estimate), stdError));
            max = Math.max(max, Math.abs(run.results().stdError(slot) - stdError) / stdError);
        }
    }

    private static double median(List<Double> v) {
        List<Double> s = new ArrayList<>(v);
        s.sort(null);
        int n = s.size();
        return n % 2 == 1 ? s.get(n / 2) : (s.get(n / 2 - 1) + s.get(n / 2)) / 2;
    }
}
