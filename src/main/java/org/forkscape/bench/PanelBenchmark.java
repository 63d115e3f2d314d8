package org.forkscape.bench;

import java.io.IOException;
import java.io.InputStream;
import java.io.PrintStream;
import java.io.StringReader;
import java.io.UncheckedIOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.StandardCopyOption;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.SplittableRandom;
import java.util.concurrent.TimeUnit;
import org.apache.commons.csv.CSVFormat;
import org.apache.commons.csv.CSVParser;
import org.apache.commons.csv.CSVRecord;
import org.apache.commons.math3.stat.regression.OLSMultipleLinearRegression;
import org.forkscape.data.CategoricalColumn;
import org.forkscape.data.Column;
import org.forkscape.data.NumericColumn;
import org.forkscape.data.Table;
import org.forkscape.fit.DataVariant;
import org.forkscape.fit.SpecificationModels;
import org.forkscape.plan.Plan;
import org.forkscape.plan.PlanReader;
import org.forkscape.run.MultiverseRunner;
import org.forkscape.run.ResultTable;
import org.forkscape.run.RunProgress;
import org.forkscape.run.RunResult;

/**
 * The panel case: units over periods with unit and period effects absorbed, analytic weights, every subset
 * of ten controls, classical, HC1, one-way and two-way clustered errors (4,096 specifications). Timed: the
 * data variant's build (codings, the within transformation of every column by alternating projections,
 * the cross-products), the whole run, and the peak heap; then the same plan on a slice of the panel
 * against R's {@code lm} with the dummies written out and sandwich's errors ({@code time-panel-lm.R}), and
 * on a smaller slice against Commons Math's least squares with the dummies, refitted per specification.
 */
final class PanelBenchmark {
    private static final long SEED = 20261202L;
    private static final String[] ERRORS = {"classical", "HC1", "cluster:unit", "cluster:unit+period"};

    private final PrintStream out;
    private final Path folder;
    private final boolean quick;

    private PanelBenchmark(PrintStream out, Path folder, boolean quick) {
        this.out = out;
        this.folder = folder;
        this.quick = quick;
    }

    static List<Map<String, Object>> run(PrintStream out, Path folder, boolean quick) {
        return new PanelBenchmark(out, folder, quick).cases();
    }

    private List<Map<String, Object>> cases() {
        int units = quick ? 2_000 : 50_000;
        int periods = quick ? 10 : 20;
        long built = System.nanoTime();
        Table panel = PanelBenchData.panel(units, periods, SEED);
        double generate = (System.nanoTime() - built) / 1e9;
        Plan plan = new PanelReader(folder).plan();
        out.printf("%npanel: %,d units x %d periods = %,d rows generated in %.1f s; plan of %,d specifications "
                + "(every subset of %d controls; unit and period effects; weights; %s)%n", units, periods,
                panel.rowCount(), generate, 4L << PanelBenchData.CONTROLS, PanelBenchData.CONTROLS,
                String.join(", ", ERRORS));
        Map<String, Object> json = new LinkedHashMap<>();
        json.put("case", "panel-n" + panel.rowCount());
        json.put("rows", panel.rowCount());
        json.put("units", units);
        json.put("periods", periods);
        json.put("specifications", 4L << PanelBenchData.CONTROLS);

        // the variant alone (codings, cell sums), then its first moments: the within transformation of every
        // column over the usable rows by alternating projections, and the demeaned columns' cross-products
        BenchmarkCommand.resetPeaks();
        long start = System.nanoTime();
        SpecificationModels models = new SpecificationModels(plan, panel);
        DataVariant first = models.variant(models.variantKey(0));
        double variant = (System.nanoTime() - start) / 1e9;
        start = System.nanoTime();
        first.moments(0L);
        double demeaning = (System.nanoTime() - start) / 1e9;
        models = null;
        first = null;
        BenchmarkCommand.resetPeaks();
        MultiverseRunner runner = new MultiverseRunner();
        start = System.nanoTime();
        RunResult run = runner.run(plan, panel, RunProgress.SILENT, null);
        double whole = (System.nanoTime() - start) / 1e9;
        long heap = BenchmarkCommand.peakHeap() >> 20;
        int fitted = fitted(run.results());
        out.printf("  engine: the variant (codings, cell sums) %.2f s, the demeaning of every column (alternating "
                + "projections) with its cross-products %.2f s; the whole run %.1f s, %,.0f spec/s, %,d of %,d fitted, "
                + "peak heap %,d MiB (goal: under 60 s)%n", variant, demeaning, whole, run.results().size() / whole,
                fitted, run.results().size(), heap);
        json.put("variant_seconds", variant);
        json.put("variant_measures", "one data variant built: codings and cell sums");
        json.put("demeaning_seconds", demeaning);
        json.put("demeaning_measures", "the within transformation of every model column over the usable rows by "
                + "alternating projections, and the demeaned columns' cross-products");
        json.put("run_seconds", whole);
        json.put("engine_specs_per_second", run.results().size() / whole);
        json.put("engine_fitted", fitted);
        json.put("peak_heap_mib", heap);
        json.put("goal_seconds", 60);

        int sliceUnits = Math.min(units, 1_000);
        json.putAll(againstR(panel, plan, sliceUnits * periods));
        json.putAll(againstCommonsMath(panel, plan, Math.min(units, quick ? 25 : 100) * periods));
        return List.of(json);
    }

