package org.forkscape.cli;

import java.io.PrintStream;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.Set;
import org.forkscape.InputException;
import org.forkscape.plan.Plan;
import org.forkscape.plan.PlanException;
import org.forkscape.plan.PlanReader;
import org.forkscape.run.Json;
import org.forkscape.run.PlanLock;

/**
 * {@code lock PLAN [--replace yes]}: fixes a plan before any result is seen by writing its {@link PlanLock}
 * beside it ({@link PlanLock#besidePlan}). The plan must read as {@code run} reads it and its data file must
 * be readable; an existing lock is kept unless {@code --replace yes} is given, since replacing it would
 * give the plan a new time and fingerprint.
 */
final class LockCommand {
    static final Set<String> OPTIONS = Set.of("replace");
    static final String USAGE = "usage: lock PLAN.json [--replace yes]";

    private LockCommand() {
    }

    static void execute(String[] args, PrintStream out) {
        Arguments a = new Arguments(args, 1, OPTIONS);
        if (a.positional().size() != 1) {
            throw new UsageException((a.positional().isEmpty() ? "lock needs a plan file" : "lock takes one plan "
                    + "file, found " + a.positional().size()) + "; " + USAGE);
        }
        String replace = a.has("replace") ? a.text("replace") : "no";
        if (!replace.equals("yes") && !replace.equals("no")) {
            throw new UsageException("--replace must be yes or no; found \"" + replace + "\"");
        }
        Path planFile = RunCommand.path(a.positional().get(0), "the plan file");
        byte[] planBytes = PlanReader.readBytes(planFile);
        String planName = planFile.getFileName() == null ? planFile.toString() : planFile.getFileName().toString();
        Plan plan;
        try {
            plan = new PlanReader(false).read(PlanReader.text(planBytes, planFile), planFile.toAbsolutePath()
                    .getParent());
        } catch (PlanException e) {
            throw RunCommand.located(planName, e);
        }
        Path lockFile = PlanLock.besidePlan(planFile);
        if (Files.exists(lockFile) && replace.equals("no")) {
            throw new UsageException(lockFile + " exists; the plan was locked before and nothing was written (pass "
                    + "--replace yes to lock it anew, with a new time and fingerprint)");
        }
        if (!Files.isRegularFile(plan.dataFile()) && !Files.isDirectory(plan.dataFile())) {
            throw new InputException(planName + ", data", "no data file or folder at " + plan.dataFile());
        }
        PlanLock lock = PlanLock.of(planBytes, plan.dataFile());
        Json.write(lockFile, lock.toJson());
        out.println("locked " + planName + " at " + lock.locked() + "; fingerprint " + lock.fingerprint()
                + " (deposit it before any result is seen); wrote " + lockFile);
    }
}
