package org.forkscape.cli;

import java.io.IOException;
import java.io.PrintStream;
import java.io.UncheckedIOException;
import java.nio.file.Files;
import java.nio.file.InvalidPathException;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.Comparator;
import java.util.List;
import java.util.Objects;
import java.util.Optional;
import java.util.Set;
import java.util.stream.Stream;
import org.forkscape.InputException;
import org.forkscape.data.DataFiles;
import org.forkscape.data.Table;
import org.forkscape.infer.InferenceSections;
import org.forkscape.infer.NullDrawSettings;
import org.forkscape.plan.Plan;
import org.forkscape.plan.PlanException;
import org.forkscape.plan.PlanReader;
import org.forkscape.run.MemoryEstimate;
import org.forkscape.run.Provenance;
import org.forkscape.run.RunOrigin;
import org.forkscape.run.RunOutputs;
import org.forkscape.run.RunPipeline;
import tools.jackson.core.JacksonException;
import tools.jackson.databind.JsonNode;
import tools.jackson.databind.json.JsonMapper;

/**
 * {@code verify RUN_DIR}: re-runs a folder that {@code run} wrote, from its plan.json, the data file that
 * plan names, and the recorded seed, sample and null draws, through the same {@link RunPipeline}, into a
 * temporary folder, and compares the results with the recorded ones ({@link RecordedResults}). Results
 * do not depend on the thread count, so the test is identity. Exit 0 when identical, 3 with the first
 * difference, 2 when the data's SHA-256 no longer matches or the folder lacks what is needed.
 */
final class VerifyCommand {
    static final String USAGE = "usage: verify RUN_DIR";
    private static final JsonMapper MAPPER = JsonMapper.builder().build();

    private VerifyCommand() {
    }

    static int execute(String[] args, PrintStream out, PrintStream err) {
        for (int i = 1; i < args.length; i++) {
            if (args[i].startsWith("-") && args[i].length() > 1) {
                throw new UsageException("verify takes no options; found " + args[i] + "; " + USAGE);
            }
        }
        Arguments a = new Arguments(args, 1, Set.of());
        if (a.positional().size() != 1) {
            throw new UsageException((a.positional().isEmpty() ? "verify needs a run folder" : "verify takes one "
                    + "run folder, found " + a.positional().size() + " (" + String.join(", ", a.positional()) + ")")
                    + "; " + USAGE);
        }
        Path folder = folder(a.positional().get(0));
        Path summaryFile = needed(folder, RunOutputs.SUMMARY);
        Path planFile = needed(folder, RunOutputs.PLAN);
        needed(folder, RunOutputs.SPECIFICATIONS);
        JsonNode summary = readJson(summaryFile);
        JsonNode provenance = summary.path("provenance");
        String recordedHash = provenance.path("data_sha256").asString("");
        if (!provenance.path("seed").isIntegralNumber() || recordedHash.isEmpty()) {
            throw new InputException(summaryFile.toString(), "provenance.seed and provenance.data_sha256 are needed "
                    + "to verify the run; this summary.json has no complete provenance");
        }
        byte[] planBytes = PlanReader.readBytes(planFile);
        String planText = PlanReader.text(planBytes, planFile);
        Plan plan = recordedPlan(readPlan(planText, dataFolder(planText, folder, provenance, recordedHash)), summary,
                provenance.path("seed").asLong());
        NullDrawSettings nullSettings = NullDrawSettings.of(plan);
        nullSettings.check(plan, Integer.MAX_VALUE, "plan.json, nullDraws", "plan.json, nullCluster");
        Table table = DataFiles.read(plan.dataFile());
        int threads = Runtime.getRuntime().availableProcessors();
        RunPipeline pipeline = new RunPipeline(threads).refusingMemoryAbove(MemoryEstimate.defaultLimit(),
                "give Java more heap (java -Xmx) to verify this run");
        Path scratch = scratchFolder();
        try {
            try {
                pipeline.run(plan, table, planText, new RunOrigin(String.join(" ", args), planBytes, plan.dataFile()),
                        scratch, (run, progress, cancel) -> InferenceSections.compute(run, nullSettings, threads,
                                progress, cancel), new TerminalStages(err), null);
            } catch (PlanException e) {
                throw new InputException("plan.json, " + e.where(), e.problem());
            }
            Optional<String> difference = RecordedResults.firstDifference(folder, scratch);
            if (difference.isPresent()) {
                err.println("forkscape: " + CommandLine.oneLine(difference.get()));
                return 3;
            }
        } finally {
            delete(scratch);
        }
        out.println("verified: " + summary.path("specifications").asLong() + " specifications identical");
        return 0;
    }

