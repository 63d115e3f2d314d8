package org.forkscape.cli;

import java.io.IOException;
import java.io.PrintStream;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.Map;
import java.util.Set;
import org.forkscape.InputException;
import org.forkscape.data.CsvTableReader;
import org.forkscape.data.Table;
import org.forkscape.plan.Plan;
import org.forkscape.plan.PlanException;
import org.forkscape.plan.PlanReader;
import org.forkscape.run.MultiverseRunner;
import org.forkscape.run.RunOutputs;
import org.forkscape.run.RunProgress;
import org.forkscape.run.RunResult;
import org.forkscape.run.RunSummary;

/** {@code run PLAN --out DIR}: fits every specification of a plan and writes the results. */
final class RunCommand {
    static final Set<String> OPTIONS = Set.of("out", "sample", "seed", "threads", "max-specifications");

    private RunCommand() {
    }

    static void execute(String[] args, PrintStream out, PrintStream err) {
        Arguments a = new Arguments(args, 1, OPTIONS);
        if (a.positional().size() != 1) {
            throw new UsageException("usage: run PLAN.json --out DIR [--sample N --seed S] [--threads T] "
                    + "[--max-specifications N]");
        }
        if (!a.has("out")) {
            throw new UsageException("run needs --out DIR, the folder for specifications.csv and summary.json");
        }
        Path planFile = Path.of(a.positional().get(0));
        if (!Files.isRegularFile(planFile)) {
            throw new UsageException("no plan file at " + planFile);
        }
        String planText;
        try {
            planText = Files.readString(planFile, StandardCharsets.UTF_8);
        } catch (IOException e) {
            throw new UsageException("cannot read " + planFile + ": " + e.getMessage());
        }
        String planName = planFile.getFileName().toString();
        Plan plan;
        try {
            plan = new PlanReader(false).read(planText, planFile.toAbsolutePath().getParent());
        } catch (PlanException e) {
            throw located(planName, e);
        }
        plan = options(plan, a);
        Table table = new CsvTableReader().read(plan.dataFile());
        int threads = (int) a.whole("threads", Runtime.getRuntime().availableProcessors(), 1, 1024);
        RunProgress progress = System.console() != null ? new TerminalProgress(err) : RunProgress.SILENT;
        RunResult run;
        try {
            run = new MultiverseRunner(threads).run(plan, table, progress, null);
        } catch (PlanException e) {
            throw located(planName, e);
        } catch (InputException e) {
            throw located(planName, e);
        }
        if (progress instanceof TerminalProgress t) {
            t.finish();
        }
        RunSummary summary = RunSummary.of(run.results(), plan.alpha());
        if (summary.fitted() == 0) {
            throw new InputException(planName, "no specification could be fitted; the first reason: "
                    + run.results().status(0) + " (nothing was written)");
        }
        Path folder = Path.of(a.text("out"));
        RunOutputs.write(run, folder, planText, Map.of());
        out.printf("fitted %,d of %,d specifications in %.2f s; median estimate %s; significant: %.0f%% positive, "
                        + "%.0f%% negative; results in %s%n", summary.fitted(), summary.specifications(), run.seconds(),
                String.format("%.4g", summary.medianEstimate()), 100 * summary.shareSignificantPositive(),
                100 * summary.shareSignificantNegative(), folder);
    }

    private static Plan options(Plan plan, Arguments a) {
        Plan p = plan;
        if (a.has("sample") || a.has("seed")) {
            p = p.withSample(a.whole("sample", p.sampleSize(), 1, Integer.MAX_VALUE), a.whole("seed", p.seed(),
                    Long.MIN_VALUE, Long.MAX_VALUE));
        }
        if (a.has("max-specifications")) {
            p = p.withMaxSpecifications(a.whole("max-specifications", p.maxSpecifications(), 1, Long.MAX_VALUE));
        }
        return p;
    }

    private static InputException located(String planName, InputException e) {
        String where = e.where().isEmpty() ? planName : planName + ", " + e.where();
        return new InputException(where, e.problem());
    }
}
