package org.forkscape.web.compare;

import java.io.IOException;
import java.io.InputStream;
import java.io.UncheckedIOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Instant;
import java.util.LinkedHashMap;
import java.util.Map;
import org.forkscape.InputException;
import org.forkscape.compare.Comparison;
import org.forkscape.compare.ComparisonFiles;
import org.forkscape.compare.RunFiles;
import org.forkscape.run.Json;
import org.forkscape.run.RunState;
import org.forkscape.run.StoredAnalysis;
import org.forkscape.run.StoredRun;
import org.forkscape.run.Workspace;
import org.forkscape.web.system.NotFoundException;
import org.springframework.beans.factory.annotation.Value;
import org.springframework.stereotype.Service;
import org.springframework.util.unit.DataSize;
import tools.jackson.databind.JsonNode;

/**
 * The compare page's comparisons: two finished runs of one analysis, or one and a run folder uploaded as a
 * zip, compared by the batch command's {@link Comparison} and kept in the analysis's {@code comparisons/ID/}
 * folder: compare.csv and compare.json exactly as {@code compare} writes them, the curves the page draws,
 * and a record of what was compared.
 */
@Service
class ComparisonService {
    /** The record of what was compared. */
    static final String RECORD = "comparison.json";
    static final String CURVES = "curves.json";
    /** At most this many points per curve reach the browser (DESIGN: a few thousand marks per panel). */
    static final int CURVE_POINTS = 2000;

    private final Workspace workspace;
    private final long maxUpload;

    ComparisonService(Workspace workspace,
            @Value("${spring.servlet.multipart.max-file-size}") DataSize maxUpload) {
        this.workspace = workspace;
        this.maxUpload = maxUpload.toBytes();
    }

    /** A kept comparison: its folder and record ({@code a} and {@code b}, each a {@code run} id or {@code uploaded} name). */
    record Kept(String id, Path folder, JsonNode record) {
    }

    /** Compares run {@code runA} with run {@code runB}; returns the comparison's id. */
    String ofRuns(StoredAnalysis analysis, String runA, String runB) {
        RunFiles a = finished(analysis, runA, "a");
        RunFiles b = finished(analysis, runB, "b");
        Path staged = workspace.stageComparison(analysis.id());
        return kept(analysis, staged, a, b, side("run", runA), side("run", runB));
    }

    /** Compares run {@code runA} with the run folder zipped in {@code zip}; returns the comparison's id. */
    String withUpload(StoredAnalysis analysis, String runA, InputStream zip, String zipName) {
        RunFiles a = finished(analysis, runA, "a");
        String name = zipName == null || zipName.isBlank() ? "the uploaded file" : Path.of(zipName.replace('\\', '/'))
                .getFileName().toString();
        Path staged = workspace.stageComparison(analysis.id());
        try {
            Path into = Files.createDirectory(staged.resolve(UploadedRun.FOLDER));
            RunFiles b = UploadedRun.unpack(zip, name, into, maxUpload);
            return kept(analysis, staged, a, b, side("run", runA), side("uploaded", name));
        } catch (IOException | UncheckedIOException e) {
            workspace.discardComparison(staged);
            throw workspace.writeFailure(e, "the comparison was not kept");
        } catch (RuntimeException e) {
            workspace.discardComparison(staged);
            throw e;
        }
    }

    Kept read(StoredAnalysis analysis, String id) {
        Path folder = workspace.comparisonFolder(analysis.id(), id).filter(f -> Files.isRegularFile(f.resolve(RECORD)))
                .orElseThrow(() -> new NotFoundException("analysis " + analysis.id() + " has no comparison of that id"));
        return new Kept(id, folder, Json.MAPPER.readTree(folder.resolve(RECORD).toFile()));
    }

    private String kept(StoredAnalysis analysis, Path staged, RunFiles a, RunFiles b, Map<String, Object> sideA,
            Map<String, Object> sideB) {
        try {
            Comparison c = Comparison.of(a, b);
            c.write(staged);
            Json.write(staged.resolve(CURVES), Map.of("groups", c.curves(CURVE_POINTS).groups()));
            Map<String, Object> record = new LinkedHashMap<>();
            record.put("a", sideA);
            record.put("b", sideB);
            record.put("created", Instant.now().toString());
            Json.write(staged.resolve(RECORD), record);
        } catch (UncheckedIOException e) {
            workspace.discardComparison(staged);
            throw workspace.writeFailure(e, "the comparison was not kept");
        } catch (RuntimeException e) {
            workspace.discardComparison(staged);
            throw e;
        }
        return workspace.keepComparison(analysis.id(), staged);
    }

    private RunFiles finished(StoredAnalysis analysis, String runId, String field) {
        if (runId == null || runId.isBlank()) {
            throw new InputException(field, "choose a run");
        }
        StoredRun run = workspace.run(analysis.id(), runId).orElseThrow(() -> new InputException(field,
                "analysis " + analysis.id() + " has no run " + InputException.quoted(InputException.cut(runId))));
        if (run.state() != RunState.FINISHED) {
            throw new InputException(field, "run " + run.id() + " is " + run.state().word()
                    + "; only a finished run has results to compare");
        }
        return RunFileReader.ofRun(workspace.runFolder(analysis.id(), run.id()), run.id());
    }

    private static Map<String, Object> side(String kind, String value) {
        Map<String, Object> m = new LinkedHashMap<>();
        m.put(kind, value);
        return m;
    }

    /** The files a comparison offers for download. */
    static boolean offered(String name) {
        return name.equals(ComparisonFiles.CSV) || name.equals(ComparisonFiles.JSON);
    }
}
