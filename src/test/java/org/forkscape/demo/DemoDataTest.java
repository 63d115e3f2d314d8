package org.forkscape.demo;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.ByteArrayOutputStream;
import java.io.IOException;
import java.io.PrintStream;
import java.io.Reader;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.function.Predicate;
import org.apache.commons.csv.CSVFormat;
import org.apache.commons.csv.CSVParser;
import org.apache.commons.csv.CSVRecord;
import org.forkscape.cli.CommandLine;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import tools.jackson.databind.JsonNode;
import tools.jackson.databind.json.JsonMapper;

/**
 * The bundled demo: the committed files are exactly what the committed generator writes, and the batch
 * command finds the effect planted in the data (the outside truth here is the generator's own
 * parameters, {@link TutoringScenario#SCORE_EFFECT_PER_HOUR} and
 * {@link TutoringScenario#LOG_FLUENCY_EFFECT_PER_HOUR}) and finds nothing in the null world.
 */
class DemoDataTest {
    private static final Path SAMPLE_DATA = Path.of("sample-data");
    private static final String SCORE = "reading score";
    private static final String FLUENCY = "log reading fluency";

    @TempDir
    static Path work;
    private static List<CSVRecord> demo;
    private static List<CSVRecord> nullWorld;
    private static JsonNode demoSummary;
    private static JsonNode nullSummary;

    @BeforeAll
    static void runBothPlans() throws IOException {
        demo = run(DemoDataGenerator.PLAN, "demo");
        nullWorld = run(DemoDataGenerator.NULL_PLAN, "null");
        JsonMapper json = JsonMapper.builder().build();
        demoSummary = json.readTree(work.resolve("demo/summary.json").toFile());
        nullSummary = json.readTree(work.resolve("null/summary.json").toFile());
    }

    @Test
    void committedFilesAreWhatTheGeneratorWrites() throws IOException {
        Path fresh = work.resolve("fresh");
        assertEquals(0, execute("demo-data", fresh.toString()));
        for (String name : DemoDataGenerator.files().keySet()) {
            assertArrayEquals(Files.readAllBytes(SAMPLE_DATA.resolve(name)), Files.readAllBytes(fresh.resolve(name)),
                    "sample-data/" + name + " differs from the generator's output; regenerate it with "
                            + "java -jar target/forkscape.jar demo-data sample-data --replace yes");
        }
    }

    @Test
    void everySpecificationOfTheDemoIsFitted() {
        assertEquals(4608, demoSummary.get("specifications").asInt());
        assertEquals(4608, demoSummary.get("fitted").asInt());
        assertEquals(4608, nullSummary.get("fitted").asInt());
    }

    @Test
    void medianEstimateOnTheRawScaleIsNearThePlantedEffect() {
        // 20%: the demo shares its noise with the null world, whose fullest specification the seed puts
        // within half a standard error of zero (TutoringScenario.SEED); half the specifications keep the
        // register errors, which attenuate the raw slope
        assertNear(TutoringScenario.SCORE_EFFECT_PER_HOUR, median(demo, rawHours(SCORE)), 0.2);
        assertNear(TutoringScenario.LOG_FLUENCY_EFFECT_PER_HOUR, median(demo, rawHours(FLUENCY)), 0.2);
    }

    @Test
    void theDemoIsSignificantlyPositiveMostOfTheTime() {
        assertTrue(share(demo, outcome(SCORE), DemoDataTest::significantPositive) > 0.9);
        assertTrue(demoSummary.get("share_significant_positive").asDouble() > 0.6);
        assertEquals(0.0, demoSummary.get("share_significant_negative").asDouble());
    }

    @Test
    void theNullWorldFindsNothing() {
        assertTrue(Math.abs(median(nullWorld, rawHours(SCORE))) < 0.2 * TutoringScenario.SCORE_EFFECT_PER_HOUR);
        assertTrue(Math.abs(median(nullWorld, rawHours(FLUENCY)))
                < 0.2 * TutoringScenario.LOG_FLUENCY_EFFECT_PER_HOUR);
        // specifications of one data set err together, so allow twice the nominal 5% rate
        double significant = nullSummary.get("share_significant_positive").asDouble()
                + nullSummary.get("share_significant_negative").asDouble();
        assertTrue(significant < 0.10, "share significant in the null world: " + significant);
    }

    @Test
    void theSeedIsTheDocumentedOne() {
        // TutoringScenario.SEED: the null world's fullest specification is within half a standard error of 0
        for (String outcome : List.of(SCORE, FLUENCY)) {
            List<CSVRecord> fullest = nullWorld.stream().filter(rawHours(outcome))
                    .filter(r -> r.get("pupil controls").equals("free_meals + attendance + home_reading")
                            && r.get("school context").equals("class size and zone")
                            && r.get("pupils").equals("all pupils")
                            && r.get("register errors").equals("within the 60-hour cap")
                            && r.get("standard errors").equals("classical") && r.get("fixed effects").equals("none"))
                    .toList();
            assertEquals(1, fullest.size());
            assertTrue(Math.abs(Double.parseDouble(fullest.get(0).get("statistic"))) < 0.5);
        }
    }

