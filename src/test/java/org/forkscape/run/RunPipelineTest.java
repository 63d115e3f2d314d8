package org.forkscape.run;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import java.io.UncheckedIOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.security.MessageDigest;
import java.time.Instant;
import java.util.ArrayList;
import java.util.HexFormat;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.SplittableRandom;
import java.util.concurrent.atomic.AtomicBoolean;
import org.forkscape.InputException;
import org.forkscape.data.CsvTableReader;
import org.forkscape.data.Table;
import org.forkscape.plan.Plan;
import org.forkscape.plan.PlanReader;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import tools.jackson.databind.JsonNode;
import tools.jackson.databind.json.JsonMapper;

/**
 * The pipeline's order as DEVELOPERS.md ("A run, end to end") states it: check, fit, refuse nothing
 * fitted, the inference stage, then the files, the run's before the stage's; and no file at all from a
 * run that is refused, fits nothing or is cancelled.
 */
class RunPipelineTest {
    private static final String PLAN = """
            {"data": "data.csv",
             "decisions": [
               {"name": "outcome", "kind": "outcome", "alternatives": [{"label": "y", "column": "y"}]},
               {"name": "key", "kind": "predictor", "alternatives": [{"label": "x", "column": "x"}]},
               {"name": "controls", "kind": "controls", "optional": ["a"]},
               {"name": "errors", "kind": "errors", "alternatives": [%s]}
             ]}
            """;

    @TempDir
    Path dir;
    private final List<String> events = new ArrayList<>();

    @Test
    void theStagesRunInOrderAndTheFilesComeLast() throws IOException {
        Path folder = dir.resolve("out");
        String text = PLAN.formatted("\"classical\", \"HC1\"");
        CompletedRun<Recorded> completed = new RunPipeline(2).run(plan(text), table(4), text, origin(text), folder, (run, progress,
                cancel) -> {
            events.add("inference, folder exists: " + Files.exists(folder));
            return new Recorded(folder);
        }, recording(), null);
        assertEquals(List.of("started FITTING", "FITTING 4 of 4", "ended FITTING", "started INFERENCE",
                "inference, folder exists: false", "ended INFERENCE", "started WRITING", "WRITING 4 of 4",
                "stage files, summary.json written: true", "ended WRITING"), events);
        assertEquals(4, completed.summary().specifications());
        assertEquals(4, completed.summary().fitted());
        assertEquals(text, Files.readString(folder.resolve(RunOutputs.PLAN)));
        assertEquals(5, Files.readAllLines(folder.resolve(RunOutputs.SPECIFICATIONS)).size());
        assertTrue(Files.readString(folder.resolve(RunOutputs.SUMMARY)).contains("\"stage\" : \"recorded\""),
                Files.readString(folder.resolve(RunOutputs.SUMMARY)));
    }

    @Test
    void summaryJsonEndsWithTheRunsProvenance() throws Exception {
        Path folder = dir.resolve("out");
        String text = PLAN.formatted("\"classical\"").replace("{\"data\"", "{\"seed\": 42, \"data\"");
        new RunPipeline(3).run(plan(text), table(4), text, origin(text), folder,
                (run, progress, cancel) -> new Recorded(folder), recording(), null);
        JsonNode summary = JsonMapper.builder().build().readTree(Files.readString(folder.resolve(RunOutputs.SUMMARY)));
        List<String> keys = new ArrayList<>(summary.propertyNames());
        assertEquals("provenance", keys.get(keys.size() - 1));
        JsonNode p = summary.get("provenance");
        assertEquals(List.of("version", "plan_sha256", "data_sha256", "seed", "command", "started", "java", "threads"),
                new ArrayList<>(p.propertyNames()));
        // java.security.MessageDigest on the same bytes
        MessageDigest sha = MessageDigest.getInstance("SHA-256");
        assertEquals(HexFormat.of().formatHex(sha.digest(text.getBytes(StandardCharsets.UTF_8))),
                p.get("plan_sha256").asString());
        assertEquals(HexFormat.of().formatHex(sha.digest(Files.readAllBytes(dir.resolve("data.csv")))),
                p.get("data_sha256").asString());
        assertEquals(42, p.get("seed").asLong());
        assertEquals("run plan.json --out out", p.get("command").asString());
        assertEquals(3, p.get("threads").asInt());
        assertEquals(System.getProperty("java.version"), p.get("java").asString());
        assertEquals(org.forkscape.Version.current(), p.get("version").asString());
        assertTrue(p.get("started").asString().endsWith("Z"), p.get("started").asString());
        Instant.parse(p.get("started").asString());
    }

