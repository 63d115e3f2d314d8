package org.forkscape.bench;

import java.io.IOException;
import java.io.PrintStream;
import java.io.UncheckedIOException;
import java.lang.management.ManagementFactory;
import java.lang.management.MemoryPoolMXBean;
import java.lang.management.MemoryType;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.SplittableRandom;
import org.forkscape.data.CsvTableReader;
import org.forkscape.data.Table;
import org.forkscape.fit.VarianceRoute;
import org.forkscape.plan.Plan;
import org.forkscape.plan.PlanReader;
import org.forkscape.run.Json;
import org.forkscape.run.MultiverseRunner;
import org.forkscape.run.RunProgress;
import org.forkscape.run.RunResult;
import org.forkscape.run.SpecificationsCsv;

/**
 * {@code bench [--quick] [--out DIR]}: times the engine against the per-specification refit,
 * interleaved (A B A B ...) after a warm-up, on generated data of fixed seed, and prints specifications
 * per second, their ratio (min and max over repetitions), peak heap and the machine. Each case also goes
 * to DIR/CASE.json. The engine is timed from the loaded table to the filled result table; writing
 * specifications.csv is timed apart.
 */
public final class BenchmarkCommand {
    private static final long SEED = 20261201L;

    private record Case(int rows, int optional, String errors) {
        String name() {
            return "n" + rows + "-k" + optional + "-" + errors.replace(":cluster", "");
        }
    }

    private final PrintStream out;
    private final Path folder;
    private final boolean quick;
    private final Map<Integer, Table> tables = new LinkedHashMap<>();

    public BenchmarkCommand(PrintStream out, Path folder, boolean quick) {
        this.out = out;
        this.folder = folder;
        this.quick = quick;
    }