    /** The same plan on the first rows of the panel (whole units), by the engine and by R. */
    private Map<String, Object> againstR(Table panel, Plan plan, int rows) {
        Map<String, Object> json = new LinkedHashMap<>();
        Table slice = slice(panel, rows);
        RunResult engine = timedRun(plan, slice);
        double engineRate = engine.results().size() / seconds;
        Path data = folder.resolve("panel-slice-" + rows + ".csv");
        PanelBenchData.writeSlice(panel, rows, data);
        long[] masks = shuffled(1 << PanelBenchData.CONTROLS);
        RTiming r = RTiming.time(data, masks, quick ? 2 : 30, folder);
        json.put("slice_rows", rows);
        json.put("slice_engine_specs_per_second", engineRate);
        if (r.skipped != null) {
            out.printf("  slice of %,d rows: engine %,.0f spec/s; R skipped: %s%n", rows, engineRate, r.skipped);
            json.put("r_skipped", r.skipped);
            return json;
        }
        double worst = 0;
        for (String[] s : r.rows) {
            int mask = Integer.parseInt(s[0]);
            for (int e = 0; e < ERRORS.length; e++) {
                int slot = slotOf(engine.results(), mask, e);
                worst = Math.max(worst, relative(engine.results().estimate(slot), Double.parseDouble(s[1])));
                worst = Math.max(worst, relative(engine.results().stdError(slot), Double.parseDouble(s[2 + e])));
            }
        }
        double rRate = r.specifications() / r.seconds();
        out.printf("  slice of %,d rows: engine %,.0f spec/s, R lm with dummies + sandwich %,.2f spec/s (%d masks "
                + "timed, %s), ratio %,.0f (goal: 1,000); max relative difference %.1e%n", rows, engineRate, rRate,
                r.rows.size(), r.version, engineRate / rRate, worst);
        json.put("r_version", r.version);
        json.put("r_specs_per_second", rRate);
        json.put("r_masks_timed", r.rows.size());
        json.put("ratio_to_r", engineRate / rRate);
        json.put("max_relative_difference_vs_r", worst);
        return json;
    }

    /** The same plan on a small slice, by the engine and by Commons Math's least squares with the dummies. */
    private Map<String, Object> againstCommonsMath(Table panel, Plan plan, int rows) {
        Table slice = slice(panel, rows);
        RunResult engine = timedRun(plan, slice);
        double engineRate = engine.results().size() / seconds;
        DummyRefit refit = new DummyRefit(slice);
        long[] masks = shuffled(1 << PanelBenchData.CONTROLS);
        double budget = quick ? 0.5 : 5;
        int done = 0;
        double worst = 0;
        refit.fit(masks[0]);
        long start = System.nanoTime();
        while (done < 3 || (System.nanoTime() - start) / 1e9 < budget) {
            long mask = masks[done % masks.length];
            double[] ref = refit.fit(mask);
            int slot = slotOf(engine.results(), (int) mask, 0);
            worst = Math.max(worst, relative(engine.results().estimate(slot), ref[0]));
            worst = Math.max(worst, relative(engine.results().stdError(slot), ref[1]));
            done++;
        }
        double refitRate = done / ((System.nanoTime() - start) / 1e9);
        out.printf("  slice of %,d rows: engine %,.0f spec/s, Commons Math QR with dummies (classical errors) %,.1f "
                + "spec/s, ratio %,.0f; max relative difference %.1e%n", rows, engineRate, refitRate,
                engineRate / refitRate, worst);
        Map<String, Object> json = new LinkedHashMap<>();
        json.put("small_slice_rows", rows);
        json.put("small_slice_engine_specs_per_second", engineRate);
        json.put("commons_math_specs_per_second", refitRate);
        json.put("commons_math_note", "OLSMultipleLinearRegression per specification on the rows scaled by sqrt(w), "
                + "with the intercept and every unit and period dummy but the first written out; classical errors");
        json.put("ratio_to_commons_math", engineRate / refitRate);
        json.put("max_relative_difference_vs_commons_math", worst);
        return json;
    }