    @Test
    void aPlanWhoseEverySpecificationIsBoundToFailIsRefusedBeforeFitting() {
        Path folder = dir.resolve("out");
        String text = PLAN.formatted("\"cluster:one\"");
        InputException e = assertThrows(InputException.class, () -> new RunPipeline(2).run(plan(text), table(4), text,
                origin(text), folder, (run, progress, cancel) -> new Recorded(folder), recording(), null));
        assertEquals("decisions[3]", e.where());
        assertTrue(e.problem().startsWith("every specification is bound to fail: its errors cluster on \"one\", which "
                + "has a single value in the data"), e.problem());
        assertEquals(List.of(), events);
        assertFalse(Files.exists(folder));
    }

    @Test
    void aRunThatFitsNothingIsRefusedBeforeTheInferenceStageAndWritesNothing() {
        Path folder = dir.resolve("out");
        // a keep rule that leaves at most a row or two: the check cannot know, the fit finds out
        String text = PLAN.formatted("\"classical\"").replace("{\"name\": \"errors\"", "{\"name\": \"rows\", "
                + "\"kind\": \"sample\", \"alternatives\": [{\"label\": \"few\", \"keep\": \"x > 0.99\"}]}, "
                + "{\"name\": \"errors\"");
        InputException e = assertThrows(InputException.class, () -> new RunPipeline(2).run(plan(text), table(4), text,
                origin(text), folder, (run, progress, cancel) -> {
                    events.add("inference");
                    return new Recorded(folder);
                }, recording(), null));
        assertEquals("", e.where());
        assertTrue(e.problem().startsWith("no specification could be fitted: all 2 failed with \"too few rows"),
                e.problem());
        assertTrue(e.problem().endsWith("; nothing was written"), e.problem());
        assertEquals(List.of("started FITTING", "FITTING 2 of 2", "ended FITTING"), events);
        assertFalse(Files.exists(folder));
    }

    @Test
    void aRunCancelledDuringTheInferenceStageWritesNothing() {
        Path folder = dir.resolve("out");
        String text = PLAN.formatted("\"classical\"");
        AtomicBoolean cancel = new AtomicBoolean();
        assertThrows(RunCancelledException.class, () -> new RunPipeline(1).run(plan(text), table(4), text, origin(text), folder,
                (run, progress, c) -> {
                    c.set(true);
                    return new Recorded(folder);
                }, recording(), cancel));
        assertEquals(List.of("started FITTING", "FITTING 2 of 2", "ended FITTING", "started INFERENCE", "ended INFERENCE"), events);
        assertFalse(Files.exists(folder));
    }

    @Test
    void aPlanAboveTheMemoryLimitIsRefusedBeforeTheFit() {
        Path folder = dir.resolve("out");
        String text = PLAN.formatted("\"classical\"");
        InputException e = assertThrows(InputException.class, () -> new RunPipeline(1).refusingMemoryAbove(1,
                "ask for less").run(plan(text), table(4), text, origin(text), folder, (run, progress, c) -> new Recorded(folder),
                recording(), null));
        assertTrue(e.problem().endsWith("above the limit of " + MemoryEstimate.format(1) + "; ask for less"),
                e.problem());
        assertEquals(List.of(), events);
        assertFalse(Files.exists(folder));
    }

    private StageListener recording() {
        return new StageListener() {
            @Override
            public RunProgress started(Stage stage) {
                events.add("started " + stage);
                // the last report of each stage that counts: every specification fitted, every row written
                return (done, total) -> {
                    if (done == total) {
                        events.add(stage + " " + done + " of " + total);
                    }
                };
            }

            @Override
            public void ended(Stage stage) {
                events.add("ended " + stage);
            }
        };
    }

    /** A stage's outcome that notes when its files are asked for. */
    private final class Recorded implements InferenceStage.Outcome {
        private final Path folder;

        Recorded(Path folder) {
            this.folder = folder;
        }

        @Override
        public Map<String, Object> sections() {
            return Map.of("stage", "recorded");
        }

        @Override
        public void writeFiles(Path target) {
            events.add("stage files, summary.json written: " + Files.exists(folder.resolve(RunOutputs.SUMMARY)));
        }

        @Override
        public List<String> warnings() {
            return List.of();
        }
    }

    private RunOrigin origin(String text) {
        return new RunOrigin("run plan.json --out out", text.getBytes(StandardCharsets.UTF_8), dir.resolve("data.csv"));
    }

    private Plan plan(String text) {
        return new PlanReader(false).read(text, dir);
    }

    /** 60 rows of a small invented design; the column {@code one} has a single cluster. */
    private Table table(long seed) {
        SplittableRandom r = new SplittableRandom(seed);
        StringBuilder csv = new StringBuilder("y,x,a,one\n");
        for (int i = 0; i < 60; i++) {
            double x = r.nextDouble();
            csv.append(String.format(Locale.ROOT, "%.6f,%.6f,%.6f,s%n", 0.5 * x + r.nextDouble(), x, r.nextDouble()));
        }
        try {
            Files.writeString(dir.resolve("data.csv"), csv);
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
        return new CsvTableReader().read(dir.resolve("data.csv"));
    }
}
