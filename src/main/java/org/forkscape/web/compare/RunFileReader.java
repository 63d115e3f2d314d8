package org.forkscape.web.compare;

import java.nio.file.Path;
import org.forkscape.InputException;
import org.forkscape.compare.RunFiles;
import org.forkscape.run.Json;
import org.forkscape.run.RunOutputs;
import tools.jackson.core.JacksonException;
import tools.jackson.databind.JsonNode;

/**
 * A run's three files as the compare page finds them, named in messages by the run's id or the uploaded
 * zip's name (never by where the server keeps them).
 */
final class RunFileReader {
    private RunFileReader() {
    }

    /** A finished run of the workspace, named {@code runs/RUN}. */
    static RunFiles ofRun(Path folder, String runId) {
        Path named = Path.of("runs", runId);
        return new RunFiles(named, object(folder.resolve(RunOutputs.PLAN), named),
                object(folder.resolve(RunOutputs.SUMMARY), named), folder.resolve(RunOutputs.SPECIFICATIONS));
    }

    static JsonNode object(Path file, Path named) {
        String where = named.resolve(file.getFileName().toString()).toString();
        try {
            JsonNode node = Json.MAPPER.readTree(file.toFile());
            if (node == null || !node.isObject()) {
                throw new InputException(where, "is not a JSON object");
            }
            return node;
        } catch (JacksonException e) {
            throw new InputException(where, "is not valid JSON: " + e.getOriginalMessage());
        }
    }
}
