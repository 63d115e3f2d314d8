package org.forkscape.spark;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.ByteArrayOutputStream;
import java.io.IOException;
import java.io.PrintStream;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.concurrent.atomic.AtomicBoolean;
import java.util.stream.Stream;
import org.apache.commons.csv.CSVFormat;
import org.apache.commons.csv.CSVRecord;
import org.apache.spark.sql.SparkSession;
import org.forkscape.InputException;
import org.forkscape.data.DataFiles;
import org.forkscape.data.Table;
import org.forkscape.fit.BootstrapByParts;
import org.forkscape.fit.BootstrapDesign;
import org.forkscape.fit.DataVariant;
import org.forkscape.fit.DrawFit;
import org.forkscape.fit.KeyFit;
import org.forkscape.fit.PartsOfTable;
import org.forkscape.fit.PoissonCounts;
import org.forkscape.fit.RowPassesByParts;
import org.forkscape.fit.SpecificationFitter;
import org.forkscape.fit.SpecificationModel;
import org.forkscape.fit.VariantKey;
import org.forkscape.infer.NullDrawSettings;
import org.forkscape.infer.RunVariants;
import org.forkscape.plan.Plan;
import org.forkscape.plan.PlanReader;
import org.forkscape.run.MultiverseRunner;
import org.forkscape.run.RunProgress;
import org.forkscape.run.RunResult;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * Null draws on Spark (local mode), the Poisson bootstrap by partitions, on invented pupils in schools written to
 * Parquet in 4 part files. (a) The same draws at 1, 3 and 8 partitions: each draw's counts are a function of the
 * rows' identities (file name, row index), so every draw's rows per specification (n_obs) and degrees of freedom
 * are identical; estimates and standard errors agree within {@value #RELATIVE} relative, not bit for bit, since
 * the partitions' sums are added in a different grouping (the same partitioning gives the same bits). (b) Each
 * Spark draw's fits equal one machine's with the same counts: the Parquet parts read back by the single-machine
 * reader, each row's identity from its part's name and index, the counts computed in plain Java and the rows
 * repeated by {@code fit.ResampledVariant}, within {@value #RELATIVE} (common practice for two exact routes in
 * double precision). For single rows, for whole schools (each drawn copy a new cluster), and for whole schools
 * beside errors clustered on classes (within schools: new classes in each copy) and on districts (copies stay). (c) The batch
 * command writes the draws' files, the same at 3 and 8 partitions. (e) Logit draws: every draw's logit fits, each
 * pass over the draw's partitions, the same at 1 and 3 partitions and as one machine's with the same counts, and
 * through the command, the same files at 1 and 3 partitions. (d) What the draws cannot do on Spark is
 * refused at its JSON path, and data whose files share a name (so that their rows would share identities). The calibration of this bootstrap is {@code infer.PoissonBootstrapCalibrationTest}'s.
 */
class SparkNullDrawsTest {
    static final double RELATIVE = 1e-10;
    static final int DRAWS = 6;

    static SparkSession spark;
    @TempDir
    static Path folder;
    static Path parquet;
    /** The Parquet parts read back on one machine, in part-name order, and each row's identity. */
    static Table readBack;
    static long[] rowKeys;
    /** The same for invented pupils with a 0/1 outcome ({@link PartsOfTable#glmSchools}), for logit draws. */
    static Path glmParquet;
    static Table glmReadBack;
    static long[] glmRowKeys;

    /** A small logit plan: two controls, the district absorbed or not, classical and school-clustered errors. */
    static final String LOGIT_PLAN = """
            {"data": "schools.csv",
             "decisions": [
               {"name": "outcome", "kind": "outcome", "alternatives": [{"label": "passed", "column": "passed"}]},
               {"name": "key", "kind": "predictor", "alternatives": [{"label": "x", "column": "x"}]},
               {"name": "controls", "kind": "controls", "optional": ["a", "b"]},
               {"name": "model", "kind": "model", "alternatives": ["logit"]},
               {"name": "effects", "kind": "absorb", "alternatives": [
                  {"label": "none", "columns": []}, {"label": "district", "columns": ["district"]}]},
               {"name": "errors", "kind": "errors", "alternatives": ["classical", "cluster:school"]}
             ]}
            """;

    @BeforeAll
    static void start() throws IOException {
        ((ch.qos.logback.classic.Logger) org.slf4j.LoggerFactory.getLogger(org.slf4j.Logger.ROOT_LOGGER_NAME))
                .setLevel(ch.qos.logback.classic.Level.WARN);
        spark = SparkSession.builder().master("local[2]").appName("forkscape-spark-draws-test")
                .config("spark.ui.enabled", "false").config("spark.sql.shuffle.partitions", "4").getOrCreate();
        parquet = ParquetCopy.write(spark, PartsOfTable.schools(5, 24, 12, 0.3, 0.1), folder.resolve(
                "schools.parquet"), 4);
        readBack = DataFiles.read(parquet);
        rowKeys = identities(parquet, readBack);
        glmParquet = ParquetCopy.write(spark, PartsOfTable.glmSchools(71, 30), folder.resolve("glm-schools.parquet"),
                4);
        glmReadBack = DataFiles.read(glmParquet);
        glmRowKeys = identities(glmParquet, glmReadBack);
    }

    /** Each row's identity in the Parquet parts read back as {@code readBack}: its part's name and index. */
    private static long[] identities(Path parquet, Table readBack) throws IOException {
        List<Path> files;
        try (Stream<Path> list = Files.list(parquet)) {
            files = list.filter(f -> f.getFileName().toString().endsWith(".parquet")).sorted().toList();
        }
        assertEquals(4, files.size(), "part files");
        long[] keys = new long[readBack.rowCount()];
        int r = 0;
        for (Path f : files) {
            long name = PoissonCounts.textHash(f.getFileName().toString());
            int rows = DataFiles.read(f).rowCount();
            for (int i = 0; i < rows; i++) {
                keys[r++] = PoissonCounts.rowKey(name, i);
            }
        }
        assertEquals(readBack.rowCount(), r);
        return keys;
    }

    @AfterAll
    static void stop() {
        spark.stop();
    }

    static String withDraws(String plan, String nullCluster) {
        return plan.replace("{\"data\": \"schools.csv\",", "{\"data\": \"schools.csv\", \"nullDraws\": " + DRAWS
                + ", \"seed\": 41, \"nullCluster\": \"" + nullCluster + "\",");
    }

    @Test
    void rowDrawsAreTheSameOnEveryPartitioningAndAsOneMachine() {
        SparkParityTest.report("draws-rows", sameDraws(withDraws(PartsOfTable.ROWS_PLAN, "rows"), null));
    }

    @Test
    void hc3DrawsAreTheSameOnEveryPartitioningAndAsOneMachine() {
        // HC3, and HC1 beside the absorbed district: the draws' row passes over each draw's partitions
        SparkParityTest.report("draws-hc3", sameDraws(withDraws(PartsOfTable.SCHOOLS_PLAN.replace("[\"classical\"",
                "[\"HC1\", \"HC3\""), "school"), "school"));
        assertTrue(rowPasses > 0, rowPasses + " draw fits from row passes");
    }

    @Test
    void schoolDrawsAreTheSameOnEveryPartitioningAndAsOneMachine() {
        SparkParityTest.report("draws-schools", sameDraws(withDraws(PartsOfTable.SCHOOLS_PLAN, "school"), "school"));
    }

    @Test
    void schoolDrawsMakeNewClassesOnEveryPartitioningAsOneMachineDoes() {
        SparkParityTest.report("draws-classes", sameDraws(withDraws(PartsOfTable.CLASSES_PLAN, "school"), "school"));
    }

    /**
     * Two-way clusters beside whole schools: the intersections of the school and of its classes with the
     * district are nested in the schools, so each drawn copy makes new clusters of them, as one machine does.
     */
    @Test
    void multiwayDrawsAreTheSameOnEveryPartitioningAndAsOneMachine() {
        SparkParityTest.report("draws-multiway", sameDraws(withDraws(PartsOfTable.CLASSES_PLAN.replace(
                "[\"cluster:class\", \"cluster:district\"]", "[\"cluster:school+district\", \"cluster:class+district\"]"),
                "school"), "school"));
    }

    /**
     * Analytic weights in the draws: the district's number as a weight (0 to 6, so the rows of district 0 drop
     * out), the draw's weights the counts times them, HC1 from the weighted fourth moments, school clusters
     * from the weighted cells, HC3 from weighted row passes over each draw's partitions.
     */
    @Test
    void weightedDrawsAreTheSameOnEveryPartitioningAndAsOneMachine() {
        String plan = withDraws(PartsOfTable.ROWS_PLAN.replace("{\"name\": \"errors\", \"kind\": \"errors\", "
                + "\"alternatives\": [\"classical\", \"HC1\", \"cluster:school\"]}", "{\"name\": \"weights\", "
                + "\"kind\": \"weights\", \"alternatives\": [{\"label\": \"by district\", \"column\": "
                + "\"district\"}]}, {\"name\": \"errors\", \"kind\": \"errors\", \"alternatives\": [\"HC1\", "
                + "\"HC3\", \"cluster:school\"]}"), "rows");
        assertTrue(plan.contains("\"by district\""), "the plan edit took");
        SparkParityTest.report("draws-weighted", sameDraws(plan, null));
        assertTrue(rowPasses > 0, rowPasses + " weighted draw fits from row passes");
    }

    /**
     * Logit beside whole schools: every draw's fits refit by the single-machine estimator, each pass summed over
     * the draw's partitions (each row repeated by its count, each drawn copy of a school a new school), the same
     * at 1 and 3 partitions and as one machine's with the same counts.
     */
    @Test
    void logitDrawsAreTheSameOnEveryPartitioningAndAsOneMachine() {
        SparkParityTest.report("draws-logit", sameDraws(withDraws(LOGIT_PLAN, "school"), "school", glmParquet,
                glmReadBack, glmRowKeys, new int[] {1, 3}));
        assertTrue(glmFits > 0, glmFits + " draw fits from the passes over the draws' partitions");
    }

    /** Specifications fitted by row passes over a draw's partitions in the last {@link #sameDraws}. */
    private static long rowPasses;
    /** Generalized linear fits whose passes went to a draw's partitions in the last {@link #sameDraws}. */
    private static long glmFits;

    private static double[] sameDraws(String planText, String resampled) {
        return sameDraws(planText, resampled, parquet, readBack, rowKeys, new int[] {1, 3, 8});
    }

    /**
     * Every specification in every draw: fits at each of {@code partitionings} and on one machine.
     *
     * @return the largest relative differences from one machine: estimate, standard error, p-value
     */
    private static double[] sameDraws(String planText, String resampled, Path data, Table readBack, long[] rowKeys,
            int[] partitionings) {
        double[] worst = new double[3];
        rowPasses = 0;
        glmFits = 0;
        Plan plan = new PlanReader(false).read(planText, folder);
        BootstrapDesign design = new BootstrapDesign(plan.seed(), resampled);
        assertEquals(resampled, NullDrawSettings.of(plan).clusterColumn());
        RunResult inMemory = new MultiverseRunner(1).run(plan, readBack, RunProgress.SILENT, new AtomicBoolean());
        int predictors = plan.predictor().alternatives().size();
        KeyFit[][][] first = null;
        int compared = 0;
        for (int partitions : partitionings) {
            RunResult run = sparkRun(planText, data, partitions);
            RunVariants indexed = RunVariants.of(run);
            BootstrapByParts draws = run.models().bootstrap(design);
            assertTrue(draws != null, "the Spark runner makes its draws by partitions");
            KeyFit[][][] fits = new KeyFit[indexed.variantCount()][][];
            SpecificationFitter fitter = new SpecificationFitter().deferringRowPasses();
            for (int v = 0; v < indexed.variantCount(); v++) {
                int[] specs = indexed.specificationsOf(v);
                if (specs.length == 0) {
                    continue;
                }
                VariantKey key = run.models().variantKey(v);
                DataVariant observed = indexed.variant(v);
                assertFalse(observed.holdsRows(), "Spark's variants hold statistics, not rows");
                assertTrue(draws.drawsPerPass(observed) >= DRAWS, "all draws in one pass");
                DataVariant[] inDraw = draws.draws(key, observed, 0, DRAWS);
                List<SpecificationModel> models = new ArrayList<>();
                for (int i : specs) {
                    models.add(indexed.model(i));
                }
                fits[v] = new KeyFit[DRAWS][specs.length];
                for (int d = 0; d < DRAWS; d++) {
                    DrawFit[] one = PartsOfTable.oneMachine(inMemory.models().variant(key), predictors, models,
                            readBack, rowKeys, design, d);
                    // as the null draws fit them, the row passes by batches over the draw's partitions
                    long served = inDraw[d].rowPassesServed();
                    KeyFit[] drawFits = RowPassesByParts.fitEach(fitter, inDraw[d], models, () -> { });
                    rowPasses += inDraw[d].rowPassesServed() - served;
                    glmFits += inDraw[d].glmFitsServed();
                    for (int s = 0; s < specs.length; s++) {
                        KeyFit fit = drawFits[s];
                        assertTrue(fit != null, "a row pass refused by partitions");
                        fits[v][d][s] = fit;
                        String where = partitions + " partitions, variant " + v + ", draw " + d + ", specification "
                                + run.results().specNumber(indexed.slot(specs[s]));
                        boolean fitted = fit.ok() && fit.stdError() > 0;
                        assertEquals(one[s] != null && one[s].stdError() > 0, fitted, where + ": fitted");
                        if (!fitted) {
                            continue;
                        }
                        worst[0] = Math.max(worst[0], close(one[s].estimate(), fit.estimate(), where
                                + " estimate against one machine"));
                        worst[1] = Math.max(worst[1], close(one[s].stdError(), fit.stdError(), where
                                + " std_error against one machine"));
                        worst[2] = Math.max(worst[2], close(p(one[s].estimate(), one[s].stdError(), one[s].df()),
                                p(fit.estimate(), fit.stdError(), fit.df()), where + " p-value against one machine"));
                        assertEquals(one[s].df(), fit.df(), 0.0, where + " df against one machine");
                        compared++;
                        if (first != null) {
                            KeyFit f = first[v][d][s];
                            assertEquals(f.nObs(), fit.nObs(), where + " n_obs against 1 partition");
                            assertEquals(f.df(), fit.df(), 0.0, where + " df against 1 partition");
                            close(f.estimate(), fit.estimate(), where + " estimate against 1 partition");
                            close(f.stdError(), fit.stdError(), where + " std_error against 1 partition");
                        }
                    }
                }
            }
            if (first == null) {
                first = fits;
            }
        }
        assertTrue(compared > partitionings.length * DRAWS * 4, compared + " fits compared");
        return worst;
    }

    /** The two-sided t p-value of a fit (Commons Math's t distribution), as the draws score their fits. */
    private static double p(double estimate, double stdError, double df) {
        double t = Math.abs(estimate / stdError);
        return 2 * new org.apache.commons.math3.distribution.TDistribution(null, df).cumulativeProbability(-t);
    }

    @Test
    void theCommandWritesTheDrawsFilesTheSameOnThreeAndEightPartitions() throws IOException {
        Path plan = folder.resolve("schools-plan.json");
        // with HC3 beside classical and school errors: the draws' row passes through the command too
        Files.writeString(plan, withDraws(PartsOfTable.SCHOOLS_PLAN.replace("[\"classical\"", "[\"HC3\", \"classical\""),
                "school").replace("\"nullDraws\": " + DRAWS, "\"nullDraws\": 40"));
        List<List<CSVRecord>> files = new ArrayList<>();
        List<com.fasterxml.jackson.databind.JsonNode> summaries = new ArrayList<>();
        for (int partitions : new int[] {3, 8}) {
            Path out = folder.resolve("draws-" + partitions);
            assertEquals(0, SparkRun.execute(new String[] {"run", plan.toString(), "--out", out.toString(), "--data",
                    parquet.toString(), "--partitions", String.valueOf(partitions)}));
            try (var reader = Files.newBufferedReader(out.resolve("null-draws.csv"))) {
                files.add(CSVFormat.DEFAULT.parse(reader).getRecords());
            }
            summaries.add(new com.fasterxml.jackson.databind.ObjectMapper().readTree(out.resolve("summary.json")
                    .toFile()));
        }
        assertEquals(41, files.get(0).size(), "a header and 40 draws");
        assertEquals(files.get(0).size(), files.get(1).size());
        for (int r = 0; r < files.get(0).size(); r++) {
            for (int c = 0; c < files.get(0).get(r).size(); c++) {
                String a = files.get(0).get(r).get(c);
                String b = files.get(1).get(r).get(c);
                if (r == 0 || a.equals(b) || !a.matches("-?[0-9.eE+-]+")) {
                    assertEquals(a, b, "null-draws.csv row " + r + ", column " + c);
                } else {
                    close(Double.parseDouble(a), Double.parseDouble(b), "null-draws.csv row " + r + ", column " + c);
                }
            }
        }
        var n3 = summaries.get(0).get("null");
        var n8 = summaries.get(1).get("null");
        assertEquals("bootstrap", n3.get("method").asText());
        assertEquals("school", n3.get("cluster").asText());
        assertEquals(40, n3.get("draws").asInt());
        assertTrue(n3.get("warning").isNull(), "whole schools keep the errors' clusters: no warning");
        for (String test : List.of("median", "share_significant", "stouffer")) {
            assertEquals(n3.get("tests").get(test).toString(), n8.get("tests").get(test).toString(), test);
        }
    }

    /**
     * A logit plan with null draws through the batch command: it writes null-draws.csv and summary.json, the same
     * at 1 and 3 partitions (numbers within {@value #RELATIVE}, the joint tests exactly), its observed fits
     * every one logit.
     */
    @Test
    void theCommandWritesLogitDrawsTheSameOnOneAndThreePartitions() throws IOException {
        Path plan = folder.resolve("logit-plan.json");
        Files.writeString(plan, withDraws(LOGIT_PLAN, "school").replace("\"nullDraws\": " + DRAWS,
                "\"nullDraws\": 20"));
        List<List<CSVRecord>> files = new ArrayList<>();
        List<com.fasterxml.jackson.databind.JsonNode> summaries = new ArrayList<>();
        for (int partitions : new int[] {1, 3}) {
            Path out = folder.resolve("logit-draws-" + partitions);
            assertEquals(0, SparkRun.execute(new String[] {"run", plan.toString(), "--out", out.toString(), "--data",
                    glmParquet.toString(), "--partitions", String.valueOf(partitions)}));
            try (var reader = Files.newBufferedReader(out.resolve("null-draws.csv"))) {
                files.add(CSVFormat.DEFAULT.parse(reader).getRecords());
            }
            summaries.add(new com.fasterxml.jackson.databind.ObjectMapper().readTree(out.resolve("summary.json")
                    .toFile()));
            try (var reader = Files.newBufferedReader(out.resolve("specifications.csv"))) {
                List<CSVRecord> specs = CSVFormat.DEFAULT.builder().setHeader().setSkipHeaderRecord(true).build()
                        .parse(reader).getRecords();
                assertEquals(16, specs.size(), "every specification fitted (2^2 control sets, 2 absorbs, 2 error types)");
                for (CSVRecord r : specs) {
                    assertEquals("logit", r.get("model"), "specification " + r.get("spec"));
                }
            }
        }
        assertEquals(21, files.get(0).size(), "a header and 20 draws");
        assertEquals(files.get(0).size(), files.get(1).size());
        for (int r = 0; r < files.get(0).size(); r++) {
            for (int c = 0; c < files.get(0).get(r).size(); c++) {
                String a = files.get(0).get(r).get(c);
                String b = files.get(1).get(r).get(c);
                if (r == 0 || a.equals(b) || !a.matches("-?[0-9.eE+-]+")) {
                    assertEquals(a, b, "null-draws.csv row " + r + ", column " + c);
                } else {
                    close(Double.parseDouble(a), Double.parseDouble(b), "null-draws.csv row " + r + ", column " + c);
                }
            }
        }
        var n1 = summaries.get(0).get("null");
        var n3 = summaries.get(1).get("null");
        assertEquals("bootstrap", n1.get("method").asText());
        assertEquals(20, n1.get("draws").asInt());
        for (String test : List.of("median", "share_significant", "stouffer")) {
            assertEquals(n1.get("tests").get(test).toString(), n3.get("tests").get(test).toString(), test);
        }
    }

    @Test
    void refusesWhatTheDrawsCannotDoAtItsPath() {
        Plan permute = plan(withDraws(PartsOfTable.ROWS_PLAN, "rows").replace("\"seed\": 41,",
                "\"seed\": 41, \"nullMethod\": \"permute\","));
        InputException e = assertThrows(InputException.class, () -> SparkRefusals.check(permute));
        assertEquals("nullMethod", e.where());
        assertTrue(e.problem().startsWith("permutation draws are not made on Spark"), e.problem());
        assertTrue(e.problem().contains("use the bootstrap"), e.problem());

        // the error types that need the row passes are computed beside draws too
        SparkRefusals.check(plan(withDraws(PartsOfTable.ROWS_PLAN, "rows").replace("\"HC1\"", "\"HC3\"")));
        SparkRefusals.check(plan(withDraws(PartsOfTable.SCHOOLS_PLAN, "school").replace("\"classical\", \"cluster",
                "\"HC1\", \"cluster")));
        // and draws on what Spark computes are not
        SparkRefusals.check(plan(withDraws(PartsOfTable.ROWS_PLAN, "rows")));
        SparkRefusals.check(plan(withDraws(PartsOfTable.SCHOOLS_PLAN, "school")));
        SparkRefusals.check(plan(withDraws(PartsOfTable.ROWS_PLAN, "district")));
        // generalized linear models beside the draws are refit in every draw
        SparkRefusals.check(plan(withDraws(LOGIT_PLAN, "school")));
    }

    @Test
    void theCommandRefusesPermutationDrawsInOneLine() throws IOException {
        Path plan = folder.resolve("permute-plan.json");
        Files.writeString(plan, withDraws(PartsOfTable.ROWS_PLAN, "rows"));
        Path out = folder.resolve("permute");
        ByteArrayOutputStream err = new ByteArrayOutputStream();
        PrintStream was = System.err;
        int code;
        System.setErr(new PrintStream(err, true, StandardCharsets.UTF_8));
        try {
            code = SparkRun.execute(new String[] {"run", plan.toString(), "--out", out.toString(), "--data",
                    parquet.toString(), "--null-method", "permute"});
        } finally {
            System.setErr(was);
        }
        assertEquals(2, code);
        String message = err.toString(StandardCharsets.UTF_8).trim();
        assertTrue(message.startsWith("forkscape: permute-plan.json, nullMethod: permutation draws are not made on "
                + "Spark"), message);
        assertEquals(1, message.lines().count(), message);
        assertFalse(Files.exists(out.resolve("specifications.csv")));
    }

    @Test
    void refusesFilesThatShareANameBeforeAnyWork() throws IOException {
        // a partitioned data set whose folders hold part files of the same name
        Path shared = folder.resolve("shared-names.parquet");
        Path part;
        try (Stream<Path> list = Files.list(parquet)) {
            part = list.filter(f -> f.getFileName().toString().endsWith(".parquet")).sorted().findFirst().orElseThrow();
        }
        for (String k : List.of("k=1", "k=2")) {
            Files.createDirectories(shared.resolve(k));
            Files.copy(part, shared.resolve(k).resolve(part.getFileName()));
        }
        String planText = withDraws(PartsOfTable.ROWS_PLAN, "rows");
        SparkData data = new SparkData(spark, shared.toString(), 0, planText, folder);
        InputException e = assertThrows(InputException.class, () -> data.table(plan(planText)));
        assertEquals("data", e.where());
        assertTrue(e.problem().contains("two files of " + shared + " are named \"" + part.getFileName() + "\""),
                e.problem());
        // without null draws the names do not matter
        String noDraws = PartsOfTable.ROWS_PLAN;
        assertEquals(2 * DataFiles.read(part).rowCount(), new SparkData(spark, shared.toString(), 0, noDraws, folder)
                .table(plan(noDraws)).rowCount());
    }

    private static Plan plan(String text) {
        return new PlanReader(false).read(text, folder);
    }

    static RunResult sparkRun(String planText, Path parquet, int partitions) {
        Plan plan = new PlanReader(false).read(planText, folder);
        SparkData data = new SparkData(spark, parquet.toString(), partitions, planText, folder);
        Table columns = data.table(plan);
        return new MultiverseRunner(2).withVariants(data.variants(plan, columns)).run(plan, columns,
                RunProgress.SILENT, new AtomicBoolean());
    }

    private static double close(double expected, double actual, String what) {
        return SparkParityTest.assertClose(expected, actual, RELATIVE, what);
    }
}
