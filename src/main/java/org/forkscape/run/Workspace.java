package org.forkscape.run;

import java.io.IOException;
import java.io.UncheckedIOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.AtomicMoveNotSupportedException;
import java.nio.file.DirectoryStream;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.StandardCopyOption;
import java.security.SecureRandom;
import java.time.Instant;
import java.time.ZoneOffset;
import java.time.format.DateTimeFormatter;
import java.util.ArrayList;
import java.util.Comparator;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Optional;
import java.util.regex.Pattern;
import java.util.stream.Stream;
import org.forkscape.InputException;
import tools.jackson.databind.JsonNode;

/**
 * The analyses kept on disk, in plain files that can be copied as they are into a replication package:
 *
 * <pre>
 * WORKSPACE/analyses/ID/analysis.json   title, the uploaded file's name (shown, never a path), size, created, demo
 * WORKSPACE/analyses/ID/data.csv        the uploaded data, byte for byte (data.parquet for a Parquet upload)
 * WORKSPACE/analyses/ID/plan.json       the plan being edited (absent until first saved)
 * WORKSPACE/analyses/ID/plan.lock.json  the saved plan's lock ({@link PlanLock}; absent until it is locked)
 * WORKSPACE/analyses/ID/runs/RUN/plan.json            the plan exactly as run; like ID/plan.json it names
 *                                                    "data": "data.csv" (or "data.parquet") and is read
 *                                                    against ID/
 * WORKSPACE/analyses/ID/runs/RUN/status               one word: queued, running, finished, failed, cancelled,
 *                                                    interrupted
 * WORKSPACE/analyses/ID/runs/RUN/run.json             created/started/ended times, specifications, the problem
 * WORKSPACE/analyses/ID/runs/RUN/run.log              one line per event
 * WORKSPACE/analyses/ID/runs/RUN/specifications.csv   finished runs only
 * WORKSPACE/analyses/ID/runs/RUN/summary.json         finished runs only
 * </pre>
 *
 * <p>Identifiers are generated here ({@code yyyyMMdd-HHmmss-} and six random letters or digits) and every
 * identifier that comes in is checked against that shape before a path is built from it, so a request
 * cannot name a file outside the workspace. Every file is written through {@link AtomicFiles}; a new
 * analysis is assembled in a hidden folder and moved into place whole. One server owns a workspace at a
 * time: at start it marks the runs a stopped server left queued or running as interrupted.
 */
public final class Workspace {
    public static final String ANALYSIS = "analysis.json";
    public static final String DATA = "data.csv";
    /** The name of an analysis's data when it was uploaded as a Parquet file. */
    public static final String DATA_PARQUET = "data.parquet";
    public static final String PLAN = "plan.json";
    public static final String PLAN_LOCK = "plan.lock.json";
    public static final String STATUS = "status";
    public static final String RUN_RECORD = "run.json";
    public static final String LOG = "run.log";
    /** The analysis's folder of comparisons between runs, one folder each. */
    public static final String COMPARISONS = "comparisons";

    private static final Pattern ID = Pattern.compile("[0-9]{8}-[0-9]{6}-[0-9a-z]{6}");
    private static final DateTimeFormatter STAMP = DateTimeFormatter.ofPattern("yyyyMMdd-HHmmss")
            .withZone(ZoneOffset.UTC);
    private static final String ALPHABET = "0123456789abcdefghijklmnopqrstuvwxyz";

    /**
     * Below this much free space a failed write is taken as a full disk whatever the file system said, and
     * {@link #requireSpace} keeps it free beyond what a run needs: the run's record, log and status must
     * still be writable when it ends.
     */
    public static final long MIN_FREE = 1L << 20;

    private final Path root;
    private final FreeSpace freeSpace;
    private final Path analyses;
    private final Path incoming;
    private final Path trash;
    private final SecureRandom random = new SecureRandom();

    /**
     * Where a deleted analysis or run goes first, inside the workspace (so on its file system, where a
     * rename is atomic): the folder disappears from the workspace at once, and whatever of it a failed
     * deletion leaves is removed at the next start.
     */
    public static final String TRASH = ".trash";

    /** The folder of the embedded web server's working files, inside the workspace. */
    public static final String SERVER_FILES = ".server";

    /** Opens (creating if needed) the workspace folder and clears what an interrupted upload left behind. */
    public Workspace(Path root) {
        this(root, FreeSpace.OF_FILE_STORE);
    }

