package org.forkscape.cli;

import java.io.PrintStream;
import java.nio.file.InvalidPathException;
import java.nio.file.Path;
import java.util.Set;
import org.forkscape.InputException;
import org.forkscape.data.Table;
import org.forkscape.fit.VariantSource;
import org.forkscape.infer.InferenceSections;
import org.forkscape.infer.NullDrawResult;
import org.forkscape.infer.NullDrawSettings;
import org.forkscape.plan.Plan;
import org.forkscape.plan.PlanException;
import org.forkscape.plan.PlanReader;
import org.forkscape.run.CompletedRun;
import org.forkscape.run.MemoryEstimate;
import org.forkscape.run.PlanLock;
import org.forkscape.run.RunOrigin;
import org.forkscape.run.RunData;
import org.forkscape.run.RunPipeline;
import org.forkscape.run.RunSummary;
import org.forkscape.text.HumanNumbers;
import org.springframework.util.unit.DataSize;

/**
 * {@code run PLAN --out DIR}: fits every specification of a plan, adds the joint inference (null draws
 * when asked for), and writes the results, through the {@link RunPipeline} the web's run queue calls too;
 * this class reads the arguments, locates problems in the plan file, and prints. The output folder is
 * checked before any work and replaced as a whole ({@link ResultFolder}): a run that is refused, fails,
 * fits nothing or is stopped leaves it as it was, so it holds either a whole result or what it held
 * before.
 */
final class RunCommand {
    static final Set<String> OPTIONS = Set.of("out", "sample", "seed", "threads", "max-specifications", "null-draws",
            "null-method", "null-cluster", "max-null-draws", "max-memory");
    static final String USAGE = "usage: run PLAN.json --out DIR [--sample N --seed S] [--threads T] "
            + "[--max-specifications N] [--max-memory SIZE] [--null-draws R [--null-method bootstrap|permute] "
            + "[--null-cluster COLUMN|rows] [--max-null-draws N]]";

    /** The system property of the test hook {@link #pauseBeforeTheSwap}. */
    static final String PAUSE_BEFORE_SWAP = "forkscape.test.pauseBeforeSwap";

    private RunCommand() {
    }

    static void execute(String[] args, PrintStream out, PrintStream err) {
        execute(args, out, err, RunData.IN_MEMORY);
    }

    /** The same command over {@code data}: where the table is read and the variants built. */
    static void execute(String[] args, PrintStream out, PrintStream err, RunData data) {
        Arguments a = new Arguments(args, 1, OPTIONS);
        if (a.positional().size() != 1) {
            throw new UsageException((a.positional().isEmpty() ? "run needs a plan file" : "run takes one plan file, "
                    + "found " + a.positional().size() + " (" + String.join(", ", a.positional()) + ")")
                    + "; " + USAGE);
        }
        if (!a.has("out")) {
            throw new UsageException("run needs --out DIR, the folder for specifications.csv and summary.json");
        }
        Path folder = path(a.text("out"), "--out");
        ResultFolder.check(folder);
        Path planFile = path(a.positional().get(0), "the plan file");
        byte[] planBytes = PlanReader.readBytes(planFile);
        String planText = PlanReader.text(planBytes, planFile);
        String planName = planFile.getFileName() == null ? planFile.toString() : planFile.getFileName().toString();
        Plan plan;
        try {
            plan = new PlanReader(false).read(planText, planFile.toAbsolutePath().getParent());
        } catch (PlanException e) {
            throw located(planName, e);
        }
        plan = options(plan, a);
        NullDrawSettings nullSettings = NullDrawSettings.of(plan);
        nullSettings.check(plan, (int) a.whole("max-null-draws", NullDrawSettings.DEFAULT_MAX_DRAWS, 1, Integer.MAX_VALUE),
                a.has("null-draws") ? "--null-draws" : planName + ", nullDraws",
                a.has("null-cluster") ? "--null-cluster" : planName + ", nullCluster");
        Table table = data.table(plan);
        if (a.has("null-cluster") && nullSettings.clusterColumn() != null
                && table.find(nullSettings.clusterColumn()).isEmpty()) {
            String hint = table.nearestName(nullSettings.clusterColumn()).map(n -> "; did you mean \"" + n + "\"?")
                    .orElse("");
            throw new UsageException("--null-cluster: \"" + nullSettings.clusterColumn() + "\" is not a column of "
                    + table.source() + hint);
        }
        PlanLock lock = PlanLock.readIfPresent(PlanLock.besidePlan(planFile)).orElse(null);
        int threads = (int) a.whole("threads", Runtime.getRuntime().availableProcessors(), 1, 1024);
        long memoryLimit = a.has("max-memory") ? size(a.text("max-memory")) : MemoryEstimate.defaultLimit();
        VariantSource variants;
        try {
            variants = data.variants(plan, table);
        } catch (InputException e) {
            throw located(planName, e);
        }
        RunPipeline pipeline = variants != null ? new RunPipeline(threads).withVariants(variants)
                : new RunPipeline(threads).refusingMemoryAbove(memoryLimit, "fit a seeded random sample "
                + "of the specifications (--sample N --seed S), use fewer --threads, or raise the limit with "
                + "--max-memory SIZE" + (a.has("max-memory") ? "" : " (by default " + Math.round(100
                * MemoryEstimate.DEFAULT_HEAP_SHARE) + "% of the Java heap)") + " and the heap with java -Xmx");
        CompletedRun<InferenceSections> completed;
        try (ResultFolder results = ResultFolder.open(folder)) {
            try {
                completed = pipeline.run(plan, table, planText, new RunOrigin(String.join(" ", args), planBytes,
                        data.hashedFile(plan), lock), results.staging(), (run, progress, cancel) -> InferenceSections
                        .compute(run, nullSettings, threads, progress, cancel), new TerminalStages(err), null);
            } catch (InputException e) {
                throw located(planName, e);
            }
            pauseBeforeTheSwap(err);
            results.commit();
        }
        RunSummary summary = completed.summary();
        NullDrawResult draws = completed.inference().nullDraws();
        // with several comparable groups the whole run's median pools units: the line says where the others are
        String joint = draws == null ? "" : "; " + HumanNumbers.count(draws.drawCount()) + " null draws: median "
                + draws.medianTally().text() + (draws.mixesUnits() ? " (over every estimate as fitted, which pools "
                + "different units; per comparable group in summary.json's by_scale)" : "") + ", share significant " + draws.shareSignificantTally().text()
                + ", Stouffer " + draws.stoufferTally().text();
        out.printf("fitted %s of %s specifications in %.2f s; median estimate %s; significant: %s positive, "
                        + "%s negative%s; results in %s%n", HumanNumbers.count(summary.fitted()),
                HumanNumbers.count(summary.specifications()), completed.result().seconds(),
                HumanNumbers.number(summary.medianEstimate()), HumanNumbers.share(summary.shareSignificantPositive()),
                HumanNumbers.share(summary.shareSignificantNegative()), joint, folder);
        if (completed.provenance().lock() != null) {
            completed.provenance().lock().warning().ifPresent(w -> err.println("forkscape: warning: " + w));
        }
        for (String warning : completed.inference().warnings()) {
            err.println("forkscape: warning: " + CommandLine.oneLine(warning));
        }
    }