    @Test
    void trimmingTheRegisterErrorsMovesTheRawEstimateTowardTheTruth() {
        double kept = median(demo, rawHours(SCORE).and(r -> r.get("register errors").equals("keep all")));
        double trimmed = median(demo, rawHours(SCORE).and(r -> !r.get("register errors").equals("keep all")));
        double truth = TutoringScenario.SCORE_EFFECT_PER_HOUR;
        assertTrue(Math.abs(trimmed - truth) < Math.abs(kept - truth), "kept " + kept + ", trimmed " + trimmed);
    }

    @Test
    void missingSurveyCellsChangeTheRowsPerSpecification() {
        int without = nObs(r -> r.get("pupil controls").equals("none"));
        int with = nObs(r -> r.get("pupil controls").equals("home_reading"));
        assertTrue(with < without, with + " rows with the survey control, " + without + " without");
    }

    @Test
    void theLogOfTutoringHoursIsRefusedBecauseOfItsZeros() throws IOException {
        String plan = Files.readString(SAMPLE_DATA.resolve(DemoDataGenerator.PLAN))
                .replace("\"data\": \"" + DemoDataGenerator.DATA + "\"", "\"data\": \"" + SAMPLE_DATA.toAbsolutePath()
                        .resolve(DemoDataGenerator.DATA).toString().replace("\\", "\\\\") + "\"")
                .replace("\"transform\": \"standardize\"", "\"transform\": \"log\"");
        Path planFile = work.resolve("log-hours.plan.json");
        Files.writeString(planFile, plan);
        ByteArrayOutputStream err = new ByteArrayOutputStream();
        int code = CommandLine.execute(new String[] {"run", planFile.toString(), "--out", work.resolve("x").toString()},
                new PrintStream(new ByteArrayOutputStream()), new PrintStream(err, true, StandardCharsets.UTF_8));
        assertEquals(2, code);
        String message = err.toString(StandardCharsets.UTF_8);
        assertTrue(message.contains("decisions[1].alternatives[1].transform") && message.contains("\"tutoring_hours\"")
                && message.contains("<= 0"), message);
    }

    /**
     * The models plan: on the log link the Poisson coefficient estimates the planted effect on log fluency
     * (20%, as for least squares on the log above, in the rows within the 60-hour cap, where the register
     * errors do not attenuate it), and the average marginal effects of least squares and Poisson
     * regression, both in words per minute per hour, agree with each other to 10%.
     */
    @Test
    void theModelsPlanRecoversThePlantedEffectOnTheLogLink() throws IOException {
        List<CSVRecord> models = run(DemoDataGenerator.MODELS_PLAN, "models");
        assertEquals(256, models.size());
        assertTrue(models.stream().allMatch(r -> r.get("status").startsWith("ok")));
        Predicate<CSVRecord> capped = r -> r.get("tutoring").equals("hours")
                && r.get("register errors").equals("within the 60-hour cap");
        Predicate<CSVRecord> poisson = capped.and(r -> r.get("model").equals("poisson"));
        Predicate<CSVRecord> ols = capped.and(r -> r.get("model").equals("ols"));
        assertTrue(models.stream().filter(poisson).allMatch(r -> r.get("df").isEmpty()), "normal reference");
        assertNear(TutoringScenario.LOG_FLUENCY_EFFECT_PER_HOUR, median(models, poisson), 0.2);
        assertNear(medianOf(models, ols, "effect"), medianOf(models, poisson, "effect"), 0.1);
    }

