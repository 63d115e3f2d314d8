package org.forkscape.compare;

import java.nio.file.Path;
import tools.jackson.databind.JsonNode;

/** A run folder's files as its door found them: plan.json and summary.json parsed, specifications.csv's path. */
public record RunFiles(Path folder, JsonNode plan, JsonNode summary, Path specifications) {
}