    static Plan options(Plan plan, Arguments a) {
        Plan p = plan;
        if (a.has("sample") || a.has("seed")) {
            p = p.withSample(a.whole("sample", p.sampleSize(), 1, Integer.MAX_VALUE), a.whole("seed", p.seed(),
                    Long.MIN_VALUE, Long.MAX_VALUE));
        }
        if (a.has("null-draws") || a.has("null-method") || a.has("null-cluster")) {
            String method = a.has("null-method") ? a.text("null-method").trim() : p.nullMethod();
            if (!method.equals("bootstrap") && !method.equals("permute")) {
                throw new UsageException("--null-method must be bootstrap or permute; found \"" + method + "\"");
            }
            String cluster = a.has("null-cluster") ? a.text("null-cluster").trim() : p.nullCluster();
            p = p.withNull((int) a.whole("null-draws", p.nullDraws(), 0, Integer.MAX_VALUE), method, cluster, p.seed());
        }
        if (a.has("max-specifications")) {
            p = p.withMaxSpecifications(a.whole("max-specifications", p.maxSpecifications(), 1, Long.MAX_VALUE));
        }
        return p;
    }

    /** A size such as 512MB or 2GB (binary units; a plain number is bytes). */
    static long size(String text) {
        try {
            long bytes = DataSize.parse(text.trim()).toBytes();
            if (bytes > 0) {
                return bytes;
            }
        } catch (IllegalArgumentException e) {
            // reported below with the accepted forms
        }
        throw new UsageException("--max-memory must be a size such as 512MB or 2GB; found \"" + text + "\"");
    }

    /**
     * A test hook: with the system property {@value #PAUSE_BEFORE_SWAP} set to a number of milliseconds,
     * the command says so on stderr and waits that long with every file staged, so that a test can stop the
     * process at that moment and see what the folder holds.
     */
    private static void pauseBeforeTheSwap(PrintStream err) {
        long millis = Long.getLong(PAUSE_BEFORE_SWAP, 0);
        if (millis > 0) {
            err.println("forkscape: staged, pausing before the swap");
            try {
                Thread.sleep(millis);
            } catch (InterruptedException e) {
                Thread.currentThread().interrupt();
            }
        }
    }

    static Path path(String text, String what) {
        try {
            return Path.of(text);
        } catch (InvalidPathException e) {
            throw new UsageException(what + " \"" + text + "\" is not a usable path");
        }
    }

    static InputException located(String planName, InputException e) {
        String where = e.where().isEmpty() ? planName : planName + ", " + e.where();
        return new InputException(where, e.problem());
    }
}