    /**
     * The panel demo: every specification is fitted (two absorbed dimensions, weights, two-way clustering),
     * the site-and-season specifications of the raw outcome and hectares find the planted effect (20%) and
     * are significantly negative, while leaving out either dimension is biased as the scenario plants it
     * (StreamPanelScenario: enrolment by nitrate level, a common downward trend); site and
     * catchment-season effects lose one level per catchment, the connected components of their graph.
     */
    @Test
    void thePanelPlanRecoversThePlantedEffectWithSiteAndSeasonEffects() throws IOException {
        List<CSVRecord> panel = run(DemoDataGenerator.PANEL_PLAN, "panel");
        assertEquals(2560, panel.size());
        assertTrue(panel.stream().allMatch(r -> r.get("status").startsWith("ok")),
                panel.stream().map(r -> r.get("status")).filter(s -> !s.startsWith("ok")).findFirst().orElse(""));
        Predicate<CSVRecord> raw = r -> r.get("outcome").equals("nitrate (mg/L)")
                && r.get("buffer").equals("hectares planted");
        Predicate<CSVRecord> both = raw.and(r -> r.get("fixed effects").equals("site and season"));
        double truth = StreamPanelScenario.NITRATE_EFFECT_PER_HECTARE;
        assertNear(truth, median(panel, both), 0.2);
        assertTrue(share(panel, both, r -> Double.parseDouble(r.get("estimate")) < 0
                && Double.parseDouble(r.get("p_value")) < 0.05) > 0.9);
        for (String partial : List.of("none", "site", "season")) {
            double m = median(panel, raw.and(r -> r.get("fixed effects").equals(partial)));
            assertTrue(Math.abs(m - truth) > 2 * Math.abs(median(panel, both) - truth), partial + ": " + m);
        }
        // the same controls and rows: site + catchment-season has 8 more levels dropped than the dummies'
        // count, one per catchment; site + season one in all (the panel's graph is connected)
        Predicate<CSVRecord> same = raw.and(r -> r.get("conditions").equals("none")
                && r.get("standard errors").equals("classical") && r.get("weights").equals("unweighted"));
        int sites = StreamPanelScenario.SITES;
        int seasons = StreamPanelScenario.SEASONS;
        assertEquals(sites + seasons - 1 + 1, nParams(panel, same.and(r -> r.get("fixed effects").equals("site and season"))));
        assertEquals(sites + StreamPanelScenario.CATCHMENTS * seasons - StreamPanelScenario.CATCHMENTS + 1,
                nParams(panel, same.and(r -> r.get("fixed effects").equals("site and catchment-season"))));
    }

    private static int nParams(List<CSVRecord> rows, Predicate<CSVRecord> which) {
        List<CSVRecord> selected = rows.stream().filter(which).toList();
        assertEquals(1, selected.size());
        return Integer.parseInt(selected.get(0).get("n_params"));
    }

    private static double medianOf(List<CSVRecord> rows, Predicate<CSVRecord> which, String column) {
        double[] e = rows.stream().filter(which).mapToDouble(r -> Double.parseDouble(r.get(column))).sorted().toArray();
        assertTrue(e.length > 0);
        return e.length % 2 == 1 ? e[e.length / 2] : (e[e.length / 2 - 1] + e[e.length / 2]) / 2;
    }

    private static List<CSVRecord> run(String plan, String out) throws IOException {
        Path folder = work.resolve(out);
        assertEquals(0, execute("run", SAMPLE_DATA.resolve(plan).toString(), "--out", folder.toString()));
        try (Reader in = Files.newBufferedReader(folder.resolve("specifications.csv"), StandardCharsets.UTF_8);
                CSVParser csv = CSVParser.builder().setReader(in)
                        .setFormat(CSVFormat.RFC4180.builder().setHeader().setSkipHeaderRecord(true).get()).get()) {
            return csv.getRecords();
        }
    }

    private static int execute(String... args) {
        return CommandLine.execute(args, new PrintStream(new ByteArrayOutputStream()),
                new PrintStream(new ByteArrayOutputStream()));
    }

    private static Predicate<CSVRecord> outcome(String label) {
        return r -> r.get("outcome").equals(label);
    }

    private static Predicate<CSVRecord> rawHours(String outcomeLabel) {
        return outcome(outcomeLabel).and(r -> r.get("tutoring").equals("hours"));
    }

    private static boolean significantPositive(CSVRecord r) {
        return Double.parseDouble(r.get("estimate")) > 0 && Double.parseDouble(r.get("p_value")) < 0.05;
    }

    private static double median(List<CSVRecord> rows, Predicate<CSVRecord> which) {
        return medianOf(rows, which, "estimate");
    }

    private static double share(List<CSVRecord> rows, Predicate<CSVRecord> which, Predicate<CSVRecord> condition) {
        List<CSVRecord> selected = rows.stream().filter(which).toList();
        return selected.stream().filter(condition).count() / (double) selected.size();
    }

    private static int nObs(Predicate<CSVRecord> which) {
        List<CSVRecord> rows = new ArrayList<>(demo.stream().filter(which)
                .filter(r -> r.get("pupils").equals("all pupils") && r.get("register errors").equals("keep all")
                        && r.get("school context").equals("none"))
                .toList());
        int[] counts = rows.stream().mapToInt(r -> Integer.parseInt(r.get("n_obs"))).distinct().toArray();
        assertEquals(1, counts.length, "one row count per choice of controls: " + Arrays.toString(counts));
        return counts[0];
    }

    private static void assertNear(double expected, double actual, double relative) {
        assertTrue(Math.abs(actual - expected) <= relative * Math.abs(expected),
                "expected within " + relative * 100 + "% of " + expected + ", found " + actual);
    }
}