    public void execute() {
        try {
            Files.createDirectories(folder);
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
        long start = System.nanoTime();
        out.printf("Forkscape benchmark (%s) on %d cores, Java %s, max heap %,d MiB%n", quick ? "quick" : "full",
                Runtime.getRuntime().availableProcessors(), System.getProperty("java.version"),
                Runtime.getRuntime().maxMemory() >> 20);
        table(100_000);
        Map<String, Object> parquet = ParquetLoadBenchmark.run(out, folder, quick ? 100_000 : 1_000_000, SEED);
        machine(parquet);
        write((String) parquet.get("case"), parquet);
        out.printf("%n%-22s %14s %13s %9s %9s %9s %9s %11s %10s%n", "case", "engine spec/s", "refit spec/s", "ratio",
                "min", "max", "heap MiB", "max relerr", "csv spec/s");
        for (Case c : cases()) {
            engineAgainstRefit(c);
        }
        out.println();
        int k = quick ? 10 : 14;
        rowPassComparison(new Case(100_000, k, "HC1"));
        rowPassComparison(new Case(100_000, k, "cluster:cluster"));
        hc3AgainstBandwidth(new Case(100_000, k, "HC3"));
        nullDraws(new Case(10_000, k, "classical"), quick ? 100 : 1_000);
        for (Map<String, Object> json : GlmBenchmark.run(out, folder, quick)) {
            machine(json);
            write((String) json.get("case"), json);
        }
        for (Map<String, Object> json : PanelBenchmark.run(out, folder, quick)) {
            machine(json);
            write((String) json.get("case"), json);
        }
        for (Map<String, Object> json : ExplorerBenchmark.run(out, folder, table(1_000), "data-1000.csv", quick)) {
            machine(json);
            write((String) json.get("case"), json);
        }
        out.printf("%ntotal %.0f s%n", (System.nanoTime() - start) / 1e9);
    }

    private List<Case> cases() {
        List<Case> cases = new ArrayList<>();
        int[] pools = quick ? new int[] {10} : new int[] {10, 14};
        String[] errors = quick ? new String[] {"classical", "HC1"} : new String[] {"classical", "HC1", "cluster:cluster"};
        for (int n : new int[] {1_000, 100_000}) {
            for (int k : pools) {
                for (String e : errors) {
                    cases.add(new Case(n, k, e));
                }
            }
        }
        return cases;
    }

    private Table table(int rows) {
        return tables.computeIfAbsent(rows, n -> {
            try {
                Path data = folder.resolve("data-" + n + ".csv");
                if (!Files.exists(data)) {
                    BenchData.write(data, n, SEED);
                }
                CsvTableReader reader = new CsvTableReader();
                reader.read(data);
                long start = System.nanoTime();
                Table t = reader.read(data);
                double seconds = (System.nanoTime() - start) / 1e9;
                out.printf("loading %,d rows x %d columns from CSV: %.3f s%n", n, t.columns().size(), seconds);
                Map<String, Object> json = new LinkedHashMap<>();
                json.put("rows", n);
                json.put("columns", t.columns().size());
                json.put("seconds", seconds);
                write("load-n" + n, json);
                return t;
            } catch (IOException e) {
                throw new UncheckedIOException(e);
            }
        });
    }

    private Plan plan(Case c) {
        Path data = folder.resolve("data-" + c.rows() + ".csv");
        return new PlanReader(false).read(BenchData.plan(data.getFileName().toString(), c.optional(), c.errors()),
                folder);
    }

    private void engineAgainstRefit(Case c) {
        Table table = table(c.rows());
        Plan plan = plan(c);
        MultiverseRunner runner = new MultiverseRunner();
        RefitBaseline baseline = new RefitBaseline(table);
        int reps = quick ? 2 : 3;
        double budget = quick ? 0.3 : 1.0;
        resetPeaks();
        long warm = System.nanoTime();
        while ((System.nanoTime() - warm) / 1e9 < (quick ? 0.3 : 1.0)) {
            runner.run(plan, table, RunProgress.SILENT, null);
        }
        List<Double> engineRates = new ArrayList<>();
        List<Double> refitRates = new ArrayList<>();
        RunResult last = null;
        double maxRelative = 0;
        SplittableRandom pick = new SplittableRandom(7);
        String refitErrors = c.errors().startsWith("cluster") ? "cluster" : c.errors();
        for (int r = 0; r < reps; r++) {
            long start = System.nanoTime();
            last = runner.run(plan, table, RunProgress.SILENT, null);
            engineRates.add(last.results().size() / ((System.nanoTime() - start) / 1e9));
            int fitted = 0;
            long refitStart = System.nanoTime();
            while (fitted < 2 || (System.nanoTime() - refitStart) / 1e9 < budget) {
                long mask = pick.nextLong(1L << c.optional());
                double[] ref = baseline.fit(mask, c.optional(), refitErrors);
                int slot = (int) mask;
                maxRelative = Math.max(maxRelative, relative(last.results().estimate(slot), ref[0],
                        last.results().stdError(slot)));
                maxRelative = Math.max(maxRelative, relative(last.results().stdError(slot), ref[1], ref[1]));
                fitted++;
            }
            refitRates.add(fitted / ((System.nanoTime() - refitStart) / 1e9));
        }
        long heap = peakHeap() >> 20;
        Path csv = folder.resolve("specifications-" + c.name() + ".csv");
        int cores = Runtime.getRuntime().availableProcessors();
        SpecificationsCsv.write(last, csv, cores, RunProgress.SILENT);
        double csvRate = csvRate(last, csv, 1);
        double csvRateAllCores = csvRate(last, csv, cores);
        double engine = Medians.of(engineRates);
        double refit = Medians.of(refitRates);
        double[] ratio = ratioRange(engineRates, refitRates);
        out.printf("%-22s %,14.0f %,13.1f %,9.0f %,9.0f %,9.0f %,9d %11.1e %,10.0f %,12.0f%n", c.name(), engine, refit,
                engine / refit, ratio[0], ratio[1], heap, maxRelative, csvRate, csvRateAllCores);
        Map<String, Object> json = new LinkedHashMap<>();
        json.put("case", c.name());
        json.put("rows", c.rows());
        json.put("specifications", last.results().size());
        json.put("errors", c.errors());
        json.put("engine_specs_per_second", engine);
        json.put("engine_measures", "loaded table to filled result table (variants, cross-products, solves)");
        json.put("csv_write_specs_per_second", csvRate);
        json.put("csv_write_specs_per_second_all_cores", csvRateAllCores);
        json.put("csv_write_bytes", csvBytes(csv));
        json.put("refit_specs_per_second", refit);
        json.put("refit_note", "Commons Math OLSMultipleLinearRegression per specification, textbook sandwich; timed "
                + "on a seeded random sample for about " + budget + " s per repetition and extrapolated");
        json.put("ratio", engine / refit);
        json.put("ratio_min", ratio[0]);
        json.put("ratio_max", ratio[1]);
        json.put("peak_heap_mib", heap);
        json.put("bytes_per_specification", last.results().bytesPerSpecification());
        json.put("max_relative_difference_vs_qr_refit", maxRelative);
        json.put("refit_by_qr", last.refitByQr());
        machine(json);
        write(c.name(), json);
    }

    /** Rows of specifications.csv written per second on {@code threads} threads, to disk and synced, as a run writes it. */
    private static double csvRate(RunResult run, Path csv, int threads) {
        long start = System.nanoTime();
        SpecificationsCsv.write(run, csv, threads, RunProgress.SILENT);
        return run.results().size() / ((System.nanoTime() - start) / 1e9);
    }

    private static long csvBytes(Path csv) {
        try {
            return Files.size(csv);
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
    }

    /** The row-free sandwich routes against the one-row-pass route, on the same specifications. */
    private void rowPassComparison(Case c) {
        Table table = table(c.rows());
        Plan plan = plan(c);
        int sample = quick ? 64 : 256;
        Plan sampled = plan.withSample(sample, 3);
        MultiverseRunner fast = new MultiverseRunner();
        MultiverseRunner rows = new MultiverseRunner(Runtime.getRuntime().availableProcessors(), false);
        fast.run(plan, table, RunProgress.SILENT, null);
        rows.run(sampled, table, RunProgress.SILENT, null);
        List<Double> fastRates = new ArrayList<>();
        List<Double> rowRates = new ArrayList<>();
        int reps = quick ? 1 : 2;
        double maxRelative = 0;
        long withoutRows = 0;
        long specifications = 0;
        for (int r = 0; r < reps; r++) {
            long s = System.nanoTime();
            RunResult all = fast.run(plan, table, RunProgress.SILENT, null);
            fastRates.add(all.results().size() / ((System.nanoTime() - s) / 1e9));
            withoutRows = all.routes().getOrDefault(VarianceRoute.FOURTH_MOMENTS, 0L)
                    + all.routes().getOrDefault(VarianceRoute.CLUSTER_CELLS, 0L);
            specifications = all.results().size();
            s = System.nanoTime();
            RunResult part = rows.run(sampled, table, RunProgress.SILENT, null);
            rowRates.add(part.results().size() / ((System.nanoTime() - s) / 1e9));
            for (int i = 0; i < part.results().size(); i++) {
                int slot = (int) part.results().specIndex(i);
                maxRelative = Math.max(maxRelative, relative(all.results().stdError(slot),
                        part.results().stdError(i), part.results().stdError(i)));
            }
        }
        double f = Medians.of(fastRates);
        double rr = Medians.of(rowRates);
        out.printf("%s: row-free route %,.0f spec/s (%,d of %,d specifications served without rows; its guard sent "
                + "the rest to the row pass), one-row-pass route %,.0f spec/s (sample of %d), ratio %,.0f, max relative "
                + "difference %.1e%n", c.name(), f, withoutRows, specifications, rr, sample, f / rr, maxRelative);
        Map<String, Object> json = new LinkedHashMap<>();
        json.put("case", c.name());
        json.put("row_free_specs_per_second", f);
        json.put("specifications_without_rows", withoutRows);
        json.put("specifications", specifications);
        json.put("row_pass_specs_per_second", rr);
        json.put("row_pass_sample", sample);
        json.put("ratio", f / rr);
        json.put("max_relative_difference", maxRelative);
        machine(json);
        write(c.name() + "-routes", json);
    }

    /** HC3 needs the leverages, hence the rows: its pass against the machine's streaming read bound. */
    private void hc3AgainstBandwidth(Case c) {
        Table table = table(c.rows());
        int sample = quick ? 64 : 512;
        Plan plan = plan(c).withSample(sample, 5);
        MultiverseRunner runner = new MultiverseRunner(1);
        runner.run(plan, table, RunProgress.SILENT, null);
        long s = System.nanoTime();
        RunResult run = runner.run(plan, table, RunProgress.SILENT, null);
        double seconds = (System.nanoTime() - s) / 1e9;
        double columns = 0;
        for (int i = 0; i < run.results().size(); i++) {
            columns += run.results().nParams(i) - 1;
        }
        // bytes one pass must read per specification: its columns and the outcome, plus row index and level
        double bytes = (columns / run.results().size() + 1) * 8.0 * c.rows() + 8.0 * c.rows();
        double bandwidth = MemoryBandwidth.readBytesPerSecond();
        double bound = bandwidth / bytes;
        double rate = run.results().size() / seconds;
        out.printf("%s (one thread): %,.0f spec/s; streaming-read bound %,.0f spec/s at %.1f GB/s: %.0f%% of it%n",
                c.name(), rate, bound, bandwidth / 1e9, 100 * rate / bound);
        Map<String, Object> json = new LinkedHashMap<>();
        json.put("case", c.name());
        json.put("threads", 1);
        json.put("sample", sample);
        json.put("specs_per_second", rate);
        json.put("read_bandwidth_bytes_per_second", bandwidth);
        json.put("bound_specs_per_second", bound);
        json.put("share_of_bound", rate / bound);
        machine(json);
        write(c.name() + "-bandwidth", json);
    }

    /** Null draws: every specification re-estimated on each draw from reweighted cross-products. */
    private void nullDraws(Case c, int draws) {
        Table table = table(c.rows());
        Plan plan = plan(c);
        RunResult run = new MultiverseRunner().run(plan, table, RunProgress.SILENT, null);
        org.forkscape.infer.RunVariants variants = org.forkscape.infer.RunVariants.of(run);
        int threads = Runtime.getRuntime().availableProcessors();
        org.forkscape.infer.NullDraws.run(variants, new org.forkscape.infer.NullDrawSettings(Math.min(20, draws),
                org.forkscape.infer.NullMethod.BOOTSTRAP, 1, null, false), threads, RunProgress.SILENT, null);
        long start = System.nanoTime();
        org.forkscape.infer.NullDraws.run(variants, new org.forkscape.infer.NullDrawSettings(draws,
                org.forkscape.infer.NullMethod.BOOTSTRAP, 1, null, false), threads, RunProgress.SILENT, null);
        double seconds = (System.nanoTime() - start) / 1e9;
        out.printf("null draws: %,d draws x %,d specifications x %,d rows (classical): %.1f s, %,.0f refits/s%n", draws,
                run.results().size(), c.rows(), seconds, draws * (double) run.results().size() / seconds);
        Map<String, Object> json = new LinkedHashMap<>();
        json.put("case", "null-draws-" + c.name());
        json.put("draws", draws);
        json.put("specifications", run.results().size());
        json.put("rows", c.rows());
        json.put("seconds", seconds);
        json.put("refits_per_second", draws * (double) run.results().size() / seconds);
        machine(json);
        write("null-draws-" + c.name(), json);
    }

    private static double[] ratioRange(List<Double> a, List<Double> b) {
        double min = Double.MAX_VALUE;
        double max = 0;
        for (int r = 0; r < a.size(); r++) {
            double ratio = a.get(r) / b.get(r);
            min = Math.min(min, ratio);
            max = Math.max(max, ratio);
        }
        return new double[] {min, max};
    }

    private static void machine(Map<String, Object> json) {
        json.put("cores", Runtime.getRuntime().availableProcessors());
        json.put("java", System.getProperty("java.version"));
        json.put("date", java.time.LocalDate.now().toString());
    }

    private void write(String name, Map<String, Object> json) {
        Json.write(folder.resolve(name + ".json"), json);
    }

    /** |a - b| relative to |b|, or to the scale given when b is near zero. */
    private static double relative(double a, double b, double scale) {
        return Math.abs(a - b) / Math.max(Math.abs(b), Math.abs(scale));
    }

    static void resetPeaks() {
        System.gc();
        for (MemoryPoolMXBean pool : ManagementFactory.getMemoryPoolMXBeans()) {
            pool.resetPeakUsage();
        }
    }

    static long peakHeap() {
        long sum = 0;
        for (MemoryPoolMXBean pool : ManagementFactory.getMemoryPoolMXBeans()) {
            if (pool.getType() == MemoryType.HEAP) {
                sum += pool.getPeakUsage().getUsed();
            }
        }
        return sum;
    }
}
