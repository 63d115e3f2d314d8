package org.forkscape.web.compare;

import java.util.LinkedHashMap;
import java.util.Map;
import org.forkscape.compare.ComparisonFiles;
import org.forkscape.run.Json;
import org.forkscape.run.StoredAnalysis;
import org.forkscape.web.system.Lookup;
import org.springframework.web.bind.annotation.GetMapping;
import org.springframework.web.bind.annotation.PathVariable;
import org.springframework.web.bind.annotation.RestController;
import tools.jackson.databind.JsonNode;

/** The compare page's JSON: what was compared, compare.json as written, and the curves to draw. */
@RestController
class CompareApiController {
    private final ComparisonService comparisons;
    private final Lookup lookup;

    CompareApiController(ComparisonService comparisons, Lookup lookup) {
        this.comparisons = comparisons;
        this.lookup = lookup;
    }

    @GetMapping("/api/analyses/{analysis}/comparisons/{comparison}")
    Map<String, JsonNode> comparison(@PathVariable String analysis, @PathVariable String comparison) {
        StoredAnalysis a = lookup.analysis(analysis);
        ComparisonService.Kept kept = comparisons.read(a, comparison);
        Map<String, JsonNode> m = new LinkedHashMap<>();
        m.put("a", kept.record().path("a"));
        m.put("b", kept.record().path("b"));
        m.put("compare", Json.MAPPER.readTree(kept.folder().resolve(ComparisonFiles.JSON).toFile()));
        m.put("curves", Json.MAPPER.readTree(kept.folder().resolve(ComparisonService.CURVES).toFile()));
        return m;
    }
}
