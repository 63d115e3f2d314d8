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
import org.forkscape.plan.Plan;
import org.forkscape.plan.PlanReader;
import org.forkscape.run.Json;
import org.forkscape.run.MultiverseRunner;
import org.forkscape.run.RunProgress;
import org.forkscape.run.RunResult;
import org.forkscape.run.SpecificationsCsv;

/**
 * {@code bench [--quick] [--out DIR]}: times the engine end to end against the per-specification
 * refit, interleaved (A B A B ...) after a warm-up, on generated data of fixed seed, and prints
 * specifications per second, their ratio (min and max over repetitions), peak heap and the machine.
 */
public final class BenchmarkCommand {
    private record Case(int rows, int optional, String errors) {
        String name() {
            return "n" + rows + "-k" + optional + "-" + errors.replace(':', '_');
        }
    }

    private final PrintStream out;
    private final Path folder;
    private final boolean quick;

    public BenchmarkCommand(PrintStream out, Path folder, boolean quick) {
        this.out = out;
        this.folder = folder;
        this.quick = quick;
    }

    public void execute() {
        try {
            Files.createDirectories(folder);
            out.printf("machine: %d cores, Java %s, max heap %d MiB%n", Runtime.getRuntime().availableProcessors(),
                    System.getProperty("java.version"), Runtime.getRuntime().maxMemory() >> 20);
            out.printf("%-28s %14s %14s %10s %10s %10s %10s %12s%n", "case", "engine spec/s", "refit spec/s",
                    "ratio", "min", "max", "heap MiB", "max rel err");
            List<Case> cases = new ArrayList<>();
            int[] sizes = quick ? new int[] {1_000, 100_000} : new int[] {1_000, 100_000};
            int[] pools = quick ? new int[] {10} : new int[] {10, 14};
            String[] errors = quick ? new String[] {"classical", "HC1"} : new String[] {"classical", "HC1", "cluster:cluster"};
            for (int n : sizes) {
                for (int k : pools) {
                    for (String e : errors) {
                        cases.add(new Case(n, k, e));
                    }
                }
            }
            Map<Integer, Table> tables = new LinkedHashMap<>();
            for (Case c : cases) {
                Table table = tables.computeIfAbsent(c.rows(), this::load);
                measure(c, table);
            }
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
    }

    private Table load(int rows) {
        try {
            Path data = folder.resolve("data-" + rows + ".csv");
            if (!Files.exists(data)) {
                BenchData.write(data, rows, 20261201L);
            }
            CsvTableReader reader = new CsvTableReader();
            reader.read(data);
            long start = System.nanoTime();
            Table t = reader.read(data);
            double seconds = (System.nanoTime() - start) / 1e9;
            out.printf("loading %,d rows x %d columns: %.3f s%n", rows, t.columns().size(), seconds);
            Map<String, Object> json = new LinkedHashMap<>();
            json.put("rows", rows);
            json.put("columns", t.columns().size());
            json.put("seconds", seconds);
            Json.write(folder.resolve("load-n" + rows + ".json"), json);
            return t;
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
    }

    private void measure(Case c, Table table) throws IOException {
        Path data = folder.resolve("data-" + c.rows() + ".csv");
        Plan plan = new PlanReader(false).read(BenchData.plan(data.getFileName().toString(), c.optional(), c.errors()),
                folder);
        MultiverseRunner runner = new MultiverseRunner();
        RefitBaseline baseline = new RefitBaseline(table);
        Path csv = folder.resolve("specifications-" + c.name() + ".csv");
        int reps = quick ? 2 : 3;
        double baselineBudget = quick ? 0.5 : 1.5;
        resetPeaks();
        engine(runner, plan, table, csv);
        List<Double> engineRates = new ArrayList<>();
        List<Double> baselineRates = new ArrayList<>();
        RunResult last = null;
        double maxRelative = 0;
        SplittableRandom pick = new SplittableRandom(7);
        for (int r = 0; r < reps; r++) {
            long start = System.nanoTime();
            last = engine(runner, plan, table, csv);
            engineRates.add(last.results().size() / ((System.nanoTime() - start) / 1e9));
            int fitted = 0;
            long bStart = System.nanoTime();
            while (fitted < 2 || (System.nanoTime() - bStart) / 1e9 < baselineBudget) {
                long mask = pick.nextLong(1L << c.optional());
                double[] ref = baseline.fit(mask, c.optional(), c.errors().startsWith("cluster") ? "cluster"
                        : c.errors());
                int slot = (int) mask;
                maxRelative = Math.max(maxRelative, relative(last.results().estimate(slot), ref[0],
                        last.results().stdError(slot)));
                maxRelative = Math.max(maxRelative, relative(last.results().stdError(slot), ref[1], ref[1]));
                fitted++;
            }
            baselineRates.add(fitted / ((System.nanoTime() - bStart) / 1e9));
        }
        double engineRate = median(engineRates);
        double baselineRate = median(baselineRates);
        double minRatio = Double.MAX_VALUE;
        double maxRatio = 0;
        for (int r = 0; r < reps; r++) {
            double ratio = engineRates.get(r) / baselineRates.get(r);
            minRatio = Math.min(minRatio, ratio);
            maxRatio = Math.max(maxRatio, ratio);
        }
        long heap = peakHeap() >> 20;
        out.printf("%-28s %,14.0f %,14.1f %,10.0f %,10.0f %,10.0f %,10d %12.1e%n", c.name(), engineRate, baselineRate,
                engineRate / baselineRate, minRatio, maxRatio, heap, maxRelative);
        Map<String, Object> json = new LinkedHashMap<>();
        json.put("case", c.name());
        json.put("rows", c.rows());
        json.put("specifications", last.results().size());
        json.put("errors", c.errors());
        json.put("engine_specs_per_second", engineRate);
        json.put("refit_specs_per_second", baselineRate);
        json.put("refit_note", "refit timed on a seeded random sample of specifications for about " + baselineBudget
                + " s per repetition and extrapolated");
        json.put("ratio", engineRate / baselineRate);
        json.put("ratio_min", minRatio);
        json.put("ratio_max", maxRatio);
        json.put("peak_heap_mib", heap);
        json.put("max_relative_difference_vs_qr_refit", maxRelative);
        json.put("refit_by_qr", last.refitByQr());
        json.put("cores", Runtime.getRuntime().availableProcessors());
        json.put("java", System.getProperty("java.version"));
        Json.write(folder.resolve(c.name() + ".json"), json);
    }

    private static RunResult engine(MultiverseRunner runner, Plan plan, Table table, Path csv) {
        RunResult run = runner.run(plan, table, RunProgress.SILENT, null);
        SpecificationsCsv.write(run, csv);
        return run;
    }

    /** |a - b| relative to |b|, or to the scale given when b is near zero. */
    private static double relative(double a, double b, double scale) {
        return Math.abs(a - b) / Math.max(Math.abs(b), Math.abs(scale));
    }

    private static double median(List<Double> v) {
        List<Double> s = new ArrayList<>(v);
        s.sort(null);
        int n = s.size();
        return n % 2 == 1 ? s.get(n / 2) : (s.get(n / 2 - 1) + s.get(n / 2)) / 2;
    }

    private static void resetPeaks() {
        System.gc();
        for (MemoryPoolMXBean pool : ManagementFactory.getMemoryPoolMXBeans()) {
            pool.resetPeakUsage();
        }
    }

    private static long peakHeap() {
        long sum = 0;
        for (MemoryPoolMXBean pool : ManagementFactory.getMemoryPoolMXBeans()) {
            if (pool.getType() == MemoryType.HEAP) {
                sum += pool.getPeakUsage().getUsed();
            }
        }
        return sum;
    }
}
