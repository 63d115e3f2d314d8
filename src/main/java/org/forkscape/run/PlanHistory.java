package org.forkscape.run;

import java.io.IOException;
import java.io.UncheckedIOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.NoSuchFileException;
import java.nio.file.Path;
import java.time.Instant;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Optional;
import tools.jackson.databind.JsonNode;

/**
 * Every saved version of one analysis's plan, kept in its {@code plan-history/} folder: {@code N.json} holds
 * version N's text as saved, {@code versions.json} lists the versions with their time and SHA-256. A save
 * whose text is the latest version's adds none. An analysis from before the history has plan.json and no
 * folder: its plan reads as version 1, saved at the file's modification time, and is stored as such before
 * the next save.
 */
final class PlanHistory {
    static final String FOLDER = "plan-history";
    static final String INDEX = "versions.json";

    private final Path analysisFolder;

    PlanHistory(Path analysisFolder) {
        this.analysisFolder = analysisFolder;
    }

    /** The versions, oldest first; empty when no plan was ever saved. */
    List<PlanVersion> versions() {
        Path index = folder().resolve(INDEX);
        if (!Files.isRegularFile(index)) {
            return legacy().map(List::of).orElse(List.of());
        }
        List<PlanVersion> list = new ArrayList<>();
        for (JsonNode v : Json.MAPPER.readTree(index.toFile()).path("versions")) {
            list.add(new PlanVersion(v.path("version").asInt(), Instant.parse(v.path("saved").asString()),
                    v.path("sha256").asString(), v.path("restored_from").asInt(0)));
        }
        return list;
    }

    /** Version {@code n}'s text, or empty when there is no such version. */
    Optional<String> text(int n) {
        if (!Files.isRegularFile(folder().resolve(INDEX))) {
            return n == 1 ? read(analysisFolder.resolve(Workspace.PLAN)) : Optional.empty();
        }
        return n < 1 ? Optional.empty() : read(folder().resolve(n + ".json"));
    }

    /**
     * Records {@code text}, just written as plan.json, as a new version unless it is the latest one; call
     * {@link #adoptLegacy()} before plan.json is overwritten.
     */
    void record(String text, int restoredFrom, Instant at) {
        List<PlanVersion> versions = versions();
        String sha = Provenance.sha256(text.getBytes(StandardCharsets.UTF_8));
        if (!versions.isEmpty() && versions.get(versions.size() - 1).sha256().equals(sha)) {
            return;
        }
        List<PlanVersion> next = new ArrayList<>(versions);
        PlanVersion added = new PlanVersion(versions.size() + 1, at, sha, restoredFrom);
        next.add(added);
        write(added.version(), text, next);
    }

    /** Stores a plan.json saved before the history as version 1, so that the next save becomes version 2. */
    void adoptLegacy() {
        if (Files.isRegularFile(folder().resolve(INDEX))) {
            return;
        }
        Optional<PlanVersion> first = legacy();
        if (first.isPresent()) {
            write(1, read(analysisFolder.resolve(Workspace.PLAN)).orElseThrow(), List.of(first.get()));
        }
    }

    private Optional<PlanVersion> legacy() {
        Path plan = analysisFolder.resolve(Workspace.PLAN);
        try {
            byte[] bytes = Files.readAllBytes(plan);
            return Optional.of(new PlanVersion(1, Files.getLastModifiedTime(plan).toInstant(),
                    Provenance.sha256(bytes), 0));
        } catch (NoSuchFileException e) {
            return Optional.empty();
        } catch (IOException e) {
            throw new UncheckedIOException("cannot read " + plan + ": " + e.getMessage(), e);
        }
    }

    /** The version's text first, then the index that names it: a crash between leaves an unlisted file only. */
    private void write(int version, String text, List<PlanVersion> versions) {
        try {
            Files.createDirectories(folder());
        } catch (IOException e) {
            throw new UncheckedIOException("cannot create " + folder() + ": " + e.getMessage(), e);
        }
        AtomicFiles.writeString(folder().resolve(version + ".json"), text);
        List<Map<String, Object>> list = new ArrayList<>();
        for (PlanVersion v : versions) {
            Map<String, Object> m = new LinkedHashMap<>();
            m.put("version", v.version());
            m.put("saved", v.saved().toString());
            m.put("sha256", v.sha256());
            if (v.restoredFrom() > 0) {
                m.put("restored_from", v.restoredFrom());
            }
            list.add(m);
        }
        Map<String, Object> index = new LinkedHashMap<>();
        index.put("versions", list);
        Json.write(folder().resolve(INDEX), index);
    }

    private Path folder() {
        return analysisFolder.resolve(FOLDER);
    }

    private static Optional<String> read(Path file) {
        try {
            return Optional.of(Files.readString(file, StandardCharsets.UTF_8));
        } catch (NoSuchFileException e) {
            return Optional.empty();
        } catch (IOException e) {
            throw new UncheckedIOException("cannot read " + file + ": " + e.getMessage(), e);
        }
    }
}
