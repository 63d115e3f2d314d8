package org.forkscape.cli;

import java.io.PrintStream;
import java.nio.file.InvalidPathException;
import java.nio.file.Path;
import java.util.Set;
import org.forkscape.InputException;
import org.forkscape.data.DataFiles;
import org.forkscape.data.Table;
import org.forkscape.plan.Plan;
import org.forkscape.plan.PlanReader;
import org.forkscape.report.FigureSize;
import org.forkscape.check.ReleaseCheck;
import org.forkscape.report.RunReport;
import org.forkscape.run.RunOutputs;
import org.forkscape.run.RunResult;
import org.forkscape.run.Scale;
import org.forkscape.run.SpecificationsCsvReader;
import org.forkscape.text.HumanNumbers;
import org.forkscape.web.explore.RankedRun;
import tools.jackson.databind.JsonNode;

/**
 * {@code report RUN_DIR --out DIR [--scale S] [--group G] [--size column|page]}: the figure, tables,
 * methods paragraph and HTML report of a folder that {@code run} wrote ({@link RunReport}). The run is read
 * back as the explorer reads it (its plan.json, the data file that plan names, found as {@code verify} finds
 * it, and specifications.csv), so the figure is the explorer's view of the same run.
 */
final class ReportCommand {
    static final String USAGE = "usage: report RUN_DIR --out DIR [--scale fitted|effect|standardized|partial|t] "
            + "[--group G] [--size column|page]";
    private static final Set<String> OPTIONS = Set.of("out", "scale", "group", "size");

    private ReportCommand() {
    }

    static void execute(String[] args, PrintStream out) {
        Arguments a = new Arguments(args, 1, OPTIONS);
        if (a.positional().size() != 1) {
            throw new UsageException((a.positional().isEmpty() ? "report needs a run folder" : "report takes one "
                    + "run folder, found " + a.positional().size() + " (" + String.join(", ", a.positional()) + ")")
                    + "; " + USAGE);
        }
        if (!a.has("out")) {
            throw new UsageException("report needs --out DIR, the folder for the figure and tables; " + USAGE);
        }
        Scale scale = scale(a.text("scale"));
        FigureSize size = FigureSize.named(a.text("size"), "--size");
        Path outFolder = outFolder(a.text("out"));
        Path folder = VerifyCommand.folder(a.positional().get(0));
        Path summaryFile = VerifyCommand.needed(folder, RunOutputs.SUMMARY);
        Path planFile = VerifyCommand.needed(folder, RunOutputs.PLAN);
        Path specifications = VerifyCommand.needed(folder, RunOutputs.SPECIFICATIONS);
        JsonNode summary = VerifyCommand.readJson(summaryFile);
        JsonNode provenance = summary.path("provenance");
        String planText = PlanReader.text(PlanReader.readBytes(planFile), planFile);
        Plan plan = VerifyCommand.readPlan(planText, VerifyCommand.dataFolder(planText, folder, provenance,
                provenance.path("data_sha256").asString("")));
        Table table = DataFiles.read(plan.dataFile());
        RunResult result = SpecificationsCsvReader.read(plan, table, specifications,
                summary.path("seconds").asDouble(Double.NaN));
        RankedRun ranked = RankedRun.of(result, scale);
        String title = VerifyCommand.readJson(planFile).path("title").asString("Specification curve");
        String runWords = "run folder " + folder.toAbsolutePath().normalize().getFileName() + ", started "
                + provenance.path("started").asString("at an unrecorded time");
        try {
            RunReport.write(outFolder, ranked, summary, ReleaseCheck.recorded(folder), a.has("group") ? a.text("group") : "", size, title, runWords);
        } catch (InputException e) {
            if (e.where().equals("group")) {
                throw new UsageException("--group " + e.getMessage().substring("group: ".length()));
            }
            throw e;
        }
        out.println("report of " + HumanNumbers.count(ranked.size()) + " specifications on the " + scale.title()
                + " scale in " + outFolder + ": " + String.join(", ", RunReport.FILES));
    }

    private static Scale scale(String word) {
        if (word == null) {
            return Scale.AS_FITTED;
        }
        Scale s = Scale.named(word);
        if (s == null) {
            throw new UsageException("--scale " + InputException.quoted(word) + " is not a scale; "
                    + "use fitted, effect, standardized, partial or t");
        }
        return s;
    }

    private static Path outFolder(String text) {
        try {
            return Path.of(text);
        } catch (InvalidPathException e) {
            throw new UsageException("--out \"" + text + "\" is not a usable path");
        }
    }
}