    private double seconds;

    private RunResult timedRun(Plan plan, Table table) {
        MultiverseRunner runner = new MultiverseRunner();
        runner.run(plan, table, RunProgress.SILENT, null);
        long start = System.nanoTime();
        RunResult run = runner.run(plan, table, RunProgress.SILENT, null);
        seconds = (System.nanoTime() - start) / 1e9;
        return run;
    }

    /**
     * The slot of (control mask, error type): the errors are the plan's last decision, its fastest digit, so
     * the specification index is mask x 4 + error; a run of every specification keeps them in index order.
     */
    private static int slotOf(ResultTable t, int mask, int error) {
        long index = (long) mask * ERRORS.length + error;
        if (index < t.size() && t.specIndex((int) index) == index) {
            return (int) index;
        }
        for (int slot = 0; slot < t.size(); slot++) {
            if (t.specIndex(slot) == index) {
                return slot;
            }
        }
        throw new IllegalStateException("no specification " + index);
    }

    private static int fitted(ResultTable t) {
        int n = 0;
        for (int slot = 0; slot < t.size(); slot++) {
            if (t.fitted(slot)) {
                n++;
            }
        }
        return n;
    }

    private static double relative(double a, double b) {
        return Math.abs(a - b) / Math.abs(b);
    }

    private static long[] shuffled(int count) {
        long[] masks = new long[count];
        for (int i = 0; i < count; i++) {
            masks[i] = i;
        }
        SplittableRandom r = new SplittableRandom(5);
        for (int i = count - 1; i > 0; i--) {
            int j = r.nextInt(i + 1);
            long t = masks[i];
            masks[i] = masks[j];
            masks[j] = t;
        }
        return masks;
    }

    /** The first {@code rows} rows, every column cut alike (categorical columns keep their level lists). */
    private static Table slice(Table panel, int rows) {
        List<Column> columns = new ArrayList<>();
        for (Column c : panel.columns()) {
            if (c instanceof NumericColumn n) {
                columns.add(new NumericColumn(n.name(), Arrays.copyOf(n.values(), rows)));
            } else {
                CategoricalColumn k = (CategoricalColumn) c;
                columns.add(new CategoricalColumn(k.name(), Arrays.copyOf(k.codes(), rows), k.levels()));
            }
        }
        return new Table("panel-slice", columns);
    }

    /** The plan, read as a user's plan is. */
    private record PanelReader(Path folder) {
        Plan plan() {
            return new PlanReader(false).read(PanelBenchData.plan("panel.csv"), folder);
        }
    }

    /**
     * The usual way with dummies: for each specification, its weighted design (rows scaled by sqrt(w)) with
     * an intercept and every unit and period dummy but the first, fitted by Commons Math's Householder QR.
     */
    private static final class DummyRefit {
        private final double[] y;
        private final double[] x;
        private final double[][] controls;
        private final double[] root;
        private final int[] unit;
        private final int[] period;
        private final int units;
        private final int periods;

        DummyRefit(Table slice) {
            y = ((NumericColumn) slice.column("y")).values();
            x = ((NumericColumn) slice.column("x")).values();
            controls = new double[PanelBenchData.CONTROLS][];
            for (int j = 0; j < controls.length; j++) {
                controls[j] = ((NumericColumn) slice.column("c" + (j + 1))).values();
            }
            double[] w = ((NumericColumn) slice.column("w")).values();
            root = new double[w.length];
            for (int i = 0; i < w.length; i++) {
                root[i] = Math.sqrt(w[i]);
            }
            unit = ((CategoricalColumn) slice.column("unit")).codes();
            period = ((CategoricalColumn) slice.column("period")).codes();
            units = Arrays.stream(unit).max().orElse(0) + 1;
            periods = Arrays.stream(period).max().orElse(0) + 1;
        }

