package org.forkscape.web.run;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.ByteArrayInputStream;
import java.io.ByteArrayOutputStream;
import java.io.IOException;
import java.io.OutputStream;
import java.io.PrintStream;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import org.forkscape.cli.CommandLine;
import org.forkscape.data.CsvLimits;
import org.forkscape.run.RunState;
import org.forkscape.run.StoredAnalysis;
import org.forkscape.run.StoredRun;
import org.forkscape.run.Workspace;
import org.forkscape.web.CivicTestData;
import org.forkscape.web.analysis.AnalysisService;
import org.forkscape.web.plan.PlanService;
import org.forkscape.web.system.ForkscapeSettings;
import org.forkscape.web.system.ServerLimits;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import tools.jackson.databind.JsonNode;
import tools.jackson.databind.json.JsonMapper;
import tools.jackson.databind.node.ObjectNode;

/**
 * The batch command and the run queue run a plan through one pipeline: for the same plan text, data and
 * thread count, the queue's files are the batch command's byte for byte (the batch command's output,
 * documented in README's "Results", is the reference), summary.json apart from its wall times and the
 * provenance's command and start.
 */
class BothDoorsTest {
    private static final List<String> FILES = List.of("specifications.csv", "null-draws.csv", "overfitting.csv",
            "plan.json");

    @TempDir
    Path root;

    @Test
    void theQueueWritesWhatTheBatchCommandWrites() throws Exception {
        // clustered errors among the alternatives, so the null draws resample whole districts by default
        String plan = CivicTestData.plan().replace("\"seed\": 7,", "\"seed\": 7, \"nullDraws\": 20,");
        Workspace workspace = new Workspace(root.resolve("workspace"));
        AnalysisService analyses = new AnalysisService(workspace, CsvLimits.DEFAULT);
        StoredAnalysis analysis = analyses.create("t", "t.csv", new ByteArrayInputStream(CivicTestData.csv(120, 4)
                .getBytes(StandardCharsets.UTF_8)), false);
        ForkscapeSettings.Runs runs = new ForkscapeSettings.Runs(1, 1, 2, 1_000_000, 10_000, null);
        ForkscapeSettings settings = new ForkscapeSettings(workspace.root(), null, null, runs, null);
        RunQueue queue = new RunQueue(workspace, analyses, new PlanService(workspace, analyses, ServerLimits.of(runs)),
                new InferenceSummary(settings), event -> { }, settings);
        Path web;
        try {
            StoredRun run = queue.submit(analysis, plan);
            assertEquals(RunState.FINISHED, waitForEnd(workspace, run).state());
            web = workspace.runFolder(analysis.id(), run.id());
        } finally {
            queue.stop();
        }

        Path batch = Files.createDirectories(root.resolve("batch"));
        Files.copy(workspace.dataFile(analysis.id()), batch.resolve(Workspace.DATA));
        Files.writeString(batch.resolve("plan.json"), plan);
        ByteArrayOutputStream err = new ByteArrayOutputStream();
        int code = CommandLine.execute(new String[] {"run", batch.resolve("plan.json").toString(), "--out",
                batch.resolve("out").toString(), "--threads", "2"}, new PrintStream(OutputStream.nullOutputStream()),
                new PrintStream(err, true, StandardCharsets.UTF_8));
        assertEquals(0, code, err.toString(StandardCharsets.UTF_8));

        for (String file : FILES) {
            assertArrayEquals(Files.readAllBytes(batch.resolve("out").resolve(file)), Files.readAllBytes(web.resolve(file)),
                    file);
        }
        JsonNode batchSummary = withoutTimesAndDoors(batch.resolve("out/summary.json"));
        assertTrue(batchSummary.equals(withoutTimesAndDoors(web.resolve("summary.json"))),
                "summary.json differs beyond its wall times, its start and its command");
        // what is left of the provenance is the same from both doors: the same plan bytes (the test writes the
        // plan file as the queue writes plan.json, UTF-8), the same data bytes, seed, threads, version and Java
        assertEquals(List.of("version", "plan_sha256", "data_sha256", "seed", "java", "threads"),
                List.copyOf(batchSummary.get("provenance").propertyNames()));
    }

    /**
     * The summary with the fit's and the null draws' wall times left out, and the parts of its provenance that
     * belong to the door or the moment: the command (a command line, a web action) and the start.
     */
    private static JsonNode withoutTimesAndDoors(Path summary) throws IOException {
        ObjectNode tree = (ObjectNode) JsonMapper.builder().build().readTree(Files.readString(summary));
        tree.remove("seconds");
        ((ObjectNode) tree.get("null")).remove("seconds");
        ObjectNode provenance = (ObjectNode) tree.get("provenance");
        provenance.remove("command");
        provenance.remove("started");
        return tree;
    }

    private static StoredRun waitForEnd(Workspace workspace, StoredRun run) throws InterruptedException {
        for (int i = 0; i < 1200; i++) {
            StoredRun r = workspace.run(run.analysisId(), run.id()).orElseThrow();
            if (r.state().ended()) {
                return r;
            }
            Thread.sleep(50);
        }
        throw new AssertionError("run did not end");
    }
}
