package org.forkscape.cli;

import java.io.IOException;
import java.io.PrintStream;
import java.nio.file.Files;
import java.nio.file.InvalidPathException;
import java.nio.file.Path;
import java.util.Set;
import org.forkscape.compare.ComparisonFiles;
import org.forkscape.compare.RunFiles;
import org.forkscape.run.RunOutputs;

/**
 * {@code compare RUN_A RUN_B --out DIR}: what run B's plan changes against run A's, and what that does to
 * the results ({@link ComparisonFiles}); prints the sentence. Both folders are read as {@code verify}
 * reads a run folder, and neither is written to.
 */
final class CompareCommand {
    static final String USAGE = "usage: compare RUN_A RUN_B --out DIR";
    static final String HELP = String.join("\n",
            "  java -jar forkscape.jar compare RUN_A RUN_B --out DIR",
            "                                               what run B's plan adds to or drops from run A's",
            "                                               and what that changes: DIR/compare.json,",
            "                                               DIR/compare.csv (specifications matched by label)");

    private CompareCommand() {
    }

    static void execute(String[] args, PrintStream out) {
        Arguments a = new Arguments(args, 1, Set.of("out"));
        if (a.positional().size() != 2) {
            throw new UsageException("compare takes two run folders, found " + a.positional().size()
                    + (a.positional().isEmpty() ? "" : " (" + String.join(", ", a.positional()) + ")") + "; " + USAGE);
        }
        if (!a.has("out")) {
            throw new UsageException("compare needs --out DIR, the folder for compare.json and compare.csv; " + USAGE);
        }
        RunFiles runA = runFiles(a.positional().get(0));
        RunFiles runB = runFiles(a.positional().get(1));
        Path outFolder = outFolder(a.text("out"), runA.folder(), runB.folder());
        out.println(ComparisonFiles.write(runA, runB, outFolder));
    }

    private static RunFiles runFiles(String text) {
        Path folder = VerifyCommand.folder(text);
        Path summary = VerifyCommand.needed(folder, RunOutputs.SUMMARY);
        Path plan = VerifyCommand.needed(folder, RunOutputs.PLAN);
        Path specifications = VerifyCommand.needed(folder, RunOutputs.SPECIFICATIONS);
        return new RunFiles(folder, VerifyCommand.readJson(plan), VerifyCommand.readJson(summary), specifications);
    }

    /** The comparison never writes into a run folder: its files would then sit among that run's results. */
    private static Path outFolder(String text, Path runA, Path runB) {
        Path out;
        try {
            out = Path.of(text);
        } catch (InvalidPathException e) {
            throw new UsageException("--out \"" + text + "\" is not a usable path");
        }
        for (Path run : new Path[] {runA, runB}) {
            if (same(out, run)) {
                throw new UsageException("--out " + out + " is the run folder " + run + "; give another folder, "
                        + "so that a run folder keeps only its run's files");
            }
        }
        if (Files.exists(out) && !Files.isDirectory(out)) {
            throw new UsageException("--out " + out + " is a file; give a folder");
        }
        return out;
    }

    private static boolean same(Path out, Path run) {
        try {
            return Files.exists(out) ? Files.isSameFile(out, run)
                    : out.toAbsolutePath().normalize().equals(run.toAbsolutePath().normalize());
        } catch (IOException e) {
            // unreadable attributes: compare the paths as written, which is all a folder still to be made has
            return out.toAbsolutePath().normalize().equals(run.toAbsolutePath().normalize());
        }
    }
}