        /** Key estimate and classical standard error of the specification with optional controls {@code mask}. */
        double[] fit(long mask) {
            int n = y.length;
            List<double[]> cols = new ArrayList<>();
            for (int j = 0; j < controls.length; j++) {
                if ((mask >>> j & 1) != 0) {
                    cols.add(controls[j]);
                }
            }
            int p = 1 + cols.size() + 1 + (units - 1) + (periods - 1);
            double[][] design = new double[n][p];
            double[] wy = new double[n];
            int key = cols.size() + 1;
            for (int i = 0; i < n; i++) {
                double s = root[i];
                wy[i] = s * y[i];
                design[i][0] = s;
                for (int j = 0; j < cols.size(); j++) {
                    design[i][1 + j] = s * cols.get(j)[i];
                }
                design[i][key] = s * x[i];
                if (unit[i] > 0) {
                    design[i][key + unit[i]] = s;
                }
                if (period[i] > 0) {
                    design[i][key + units - 1 + period[i]] = s;
                }
            }
            OLSMultipleLinearRegression ols = new OLSMultipleLinearRegression();
            ols.setNoIntercept(true);
            ols.newSampleData(wy, design);
            return new double[] {ols.estimateRegressionParameters()[key],
                ols.estimateRegressionParametersStandardErrors()[key]};
        }
    }

    /** R's run of {@code time-panel-lm.R}: its rows as text, or why it was skipped. */
    private record RTiming(String version, List<String[]> rows, String skipped) {
        /** Specifications R fitted: four error types per mask. */
        int specifications() {
            return 4 * rows.size();
        }

        /** R's seconds for those: each specification's lm and its own error type. */
        double seconds() {
            double s = 0;
            for (String[] r : rows) {
                s += 4 * Double.parseDouble(r[6]) + Double.parseDouble(r[7]) + Double.parseDouble(r[8])
                        + Double.parseDouble(r[9]) + Double.parseDouble(r[10]);
            }
            return s;
        }

        static RTiming time(Path data, long[] masks, double budget, Path work) {
            try {
                Path script = work.resolve("time-panel-lm.R");
                try (InputStream in = PanelBenchmark.class.getResourceAsStream("time-panel-lm.R")) {
                    Files.copy(in, script, StandardCopyOption.REPLACE_EXISTING);
                }
                Path maskFile = work.resolve("r-panel-masks.txt");
                StringBuilder lines = new StringBuilder();
                for (long m : masks) {
                    lines.append(m).append('\n');
                }
                Files.writeString(maskFile, lines, StandardCharsets.UTF_8);
                Path result = work.resolve("r-panel.csv");
                Files.deleteIfExists(result);
                Path errors = work.resolve("r-panel-stderr.txt");
                Process process;
                try {
                    process = new ProcessBuilder("Rscript", script.toString(), data.toString(), maskFile.toString(),
                            String.format(Locale.ROOT, "%.1f", budget), result.toString())
                            .redirectOutput(ProcessBuilder.Redirect.DISCARD).redirectError(errors.toFile()).start();
                } catch (IOException e) {
                    return new RTiming(null, null, "Rscript is not on the PATH");
                }
                long limit = (long) (3 * budget) + 600;
                if (!process.waitFor(limit, TimeUnit.SECONDS)) {
                    process.destroyForcibly();
                    return new RTiming(null, null, "Rscript did not finish within " + limit + " s");
                }
                if (process.exitValue() == 3) {
                    return new RTiming(null, null, "the R package sandwich is not installed (Debian: r-cran-sandwich)");
                }
                if (process.exitValue() != 0) {
                    List<String> said = Files.readAllLines(errors, StandardCharsets.UTF_8);
                    return new RTiming(null, null, "Rscript exited with status " + process.exitValue()
                            + (said.isEmpty() ? "" : ": " + said.get(said.size() - 1)));
                }
                List<String> text = Files.readAllLines(result, StandardCharsets.UTF_8);
                List<String[]> rows = new ArrayList<>();
                try (CSVParser parser = CSVFormat.DEFAULT.builder().setHeader().setSkipHeaderRecord(true).get()
                        .parse(new StringReader(String.join("\n", text.subList(1, text.size()))))) {
                    for (CSVRecord r : parser) {
                        rows.add(r.values());
                    }
                }
                return new RTiming(text.get(0).substring(2), rows, null);
            } catch (IOException e) {
                throw new UncheckedIOException(e);
            } catch (InterruptedException e) {
                Thread.currentThread().interrupt();
                return new RTiming(null, null, "interrupted while R was running");
            }
        }
    }
}
