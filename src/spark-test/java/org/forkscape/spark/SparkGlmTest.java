package org.forkscape.spark;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.concurrent.atomic.AtomicBoolean;
import org.apache.spark.sql.SparkSession;
import org.forkscape.data.CsvTableReader;
import org.forkscape.data.Table;
import org.forkscape.fit.DataVariant;
import org.forkscape.fit.GlmFitsByParts;
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
 * Logit, probit and Poisson specifications on Spark local mode ({@link GlmFitsByParts}: the single-machine
 * estimator whose passes over the rows are Spark jobs over the partitions, a round of passes per job): the
 * demo's Poisson plan (Poisson beside least squares, HC1 and school clusters, the absorbed zone) from a
 * Parquet copy at 1, 3 and 8 partitions, and the birthwt-smoking GLM reference plan (logit and probit,
 * classical, HC0 to HC3 and age clusters, with and without the absorbed race) and the tutoring Poisson
 * reference plan (two- and three-way cluster errors) at 3 partitions, against the
 * single-machine engine on the same data: statuses, rows and coefficients exactly, estimates, standard
 * errors, p-values, average marginal effects and their errors, deviances, pseudo-R-squared and model
 * p-values within 1e-10 relative; birthwt-smoking also against R's glm with sandwich
 * (glm/birthwt-smoking-expected.csv from {@code src/test/r/glm-reference.R}, at the 1e-7 relative of
 * {@code RGlmReferenceTest}'s {@code GlmTolerance} for these models), and the tutoring plan's multi-way
 * specifications against R's glm with sandwich's vcovCL (tutoring-poisson-expected.csv from
 * {@code src/test/r/multiway-glm-reference.R}, at the same 1e-7). The route is asserted: every fitted
 * generalized linear specification came from the rounds of passes, fewer rounds than passes.
 */
class SparkGlmTest {
    static final double RELATIVE = 1e-10;
    /** GlmTolerance's figure for logit, probit and Poisson against R's glm (RGlmReferenceTest). */
    static final double R_GLM_RELATIVE = 1e-7;
    static SparkSession spark;
    @TempDir
    static Path folder;
    static Path demoParquet;
    static Path birthParquet;
    static Path tutoringParquet;
    static final Path GLM = SparkParityTest.REFERENCE.resolve("glm");

    @BeforeAll
    static void start() {
        ((ch.qos.logback.classic.Logger) org.slf4j.LoggerFactory.getLogger(org.slf4j.Logger.ROOT_LOGGER_NAME))
                .setLevel(ch.qos.logback.classic.Level.WARN);
        spark = SparkSession.builder().master("local[2]").appName("forkscape-spark-test")
                .config("spark.ui.enabled", "false").config("spark.sql.shuffle.partitions", "4").getOrCreate();
        SparkParityTest.spark = spark;
        demoParquet = ParquetCopy.write(spark, new CsvTableReader().read(SparkParityTest.SAMPLE.resolve("civic-demo.csv")),
                folder.resolve("civic-demo.parquet"), 4);
        birthParquet = ParquetCopy.write(spark, new CsvTableReader().read(GLM.resolve("birthwt.csv")),
                folder.resolve("birthwt.parquet"), 3);
        tutoringParquet = ParquetCopy.write(spark, new CsvTableReader().read(SparkParityTest.REFERENCE.resolve(
                "tutoring-panel.csv")), folder.resolve("tutoring-panel.parquet"), 3);
    }

    @AfterAll
    static void stop() {
        spark.stop();
    }

    @ParameterizedTest(name = "{0} partitions")
    @ValueSource(ints = {1, 3, 8})
    void demoPoissonPlanEqualsTheEngine(int partitions) throws IOException {
        String planText = Files.readString(SparkParityTest.SAMPLE.resolve("civic-demo-models.plan.json"));
        compare(planText, SparkParityTest.SAMPLE, demoParquet, partitions, "demo-models-" + partitions);
    }

    @Test
    void birthWeightLogitAndProbitEqualTheEngineAndR() throws IOException {
        String planText = Files.readString(GLM.resolve("birthwt-smoking-plan.json"));
        RunResult run = compare(planText, GLM, birthParquet, 3, "birthwt-smoking-3");
        ResultTable r = run.results();
        Map<String, Integer> slots = ReferenceFiles.slotsByLabels(run);
        List<Map<String, String>> expected = ReferenceFiles.rows("glm/birthwt-smoking-expected.csv");
        assertEquals(expected.size(), r.size(), "specifications against glm/birthwt-smoking-expected.csv");
        int checked = 0;
        for (Map<String, String> row : expected) {
            String key = String.join(" | ", row.get("outcome"), row.get("exposure"), row.get("model"),
                    row.get("controls"), row.get("fixed effects"), row.get("errors"));
            int slot = slots.get(key);
            String where = "R glm() and sandwich, glm/birthwt-smoking-expected.csv ("
                    + ReferenceFiles.versions("glm/versions.txt") + "), " + key;
            assertTrue(r.status(slot).startsWith(row.get("status")), where + " status: " + r.status(slot));
            if (!row.get("status").equals("ok")) {
                continue;
            }
            for (String column : List.of("estimate", "std_error", "effect", "effect_std_error")) {
                double actual = switch (column) {
                    case "estimate" -> r.estimate(slot);
                    case "std_error" -> r.stdError(slot);
                    case "effect" -> r.effect(slot);
                    default -> r.effectStdError(slot);
                };
                SparkParityTest.assertClose(Double.parseDouble(row.get(column)), actual, R_GLM_RELATIVE,
                        where + " " + column);
            }
            checked++;
        }
        assertTrue(checked > expected.size() / 2, checked + " specifications checked against R");
    }

    /**
     * Poisson with two- and three-way cluster errors (tutoring-poisson-plan.json) at 3 partitions: against the
     * engine, and every multi-way specification against R's glm with {@code sandwich::vcovCL(type = "HC1",
     * cadjust = TRUE, multi0 = FALSE)} (tutoring-poisson-expected.csv from
     * {@code src/test/r/multiway-glm-reference.R}), the status where R's variance is not positive included.
     */
    @Test
    void multiwayClusteredPoissonEqualsTheEngineAndR() throws IOException {
        String planText = Files.readString(SparkParityTest.REFERENCE.resolve("tutoring-poisson-plan.json"));
        RunResult run = compare(planText, SparkParityTest.REFERENCE, tutoringParquet, 3, "tutoring-poisson-3");
        ResultTable r = run.results();
        Map<String, Integer> slots = ReferenceFiles.slotsByLabels(run);
        int checked = 0;
        int notPositive = 0;
        for (Map<String, String> row : ReferenceFiles.rows("tutoring-poisson-expected.csv")) {
            if (!row.get("errors").contains("+")) {
                continue;
            }
            String key = String.join(" | ", row.get("outcome"), row.get("hours"), row.get("model"), row.get("rows"),
                    row.get("effects"), row.get("controls"), row.get("weights"), row.get("errors"));
            int slot = slots.get(key);
            String where = "R glm() and sandwich, tutoring-poisson-expected.csv ("
                    + ReferenceFiles.versions("multiway-glm-versions.txt") + "), " + key;
            assertTrue(r.status(slot).startsWith(row.get("status")), where + " status: " + r.status(slot));
            if (!row.get("status").equals("ok")) {
                notPositive++;
                continue;
            }
            SparkParityTest.assertClose(Double.parseDouble(row.get("std_error")), r.stdError(slot), R_GLM_RELATIVE,
                    where + " std_error");
            SparkParityTest.assertClose(Double.parseDouble(row.get("effect_std_error")), r.effectStdError(slot),
                    R_GLM_RELATIVE, where + " effect_std_error");
            checked++;
        }
        assertTrue(checked > 0, checked + " multi-way specifications checked against R");
        assertTrue(notPositive > 0, "the plan has multi-way variances that are not positive");
    }

    /**
     * A logit with two nearly equal controls (the second the first plus 1e-3 of another variable, a pivot
     * share near 1e-6), whose information one machine factors by QR of its weighted design: on Spark, at 3
     * partitions, from the
     * partitions' triangular factors of their rows, stacked (asserted: the QR passes were made), equal to the
     * engine on the CSV within the tolerance (classical, HC1, HC3 and cluster errors).
     */
    @Test
    void aNearlyCollinearLogitIsFactoredFromThePartitionsFactors() throws IOException {
        java.util.SplittableRandom random = new java.util.SplittableRandom(29);
        StringBuilder csv = new StringBuilder("y,key,first,second,school\n");
        for (int i = 0; i < 600; i++) {
            double a = random.nextGaussian();
            double z = random.nextGaussian();
            double key = 0.5 * a + 0.3 * z + random.nextGaussian();
            double eta = -0.3 + 0.4 * key + 0.5 * a + 0.3 * z;
            int y = random.nextDouble() < 1 / (1 + Math.exp(-eta)) ? 1 : 0;
            csv.append(y).append(',').append(key).append(',').append(a).append(',').append(a + 1e-3 * z).append(',')
                    .append(i % 30).append('\n');
        }
        Path data = folder.resolve("near.csv");
        Files.writeString(data, csv);
        Path parquet = ParquetCopy.write(spark, new CsvTableReader().read(data), folder.resolve("near.parquet"), 3);
        String planText = """
                {"data": "near.csv", "decisions": [
                  {"name": "o", "kind": "outcome", "alternatives": [{"label": "y", "column": "y"}]},
                  {"name": "k", "kind": "predictor", "alternatives": [{"label": "x", "column": "key"}]},
                  {"name": "c", "kind": "controls", "required": ["first", "second"]},
                  {"name": "e", "kind": "errors", "alternatives": ["classical", "HC1", "HC3", "cluster:school"]},
                  {"name": "m", "kind": "model", "alternatives": ["logit"]}]}
                """;
        RunResult run = compare(planText, folder, parquet, 3, "near-collinear-logit-3");
        long orthogonal = 0;
        for (int v = 0; v < run.models().variantCount(); v++) {
            orthogonal += run.models().variant(run.models().variantKey(v)).glmOrthogonalPasses();
        }
        assertTrue(orthogonal > 0, "QR passes made on Spark: " + orthogonal);
        for (int s = 0; s < run.results().size(); s++) {
            assertEquals("ok", run.results().status(s), "specification " + (s + 1));
        }
    }

    /** Both runs of one plan, every specification compared; returns the Spark run. */
    static RunResult compare(String planText, Path planFolder, Path parquet, int partitions, String name) {
        SparkParityTest.Comparison c = SparkParityTest.compare(planText, planFolder, parquet, partitions);
        Plan plan = new PlanReader(false).read(planText, planFolder.toAbsolutePath());
        Table csv = new CsvTableReader().read(plan.dataFile());
        RunResult local = new MultiverseRunner(2).run(plan, csv, RunProgress.SILENT, new AtomicBoolean());
        ResultTable a = local.results();
        ResultTable b = c.spark().results();
        double[] worst = new double[5];
        long generalized = 0;
        for (int slot = 0; slot < a.size(); slot++) {
            if (!a.fitted(slot) || a.family(slot).leastSquares()) {
                continue;
            }
            generalized++;
            String where = "specification " + a.specNumber(slot);
            worst[0] = Math.max(worst[0], SparkParityTest.assertClose(a.effect(slot), b.effect(slot), RELATIVE,
                    where + " effect"));
            worst[1] = Math.max(worst[1], SparkParityTest.assertClose(a.effectStdError(slot), b.effectStdError(slot),
                    RELATIVE, where + " effect_std_error"));
            worst[2] = Math.max(worst[2], SparkParityTest.assertClose(a.deviance(slot), b.deviance(slot), RELATIVE,
                    where + " deviance"));
            worst[3] = Math.max(worst[3], SparkParityTest.assertClose(a.r2(slot), b.r2(slot), RELATIVE, where + " r2"));
            worst[4] = Math.max(worst[4], SparkParityTest.assertClose(a.modelPValue(slot), b.modelPValue(slot),
                    RELATIVE, where + " model_p_value"));
        }
        long served = 0;
        long rounds = 0;
        long passes = 0;
        for (int v = 0; v < c.spark().models().variantCount(); v++) {
            DataVariant variant = c.spark().models().variant(c.spark().models().variantKey(v));
            served += variant.glmFitsServed();
            rounds += variant.glmRounds();
            passes += variant.glmPasses();
        }
        assertTrue(generalized > 0 && served >= generalized, served + " specifications fitted from the rounds of "
                + "passes, of which at least the " + generalized + " fitted generalized linear ones");
        assertTrue(rounds > 0 && rounds < passes, rounds + " rounds (Spark jobs) for " + passes + " passes");
        SparkParityTest.report(name, c.worst());
        try {
            Files.writeString(Path.of("target/spark-reports").resolve("parity-glm-" + name + ".txt"),
                    String.format(Locale.ROOT, "largest relative difference, Spark local mode against the "
                            + "single-machine engine: estimate %.3g, std_error %.3g, p_value %.3g, effect %.3g, "
                            + "effect_std_error %.3g, deviance %.3g, r2 %.3g, model_p_value %.3g; %d generalized "
                            + "linear specifications fitted from %d rounds of %d passes%n", c.worst()[0],
                            c.worst()[1], c.worst()[2], worst[0], worst[1], worst[2], worst[3], worst[4], served,
                            rounds, passes));
        } catch (IOException e) {
            throw new java.io.UncheckedIOException(e);
        }
        return c.spark();
    }
}