    /** A workspace whose free space is measured by {@code freeSpace}. */
    public Workspace(Path root, FreeSpace freeSpace) {
        this.root = root.toAbsolutePath().normalize();
        this.freeSpace = freeSpace;
        this.analyses = this.root.resolve("analyses");
        this.incoming = this.root.resolve(".incoming");
        this.trash = this.root.resolve(TRASH);
        try {
            Files.createDirectories(analyses);
            Files.createDirectories(incoming);
            Files.createDirectories(trash);
            for (Path leftOver : List.of(incoming, trash)) {
                try (Stream<Path> left = Files.list(leftOver)) {
                    for (Path p : left.toList()) {
                        deleteTree(p);
                    }
                }
            }
            Files.createDirectories(uploadParts());
            try (Stream<Path> half = Files.list(analyses)) {
                for (Path p : half.filter(p -> p.getFileName().toString().startsWith(".")).toList()) {
                    deleteTree(p);
                }
            }
            // comparisons a stopped server left half made (see stageComparison)
            for (Path analysis : children(analyses)) {
                for (Path p : children(analysis.resolve(COMPARISONS))) {
                    if (p.getFileName().toString().startsWith(".")) {
                        deleteTree(p);
                    }
                }
            }
        } catch (IOException e) {
            throw new UncheckedIOException("cannot open the workspace " + this.root + ": " + e.getMessage(), e);
        }
    }

    public Path root() {
        return root;
    }

    /**
     * Refuses, before anything is written, what needs more space than the workspace's disk has free (less
     * {@link #MIN_FREE}).
     *
     * @param bytes   the expected size of what will be written
     * @param notKept what is not kept, as a clause for the message ("this run was not started")
     * @throws WorkspaceWriteException when the disk has too little room
     */
    public void requireSpace(long bytes, String notKept) {
        long free = usableBytes();
        if (free - MIN_FREE < bytes) {
            throw WorkspaceWriteException.noRoom(bytes, free, notKept);
        }
    }

    /**
     * A write into the workspace that failed, in words that name no path.
     *
     * @param notKept what is not kept, as a clause for the message ("the upload was not kept")
     */
    public WorkspaceWriteException writeFailure(Exception failure, String notKept) {
        return WorkspaceWriteException.of(failure, usableBytes() < MIN_FREE, notKept);
    }

    private long usableBytes() {
        try {
            return freeSpace.usableBytes(root);
        } catch (IOException e) {
            // the question failed, not the disk: nothing can be said about its room
            return Long.MAX_VALUE;
        }
    }

    /** Where the web server spools large upload parts; cleared with the rest of the incoming folder at start. */
    public Path uploadParts() {
        return incoming.resolve("parts");
    }

    /** Whether {@code id} has the shape of a generated identifier (and so is safe in a path). */
    public static boolean isId(String id) {
        return id != null && ID.matcher(id).matches();
    }

    /** A fresh empty file for an upload in progress, on the workspace's file system; delete it if unused. */
    public Path newIncomingFile() {
        return newIncomingFile(".csv");
    }

    /** A new empty file for an upload whose name ends in {@code extension} (which tells its format). */
    public Path newIncomingFile(String extension) {
        try {
            return Files.createTempFile(incoming, "upload-", extension);
        } catch (IOException e) {
            throw writeFailure(e, "the upload was not kept");
        }
    }

    /**
     * Creates an analysis from a data file already checked by the caller; {@code data} (from
     * {@link #newIncomingFile()} or anywhere on the same file system) is moved into it.
     */
    public StoredAnalysis createAnalysis(String title, String dataName, int rows, int columns, Path data,
            boolean demo) {
        return createAnalysis(title, dataName, rows, columns, data, DATA, demo);
    }

    /**
     * Creates an analysis whose data is kept under {@code storedName}, {@link #DATA} or
     * {@link #DATA_PARQUET}.
     */
    public StoredAnalysis createAnalysis(String title, String dataName, int rows, int columns, Path data,
            String storedName, boolean demo) {
        if (!storedName.equals(DATA) && !storedName.equals(DATA_PARQUET)) {
            throw new IllegalArgumentException("an analysis's data is " + DATA + " or " + DATA_PARQUET);
        }
        Instant now = Instant.now();
        Path staging = analyses.resolve("." + randomLetters(12));
        try {
            Files.createDirectories(staging);
            Files.move(data, staging.resolve(storedName), StandardCopyOption.REPLACE_EXISTING);
            for (int attempt = 0; ; attempt++) {
                String id = STAMP.format(now) + "-" + randomLetters(6);
                StoredAnalysis a = new StoredAnalysis(id, title, dataName, rows, columns, now, demo, false);
                Json.write(staging.resolve(ANALYSIS), analysisJson(a));
                Path target = analyses.resolve(id);
                if (Files.exists(target) && attempt < 10) {
                    continue;
                }
                moveFolder(staging, target);
                return a;
            }
        } catch (IOException | UncheckedIOException e) {
            deleteQuietly(staging);
            throw writeFailure(e, "the upload was not kept");
        }
    }

