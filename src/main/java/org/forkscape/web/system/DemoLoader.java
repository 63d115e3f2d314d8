package org.forkscape.web.system;

import java.io.IOException;
import java.io.InputStream;
import java.nio.charset.StandardCharsets;
import java.util.List;
import org.forkscape.InputException;
import org.forkscape.run.Json;
import org.forkscape.run.RunState;
import org.forkscape.run.StoredAnalysis;
import org.forkscape.run.StoredRun;
import org.forkscape.run.Workspace;
import org.forkscape.web.analysis.AnalysisService;
import org.forkscape.web.run.RunQueue;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;
import org.springframework.boot.context.event.ApplicationReadyEvent;
import org.springframework.context.event.EventListener;
import org.springframework.core.io.Resource;
import org.springframework.stereotype.Component;
import tools.jackson.databind.JsonNode;
import tools.jackson.databind.node.ObjectNode;

/**
 * Puts the bundled demos in the workspace at the first start (the tutoring study and the stream panel:
 * each one's data and plan, copied from the jar or from the configured files) and runs them, so the
 * explorer has something to show at once. Later starts find each there (a demo analysis of the same data
 * file name); if its run never finished (a stop mid-run), it is run again. A missing or broken demo is
 * logged and the server serves on without it.
 */
@Component
class DemoLoader {
    private static final Logger LOG = LoggerFactory.getLogger(DemoLoader.class);

    private final ForkscapeSettings settings;
    private final AnalysisService analyses;
    private final Workspace workspace;
    private final RunQueue runs;

    DemoLoader(ForkscapeSettings settings, AnalysisService analyses, Workspace workspace, RunQueue runs) {
        this.settings = settings;
        this.analyses = analyses;
        this.workspace = workspace;
        this.runs = runs;
    }

    @EventListener(ApplicationReadyEvent.class)
    void load() {
        ForkscapeSettings.Demo demo = settings.demo();
        if (demo == null || !demo.enabled()) {
            return;
        }
        load(demo.data(), demo.plan());
        load(demo.panelData(), demo.panelPlan());
    }

    /** One demo: its analysis (found by its data file's name among the demo analyses, or made) and a run. */
    private void load(Resource data, Resource plan) {
        if (data == null || !data.exists() || plan == null || !plan.exists()) {
            LOG.info("no demo found at {} and {}; starting without it", data, plan);
            return;
        }
        try {
            StoredAnalysis analysis = analyses.all().stream()
                    .filter(a -> a.demo() && a.dataName().equals(name(data))).findFirst().orElse(null);
            if (analysis == null) {
                analysis = create(data, plan);
            }
            List<StoredRun> existing = workspace.runs(analysis.id());
            boolean usable = existing.stream().anyMatch(r -> r.state() == RunState.FINISHED || !r.state().ended());
            if (!usable) {
                runs.submit(analysis, workspace.plan(analysis.id()).orElseThrow());
            }
        } catch (IOException | InputException | IllegalStateException e) {
            LOG.warn("the demo {} could not be loaded: {}", name(data), e.getMessage());
        }
    }

    private StoredAnalysis create(Resource data, Resource plan) throws IOException {
        String planText;
        try (InputStream in = plan.getInputStream()) {
            planText = new String(in.readAllBytes(), StandardCharsets.UTF_8);
        }
        JsonNode json = Json.MAPPER.readTree(planText);
        if (!(json instanceof ObjectNode object)) {
            throw new IllegalStateException("the demo plan " + plan + " is not a JSON object");
        }
        // the plan names its data file beside it; in the workspace the analysis's data is always data.csv
        object.put("data", Workspace.DATA);
        String title = json.path("title").asString("Demo");
        StoredAnalysis analysis;
        try (InputStream in = data.getInputStream()) {
            analysis = analyses.create(title, name(data), in, true);
        }
        workspace.savePlan(analysis.id(), Json.MAPPER.writeValueAsString(object));
        return analysis;
    }

    private static String name(Resource r) {
        String name = r.getFilename();
        return name == null ? "demo.csv" : name;
    }
}
