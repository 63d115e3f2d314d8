package org.forkscape.spark;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import java.util.Map;
import java.util.concurrent.atomic.AtomicBoolean;
import org.apache.spark.sql.SparkSession;
import org.forkscape.InputException;
import org.forkscape.data.CsvTableReader;
import org.forkscape.data.Table;
import org.forkscape.fit.DataVariant;
import org.forkscape.fit.RowPassesByParts;
import org.forkscape.plan.Plan;
import org.forkscape.plan.PlanReader;
import org.forkscape.reference.ReferenceFiles;
import org.forkscape.run.MultiverseRunner;
import org.forkscape.run.ResultTable;
import org.forkscape.run.RunProgress;
import org.forkscape.run.RunResult;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.ValueSource;

/**
 * The row passes by batches of specifications on Spark local mode ({@link RowPassesByParts}): the ChickWeight
 * reference plan of {@code src/test/r/make-reference.R} (fixed effects for each chick absorbed or not; HC0,
 * HC1, HC2 and HC3, every one beside the absorbed chick from the row passes; a sample where one chick keeps a
 * single row, so a leverage of 1; a diet control the chick effects make redundant, so QR refits from the
 * partitions' factors) from a Parquet copy at 1, 3 and 8 partitions, against the single-machine engine on the
 * same data within 1e-10 relative ({@link SparkParityTest#compare}) and against R's lm() with sandwich's
 * vcovHC (chickweight-expected.csv, the tolerance of {@code RLmSandwichReferenceTest}), the leverage-1
 * statuses R's; the specifications each run's passes served counted against the plan; the same bits whatever
 * the batch size; and what stays refused, at its JSON path.
 */
class SparkRowPassTest {
    static SparkSession spark;
    @TempDir
    static Path folder;
    static Path chickParquet;

    @BeforeAll
    static void start() {
        ((ch.qos.logback.classic.Logger) org.slf4j.LoggerFactory.getLogger(org.slf4j.Logger.ROOT_LOGGER_NAME))
                .setLevel(ch.qos.logback.classic.Level.WARN);
        spark = SparkSession.builder().master("local[2]").appName("forkscape-spark-test")
                .config("spark.ui.enabled", "false").config("spark.sql.shuffle.partitions", "4").getOrCreate();
        SparkParityTest.spark = spark;
        chickParquet = ParquetCopy.write(spark, new CsvTableReader().read(
                SparkParityTest.REFERENCE.resolve("chickweight.csv")), folder.resolve("chickweight.parquet"), 3);
    }

    @AfterAll
    static void stop() {
        spark.stop();
    }

    @ParameterizedTest(name = "{0} partitions")
    @ValueSource(ints = {1, 3, 8})
    void chickWeightEqualsTheEngineAndR(int partitions) throws IOException {
        String planText = Files.readString(SparkParityTest.REFERENCE.resolve("chickweight-plan.json"));
        SparkParityTest.Comparison c = SparkParityTest.compare(planText, SparkParityTest.REFERENCE, chickParquet,
                partitions);
        SparkParityTest.report("chickweight-" + partitions, c.worst());
        ResultTable r = c.spark().results();
        Map<String, Integer> slots = ReferenceFiles.slotsByLabels(c.spark());
        List<Map<String, String>> expected = ReferenceFiles.rows("chickweight-expected.csv");
        assertEquals(expected.size(), r.size(), "specifications against chickweight-expected.csv");
        long rowPassTypes = 0;
        long leverageOne = 0;
        for (Map<String, String> row : expected) {
            String key = String.join(" | ", row.get("outcome"), row.get("age"), row.get("diet"), row.get("rows"),
                    row.get("chick effects"), row.get("errors"));
            int slot = slots.get(key);
            String where = "R lm() and sandwich, chickweight-expected.csv (" + ReferenceFiles.versions() + "), " + key;
            String e = row.get("errors");
            if (e.equals("HC2") || e.equals("HC3") || row.get("chick effects").equals("chick")
                    && (e.equals("HC0") || e.equals("HC1"))) {
                rowPassTypes++;
            }
            if (!row.get("status").equals("ok")) {
                // R's status names the cause; ours also names the error type and the usual reason
                assertTrue(r.status(slot).startsWith(row.get("status")), where + " status: " + r.status(slot));
                leverageOne++;
                continue;
            }
            SparkParityTest.assertClose(Double.parseDouble(row.get("estimate")), r.estimate(slot),
                    SparkParityTest.R_RELATIVE, where + " estimate");
            SparkParityTest.assertClose(Double.parseDouble(row.get("std_error")), r.stdError(slot),
                    SparkParityTest.R_RELATIVE, where + " std_error");
        }
        assertEquals(16, leverageOne, "leverage-1 specifications of chickweight-expected.csv");
        // every HC2 and HC3, and HC0 and HC1 beside the chick effects; HC0 and HC1 without them from fourth moments
        assertEquals(rowPassTypes, served(c.spark()), "specifications served by the row passes");
        assertTrue(batches(c.spark()) > 0);
    }