    /** Every analysis, newest first. */
    public List<StoredAnalysis> analyses() {
        List<StoredAnalysis> out = new ArrayList<>();
        for (Path p : children(analyses)) {
            String id = p.getFileName().toString();
            if (isId(id)) {
                readAnalysis(id).ifPresent(out::add);
            }
        }
        out.sort(Comparator.comparing(StoredAnalysis::created).thenComparing(StoredAnalysis::id).reversed());
        return out;
    }

    public Optional<StoredAnalysis> analysis(String id) {
        return isId(id) ? readAnalysis(id) : Optional.empty();
    }

    /** The analysis folder: plans name {@code data.csv} (or {@code data.parquet}) and are read against it. */
    public Path analysisFolder(String analysisId) {
        return analyses.resolve(checked(analysisId));
    }

    /** The analysis's data: {@link #DATA_PARQUET} when it was uploaded as Parquet, {@link #DATA} otherwise. */
    public Path dataFile(String analysisId) {
        Path folder = analysisFolder(analysisId);
        Path parquet = folder.resolve(DATA_PARQUET);
        return Files.isRegularFile(parquet) ? parquet : folder.resolve(DATA);
    }

    /** The plan being edited, if one was saved. */
    public Optional<String> plan(String analysisId) {
        return readText(analysisFolder(analysisId).resolve(PLAN));
    }

    /** Saves the plan being edited and records it in the plan's history (a new version when it changed). */
    public void savePlan(String analysisId, String planText) {
        savePlan(analysisId, planText, 0);
    }

    private synchronized void savePlan(String analysisId, String planText, int restoredFrom) {
        requireAnalysis(analysisId);
        PlanHistory history = new PlanHistory(analysisFolder(analysisId));
        try {
            history.adoptLegacy();
            AtomicFiles.writeString(analysisFolder(analysisId).resolve(PLAN), planText);
        } catch (UncheckedIOException e) {
            throw writeFailure(e, "the plan was not saved");
        }
        try {
            history.record(planText, restoredFrom, Instant.now());
        } catch (UncheckedIOException e) {
            throw writeFailure(e, "the plan was saved but its version was not added to the plan's history");
        }
    }

    /**
     * Every saved version of the analysis's plan, oldest first; an analysis saved before the history was kept
     * shows its plan as version 1.
     */
    public List<PlanVersion> planVersions(String analysisId) {
        return new PlanHistory(analysisFolder(analysisId)).versions();
    }

    /** The text of version {@code version} of the analysis's plan, or empty when it has no such version. */
    public Optional<String> planVersion(String analysisId, int version) {
        return new PlanHistory(analysisFolder(analysisId)).text(version);
    }

    /**
     * Makes version {@code version} the plan being edited again; the history gains a version that says it
     * restored that one (none when it is the latest already).
     *
     * @throws InputException at {@code version} when there is no such version
     */
    public void restorePlanVersion(String analysisId, int version) {
        String text = planVersion(analysisId, version).orElseThrow(() -> new InputException("version",
                "the plan has no version " + version));
        savePlan(analysisId, text, version);
    }

    /**
     * The saved version a plan's bytes are, by their SHA-256: the latest version with that hash saved by
     * {@code before} (a run's creation time), or empty when they are none of the saved versions (a plan sent
     * with the run from the JSON API, or a version saved after the run).
     */
    public Optional<PlanVersion> versionOf(String analysisId, String planText, Instant before) {
        String sha = Provenance.sha256(planText.getBytes(StandardCharsets.UTF_8));
        List<PlanVersion> versions = planVersions(analysisId);
        for (int i = versions.size() - 1; i >= 0; i--) {
            PlanVersion v = versions.get(i);
            if (v.sha256().equals(sha) && !v.saved().isAfter(before)) {
                return Optional.of(v);
            }
        }
        return Optional.empty();
    }

