package org.forkscape.cli;

import java.io.PrintStream;
import java.nio.file.Path;
import java.util.Set;
import org.forkscape.InputException;
import org.forkscape.data.DataFiles;
import org.forkscape.data.Table;
import org.forkscape.infer.NullDrawSettings;
import org.forkscape.plan.Plan;
import org.forkscape.plan.PlanException;
import org.forkscape.plan.PlanReader;
import org.forkscape.run.MemoryEstimate;
import org.forkscape.run.TimeEstimate;

/**
 * {@code estimate PLAN [run's options but --out]}: what a run of the plan would take, before it is made:
 * the time, measured on this machine ({@link TimeEstimate}), and the memory at its peak against the limit
 * {@code run} would apply ({@link MemoryEstimate}). Checks the plan as {@code run} does, fits nothing of the
 * run itself and writes nothing.
 */
final class EstimateCommand {
    static final Set<String> OPTIONS = Set.of("sample", "seed", "threads", "max-specifications", "null-draws",
            "null-method", "null-cluster", "max-null-draws", "max-memory");

    private EstimateCommand() {
    }

    static void execute(String[] args, PrintStream out) {
        Arguments a = new Arguments(args, 1, OPTIONS);
        if (a.positional().size() != 1) {
            throw new UsageException((a.positional().isEmpty() ? "estimate needs a plan file"
                    : "estimate takes one plan file, found " + a.positional().size()) + "; usage: estimate PLAN.json "
                    + "[--sample N --seed S] [--threads T] [--max-specifications N] [--max-memory SIZE] "
                    + "[--null-draws R [--null-method bootstrap|permute] [--null-cluster COLUMN|rows]]");
        }
        Path planFile = RunCommand.path(a.positional().get(0), "the plan file");
        String planText = PlanReader.text(PlanReader.readBytes(planFile), planFile);
        String planName = planFile.getFileName() == null ? planFile.toString() : planFile.getFileName().toString();
        Plan plan;
        try {
            plan = RunCommand.options(new PlanReader(false).read(planText, planFile.toAbsolutePath().getParent()), a);
        } catch (PlanException e) {
            throw RunCommand.located(planName, e);
        }
        NullDrawSettings.of(plan).check(plan, (int) a.whole("max-null-draws", NullDrawSettings.DEFAULT_MAX_DRAWS, 1,
                Integer.MAX_VALUE), a.has("null-draws") ? "--null-draws" : planName + ", nullDraws",
                a.has("null-cluster") ? "--null-cluster" : planName + ", nullCluster");
        Table table = DataFiles.read(plan.dataFile());
        int threads = (int) a.whole("threads", Runtime.getRuntime().availableProcessors(), 1, 1024);
        long limit = a.has("max-memory") ? RunCommand.size(a.text("max-memory")) : MemoryEstimate.defaultLimit();
        TimeEstimate time;
        MemoryEstimate memory;
        try {
            time = TimeEstimate.of(plan, table, threads);
            memory = MemoryEstimate.of(plan, table, threads);
        } catch (InputException e) {
            throw RunCommand.located(planName, e);
        }
        out.println("time: " + time.text(threads));
        out.println("memory: about " + MemoryEstimate.format(memory.bytes()) + " at the peak, of a limit of "
                + MemoryEstimate.format(limit) + (memory.bytes() > limit ? "; run would refuse this plan" : ""));
    }
}