    @Test
    void theBatchSizeChangesNoBit() throws IOException {
        String planText = Files.readString(SparkParityTest.REFERENCE.resolve("chickweight-plan.json"));
        RunResult one = run(planText, 3, 1);
        RunResult usual = run(planText, 3, RowPassesByParts.MAX_PER_BATCH);
        assertTrue(batches(one) == served(one) && batches(usual) < batches(one), batches(one) + " passes of one "
                + "specification, " + batches(usual) + " of up to " + RowPassesByParts.MAX_PER_BATCH);
        for (int slot = 0; slot < one.results().size(); slot++) {
            assertEquals(usual.results().stdError(slot), one.results().stdError(slot), 0.0, "specification "
                    + one.results().specNumber(slot));
            assertEquals(usual.results().status(slot), one.results().status(slot));
        }
    }

    @Test
    void whatStaysRefusedIsRefusedAtItsPath() throws IOException {
        String tooth = Files.readString(SparkParityTest.REFERENCE.resolve("toothgrowth-plan.json"));
        // HC3 is computed, with and without null draws
        SparkRefusals.check(plan(tooth.replace("\"confidence\": 0.99,", "\"confidence\": 0.99, \"nullDraws\": 20,")));
        SparkRefusals.check(plan(tooth));
        String chick = Files.readString(SparkParityTest.REFERENCE.resolve("chickweight-plan.json"));
        SparkRefusals.check(plan(chick));
        // multi-way clustering is computed for least squares, with and without null draws
        String multiway = chick.replace("[\"classical\", \"HC0\"", "[\"classical\", \"HC0\", \"cluster:Chick+Diet\"");
        SparkRefusals.check(plan(multiway));
        SparkRefusals.check(plan(multiway.replaceFirst("\\{", "{\"nullDraws\": 20, ")));
        // analytic weights are summed on Spark
        SparkRefusals.check(plan(chick.replace("{\"name\": \"outcome\"", "{\"name\": \"weights\", \"kind\": "
                + "\"weights\", \"alternatives\": [{\"label\": \"by time\", \"column\": \"Time\"}]},\n    "
                + "{\"name\": \"outcome\"")));
        // two absorbed columns are solved by the partitions (SparkTwoWayEffectsTest); still refused: three or more
        // absorbed columns
        SparkRefusals.check(plan(chick.replace("\"columns\": [\"Chick\"]", "\"columns\": [\"Chick\", \"Diet\"]")));
        InputException e = assertThrows(InputException.class, () -> SparkRefusals.check(plan(chick.replace(
                "\"columns\": [\"Chick\"]", "\"columns\": [\"Chick\", \"Diet\", \"Time\"]"))));
        assertEquals("decisions[4].alternatives[1].columns", e.where());
        assertTrue(e.problem().startsWith("three or more absorbed columns"), e.problem());
        String poisson = chick.replace("{\"name\": \"outcome\"", "{\"name\": \"model\", \"kind\": \"model\", "
                + "\"alternatives\": [\"ols\", \"poisson\"]},\n    {\"name\": \"outcome\"");
        SparkRefusals.check(plan(poisson));
        // multi-way clustering beside a generalized linear model is computed (GlmFitsByParts)
        SparkRefusals.check(plan(poisson.replace("[\"classical\", \"HC0\"",
                "[\"classical\", \"HC0\", \"cluster:Chick+Diet\"")));
        // null draws beside a generalized linear model are made (BootstrapByParts, GlmFitsByParts)
        SparkRefusals.check(plan(poisson.replaceFirst("\\{", "{\"nullDraws\": 20, ")));
    }

    /** Specifications the row passes of a run's variants served. */
    static long served(RunResult run) {
        long n = 0;
        for (int v = 0; v < run.models().variantCount(); v++) {
            n += variant(run, v).rowPassesServed();
        }
        return n;
    }

    static long batches(RunResult run) {
        long n = 0;
        for (int v = 0; v < run.models().variantCount(); v++) {
            n += variant(run, v).rowPassBatches();
        }
        return n;
    }

    private static DataVariant variant(RunResult run, int v) {
        return run.models().variant(run.models().variantKey(v));
    }

    private static RunResult run(String planText, int partitions, int batch) {
        Plan plan = plan(planText);
        SparkData data = new SparkData(spark, chickParquet.toString(), partitions, planText,
                SparkParityTest.REFERENCE.toAbsolutePath());
        Table columns = data.table(plan);
        return new MultiverseRunner(2).withVariants(data.variants(plan, columns)).withRowPassBatch(batch)
                .run(plan, columns, RunProgress.SILENT, new AtomicBoolean());
    }

    private static Plan plan(String text) {
        return new PlanReader(false).read(text, SparkParityTest.REFERENCE.toAbsolutePath());
    }
}