    /** The saved plan's lock, if it was locked; a lock file that is no lock is an {@link InputException}. */
    public Optional<PlanLock> planLock(String analysisId) {
        return PlanLock.readIfPresent(analysisFolder(analysisId).resolve(PLAN_LOCK));
    }

    public void savePlanLock(String analysisId, PlanLock lock) {
        requireAnalysis(analysisId);
        try {
            Json.write(analysisFolder(analysisId).resolve(PLAN_LOCK), lock.toJson());
        } catch (UncheckedIOException e) {
            throw writeFailure(e, "the plan was not locked");
        }
    }

    /** Records a new queued run with the plan it will run. */
    public StoredRun createRun(String analysisId, String planText) {
        requireAnalysis(analysisId);
        Path runs = analysisFolder(analysisId).resolve("runs");
        Instant now = Instant.now();
        try {
            Files.createDirectories(runs);
            for (int attempt = 0; ; attempt++) {
                String id = STAMP.format(now) + "-" + randomLetters(6);
                Path folder = runs.resolve(id);
                try {
                    Files.createDirectory(folder);
                } catch (java.nio.file.FileAlreadyExistsException e) {
                    if (attempt < 10) {
                        continue;
                    }
                    throw e;
                }
                AtomicFiles.writeString(folder.resolve(PLAN), planText);
                StoredRun run = new StoredRun(id, analysisId, RunState.QUEUED, now, null, null, 0, "", "", "", false);
                update(run);
                log(run, "queued");
                return run;
            }
        } catch (IOException | UncheckedIOException e) {
            throw writeFailure(e, "the run was not started");
        }
    }

    /** Writes a run's record and its status word. */
    public void update(StoredRun run) {
        Path folder = runFolder(run.analysisId(), run.id());
        try {
            Json.write(folder.resolve(RUN_RECORD), runJson(run));
            AtomicFiles.writeString(folder.resolve(STATUS), run.state().word() + "\n");
        } catch (UncheckedIOException e) {
            throw writeFailure(e, "the run's record was not updated");
        }
    }

    /** Appends a time-stamped line to the run's log (the whole file is rewritten atomically). */
    public synchronized void log(StoredRun run, String line) {
        Path file = runFolder(run.analysisId(), run.id()).resolve(LOG);
        String before = readText(file).orElse("");
        try {
            AtomicFiles.writeString(file, before + Instant.now() + " " + line.replace('\n', ' ') + "\n");
        } catch (UncheckedIOException e) {
            throw writeFailure(e, "a line of the run's log was not kept");
        }
    }

    public Path runFolder(String analysisId, String runId) {
        return analysisFolder(analysisId).resolve("runs").resolve(checked(runId));
    }

    public Optional<StoredRun> run(String analysisId, String runId) {
        if (!isId(analysisId) || !isId(runId)) {
            return Optional.empty();
        }
        return readRun(analysisId, runId);
    }

    /** The runs of an analysis, newest first. */
    public List<StoredRun> runs(String analysisId) {
        List<StoredRun> out = new ArrayList<>();
        for (Path p : children(analysisFolder(analysisId).resolve("runs"))) {
            String id = p.getFileName().toString();
            if (isId(id)) {
                readRun(analysisId, id).ifPresent(out::add);
            }
        }
        out.sort(Comparator.comparing(StoredRun::created).thenComparing(StoredRun::id).reversed());
        return out;
    }

    /**
     * Writes an analysis's new title or archive mark (an archived analysis is kept whole, listed apart).
     *
     * @throws InputException at {@code title} when the title is empty
     */
    public StoredAnalysis updateAnalysis(StoredAnalysis changed) {
        requireAnalysis(changed.id());
        if (changed.title().isBlank()) {
            throw new InputException("title", "an analysis needs a title");
        }
        try {
            Json.write(analysisFolder(changed.id()).resolve(ANALYSIS), analysisJson(changed));
        } catch (UncheckedIOException e) {
            throw writeFailure(e, "the analysis was not changed");
        }
        return changed;
    }

    /**
     * Writes an ended run's new name or archive mark. A queued or running run is refused: its queue job
     * writes its record until it ends.
     *
     * @throws InputException when the run has not ended
     */
    public StoredRun updateRunLabels(StoredRun changed) {
        StoredRun now = run(changed.analysisId(), changed.id())
                .orElseThrow(() -> new IllegalArgumentException("no run " + changed.id()));
        requireEnded(now, "renamed or archived");
        update(changed.with(now.state()));
        return changed;
    }