    /**
     * The plan copy with what the recorded run set on the command line: its seed, the size of its sample
     * when it sampled, its null draws (draws, method, resampled cluster), and a specification cap no lower
     * than its specification count (a cap refuses, it changes no result).
     */
    private static Plan recordedPlan(Plan copy, JsonNode summary, long seed) {
        long specifications = summary.path("specifications").asLong();
        Plan p = copy.withSample(summary.path("sampled").asBoolean() ? specifications : copy.sampleSize(), seed);
        p = p.withMaxSpecifications(Math.max(p.maxSpecifications(), summary.path("specifications_in_plan").asLong()));
        JsonNode draws = summary.path("null");
        if (!draws.isObject()) {
            return p.nullDraws() == 0 ? p : p.withNull(0, p.nullMethod(), p.nullCluster(), seed);
        }
        int count = draws.path("draws").asInt();
        String method = draws.path("method").asString(p.nullMethod());
        String cluster = draws.path("cluster").isString() ? draws.path("cluster").asString() : null;
        Plan asCopied = p.withNull(count, method, p.nullCluster(), seed);
        if (Objects.equals(NullDrawSettings.of(asCopied).clusterColumn(), cluster)) {
            return asCopied;
        }
        return p.withNull(count, method, cluster == null ? Plan.NULL_CLUSTER_ROWS : cluster, seed);
    }

    /**
     * The folder the plan copy's {@code data} is resolved against: the run folder first (a run folder
     * kept together with its data), then the folder of the plan file the recorded command names (relative
     * to the current folder, as that command was typed). The first whose file has the recorded SHA-256
     * is taken; a file that exists with another hash is refused with both hashes.
     */
    static Path dataFolder(String planText, Path runFolder, JsonNode provenance, String recordedHash) {
        List<Path> folders = new ArrayList<>(List.of(runFolder.toAbsolutePath()));
        originalPlanFolder(provenance.path("command").asString("")).ifPresent(folders::add);
        List<Path> looked = new ArrayList<>();
        Path mismatched = null;
        String mismatchedHash = null;
        for (Path f : folders) {
            Path data = readPlan(planText, f).dataFile();
            if (looked.contains(data)) {
                continue;
            }
            looked.add(data);
            if (Files.isRegularFile(data) || Files.isDirectory(data)) {
                String hash = Provenance.sha256(data);
                if (hash.equals(recordedHash)) {
                    return f;
                }
                if (mismatched == null) {
                    mismatched = data;
                    mismatchedHash = hash;
                }
            }
        }
        if (mismatched != null) {
            throw new InputException(mismatched.toString(), "the data file's SHA-256 is " + mismatchedHash
                    + ", the run recorded " + recordedHash + " (provenance.data_sha256); the data changed since the run");
        }
        throw new InputException("plan.json, data", "no data file found; looked for " + String.join(" and ",
                looked.stream().map(Path::toString).toList()));
    }

    private static Optional<Path> originalPlanFolder(String command) {
        String[] words = command.split(" ");
        if (words.length < 2 || !words[0].equals("run")) {
            return Optional.empty();
        }
        try {
            List<String> positional = new Arguments(words, 1, RunCommand.OPTIONS).positional();
            if (positional.size() != 1) {
                return Optional.empty();
            }
            Path parent = Path.of(positional.get(0)).toAbsolutePath().getParent();
            return Optional.ofNullable(parent);
        } catch (UsageException | InvalidPathException e) {
            // a command this folder's run did not take as given (a web run, or a path with spaces): no second place to look
            return Optional.empty();
        }
    }

    static Plan readPlan(String planText, Path folder) {
        try {
            return new PlanReader(false).read(planText, folder);
        } catch (PlanException e) {
            throw new InputException("plan.json, " + e.where(), e.problem());
        }
    }

    static Path folder(String text) {
        Path folder;
        try {
            folder = Path.of(text);
        } catch (InvalidPathException e) {
            throw new UsageException("run folder \"" + text + "\" is not a usable path");
        }
        if (!Files.isDirectory(folder)) {
            throw new UsageException("run folder " + folder + " is not a folder; give the --out folder of a run");
        }
        return folder;
    }

    static Path needed(Path folder, String name) {
        Path file = folder.resolve(name);
        if (!Files.isRegularFile(file)) {
            throw new InputException(folder.toString(), "has no " + name + "; give the --out folder of a run");
        }
        return file;
    }

    static JsonNode readJson(Path file) {
        try {
            JsonNode node = MAPPER.readTree(file.toFile());
            if (node == null || !node.isObject()) {
                throw new InputException(file.toString(), "is not a JSON object");
            }
            return node;
        } catch (JacksonException e) {
            throw new InputException(file.toString(), "is not valid JSON: " + e.getOriginalMessage());
        }
    }

    private static Path scratchFolder() {
        try {
            return Files.createTempDirectory("forkscape-verify");
        } catch (IOException e) {
            throw new UncheckedIOException("cannot create a temporary folder for the re-run: " + e.getMessage(), e);
        }
    }

    private static void delete(Path folder) {
        try (Stream<Path> files = Files.walk(folder)) {
            for (Path p : files.sorted(Comparator.reverseOrder()).toList()) {
                Files.deleteIfExists(p);
            }
        } catch (IOException e) {
            throw new UncheckedIOException("cannot remove the re-run's temporary folder " + folder + ": "
                    + e.getMessage(), e);
        }
    }
}