    /**
     * Deletes an analysis with its data, plans and runs: its folder is first renamed into the workspace's
     * trash (atomic on one file system), then deleted.
     *
     * @throws InputException when one of its runs is queued or running
     */
    public void deleteAnalysis(String analysisId) {
        requireAnalysis(analysisId);
        for (StoredRun r : runs(analysisId)) {
            requireEnded(r, "deleted (nor its analysis)");
        }
        discard(analysisFolder(analysisId), "the analysis was not deleted");
    }

    /**
     * Deletes a run's folder, through the trash as {@link #deleteAnalysis} does.
     *
     * @throws InputException when the run is queued or running
     */
    public void deleteRun(String analysisId, String runId) {
        StoredRun r = run(analysisId, runId).orElseThrow(() -> new IllegalArgumentException("no run " + runId));
        requireEnded(r, "deleted");
        discard(runFolder(analysisId, runId), "the run was not deleted");
    }

    private static void requireEnded(StoredRun r, String what) {
        if (!r.state().ended()) {
            throw new InputException("run", "run " + r.id() + " is " + r.state().word() + " and cannot be " + what
                    + "; cancel it first, or wait until it has ended");
        }
    }

    private void discard(Path folder, String notDone) {
        Path target = trash.resolve(randomLetters(12));
        try {
            moveFolder(folder, target);
        } catch (IOException e) {
            throw writeFailure(e, notDone);
        }
        // gone from the workspace already; what a failure here leaves in the trash goes at the next start
        deleteQuietly(target);
    }

    /**
     * A new hidden folder among the analysis's comparisons, for the caller to fill; {@link #keepComparison}
     * moves it into place under a generated id, {@link #discardComparison} removes it, so that a comparison
     * that fails half way leaves nothing.
     */
    public Path stageComparison(String analysisId) {
        requireAnalysis(analysisId);
        Path staging = analysisFolder(analysisId).resolve(COMPARISONS).resolve("." + randomLetters(12));
        try {
            Files.createDirectories(staging);
            return staging;
        } catch (IOException e) {
            throw writeFailure(e, "the comparison was not kept");
        }
    }

    /** Moves a staged comparison into place; returns its id. */
    public String keepComparison(String analysisId, Path staged) {
        Path comparisons = analysisFolder(analysisId).resolve(COMPARISONS);
        if (!staged.getParent().equals(comparisons)) {
            throw new IllegalArgumentException("not a staged comparison of analysis " + analysisId + ": " + staged);
        }
        Instant now = Instant.now();
        try {
            for (int attempt = 0; ; attempt++) {
                String id = STAMP.format(now) + "-" + randomLetters(6);
                Path target = comparisons.resolve(id);
                if (Files.exists(target) && attempt < 10) {
                    continue;
                }
                moveFolder(staged, target);
                return id;
            }
        } catch (IOException e) {
            deleteQuietly(staged);
            throw writeFailure(e, "the comparison was not kept");
        }
    }

    public void discardComparison(Path staged) {
        deleteQuietly(staged);
    }

    /** A kept comparison's folder, or empty when the analysis has none of that id. */
    public Optional<Path> comparisonFolder(String analysisId, String comparisonId) {
        if (!isId(analysisId) || !isId(comparisonId)) {
            return Optional.empty();
        }
        Path folder = analysisFolder(analysisId).resolve(COMPARISONS).resolve(comparisonId);
        return Files.isDirectory(folder) ? Optional.of(folder) : Optional.empty();
    }

    /** The plan a run used. */
    public String runPlan(String analysisId, String runId) {
        return readText(runFolder(analysisId, runId).resolve(PLAN))
                .orElseThrow(() -> new IllegalStateException("run " + runId + " has no plan.json"));
    }

    /**
     * Marks every run left queued or running by a server that stopped as interrupted; returns how many.
     * Call once when the server that owns this workspace starts.
     */
    public int markInterrupted() {
        int n = 0;
        for (StoredAnalysis a : analyses()) {
            for (StoredRun r : runs(a.id())) {
                if (!r.state().ended()) {
                    StoredRun stopped = r.with(RunState.INTERRUPTED);
                    update(stopped);
                    log(stopped, "interrupted: the server stopped before the run ended");
                    n++;
                }
            }
        }
        return n;
    }

    private Optional<StoredAnalysis> readAnalysis(String id) {
        return readText(analyses.resolve(id).resolve(ANALYSIS)).map(text -> {
            JsonNode n = Json.MAPPER.readTree(text);
            return new StoredAnalysis(id, n.path("title").asString(""), n.path("data_name").asString(""),
                    n.path("rows").asInt(0), n.path("columns").asInt(0), Instant.parse(n.path("created").asString()),
                    n.path("demo").asBoolean(false), n.path("archived").asBoolean(false));
        });
    }

    private Optional<StoredRun> readRun(String analysisId, String runId) {
        Path folder = analyses.resolve(analysisId).resolve("runs").resolve(runId);
        Optional<String> record = readText(folder.resolve(RUN_RECORD));
        if (record.isEmpty()) {
            return Optional.empty();
        }
        JsonNode n = Json.MAPPER.readTree(record.get());
        RunState state = readText(folder.resolve(STATUS)).map(RunState::of).orElse(RunState.INTERRUPTED);
        return Optional.of(new StoredRun(runId, analysisId, state, instant(n, "created"), instant(n, "started"),
                instant(n, "ended"), n.path("specifications").asLong(0), n.path("problem_where").asString(""),
                n.path("problem").asString(""), n.path("name").asString(""), n.path("archived").asBoolean(false)));
    }

    private static Instant instant(JsonNode n, String key) {
        JsonNode v = n.get(key);
        return v == null || v.isNull() ? null : Instant.parse(v.asString());
    }

    private static Map<String, Object> analysisJson(StoredAnalysis a) {
        Map<String, Object> m = new LinkedHashMap<>();
        m.put("id", a.id());
        m.put("title", a.title());
        m.put("data_name", a.dataName());
        m.put("rows", a.rows());
        m.put("columns", a.columns());
        m.put("created", a.created().toString());
        m.put("demo", a.demo());
        m.put("archived", a.archived());
        return m;
    }

    private static Map<String, Object> runJson(StoredRun r) {
        Map<String, Object> m = new LinkedHashMap<>();
        m.put("id", r.id());
        m.put("analysis", r.analysisId());
        m.put("state", r.state().word());
        m.put("created", r.created().toString());
        m.put("started", r.started() == null ? null : r.started().toString());
        m.put("ended", r.ended() == null ? null : r.ended().toString());
        m.put("specifications", r.specifications());
        m.put("problem_where", r.problemWhere());
        m.put("problem", r.problem());
        m.put("name", r.name());
        m.put("archived", r.archived());
        return m;
    }

    private void requireAnalysis(String analysisId) {
        if (analysis(analysisId).isEmpty()) {
            throw new IllegalArgumentException("no analysis " + analysisId);
        }
    }

    private static String checked(String id) {
        if (!isId(id)) {
            throw new IllegalArgumentException("not an identifier of this workspace: " + id);
        }
        return id;
    }

    private String randomLetters(int n) {
        StringBuilder b = new StringBuilder(n);
        for (int i = 0; i < n; i++) {
            b.append(ALPHABET.charAt(random.nextInt(ALPHABET.length())));
        }
        return b.toString();
    }

    private static Optional<String> readText(Path file) {
        try {
            return Optional.of(Files.readString(file, StandardCharsets.UTF_8));
        } catch (java.nio.file.NoSuchFileException e) {
            return Optional.empty();
        } catch (IOException e) {
            throw new UncheckedIOException("cannot read " + file + ": " + e.getMessage(), e);
        }
    }

    private static List<Path> children(Path folder) {
        if (!Files.isDirectory(folder)) {
            return List.of();
        }
        List<Path> out = new ArrayList<>();
        try (DirectoryStream<Path> s = Files.newDirectoryStream(folder)) {
            s.forEach(out::add);
        } catch (IOException e) {
            throw new UncheckedIOException("cannot list " + folder + ": " + e.getMessage(), e);
        }
        return out;
    }

    private static void moveFolder(Path from, Path to) throws IOException {
        try {
            Files.move(from, to, StandardCopyOption.ATOMIC_MOVE);
        } catch (AtomicMoveNotSupportedException e) {
            Files.move(from, to);
        }
    }

    private static void deleteTree(Path p) throws IOException {
        if (Files.isDirectory(p, java.nio.file.LinkOption.NOFOLLOW_LINKS)) {
            for (Path c : children(p)) {
                deleteTree(c);
            }
        }
        Files.deleteIfExists(p);
    }

    private static void deleteQuietly(Path p) {
        try {
            deleteTree(p);
        } catch (IOException ignored) {
            // a hidden staging folder; the next start removes it
        }
    }
}
