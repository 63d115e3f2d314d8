package org.forkscape.run;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.ByteArrayOutputStream;
import java.io.IOException;
import java.io.PrintStream;
import java.io.Reader;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.function.Predicate;
import java.util.function.ToDoubleFunction;
import org.apache.commons.csv.CSVFormat;
import org.apache.commons.csv.CSVRecord;
import org.forkscape.cli.CommandLine;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import tools.jackson.databind.JsonNode;
import tools.jackson.databind.json.JsonMapper;

/**
 * summary.json's {@code reported} section from the batch command on the demo data, each number
 * recomputed here with plain loops over the specifications.csv the same run wrote (Commons CSV reads it):
 * the rank counted from the smallest, the percentile rank with ties counted half (common practice), the
 * shares smaller and significant in the same sign, within the comparable group (outcome x key coding x
 * model as fitted; outcome x key coding for the average marginal effect) and among every specification on
 * the unit-free scales. The partial correlation is t / sqrt(t^2 + df) (Greene 2012, Econometric Analysis,
 * 7th ed., chapter 3), recomputed from the written statistic and df.
 */
class ReportedSummaryTest {
    private static final Path DEMO = Path.of("sample-data");
    private static final String REPORTED = """
            "reported": {"outcome": "reading fluency", "tutoring": "hours, winsorized 5%",
              "pupil controls": "home_reading + free_meals", "register errors": "within the 60-hour cap",
              "standard errors": "cluster:school", "fixed effects": "zone", "model": "ols"},
            """;

    @TempDir
    Path dir;

    @Test
    void everyPlaceMatchesTheWrittenSpecifications() throws IOException {
        JsonNode summary = run("");
        JsonNode reported = summary.get("reported");
        List<CSVRecord> rows = specifications();
        CSVRecord own = rows.stream().filter(r -> r.get("tutoring").equals("hours, winsorized 5%")
                && r.get("pupil controls").equals("free_meals + home_reading")
                && r.get("register errors").equals("within the 60-hour cap")
                && r.get("standard errors").equals("cluster:school") && r.get("fixed effects").equals("zone")
                && r.get("model").equals("ols")).findFirst().orElseThrow();
        assertEquals(Long.parseLong(own.get("spec")), reported.get("spec").longValue());
        assertTrue(reported.get("in_run").booleanValue());
        assertEquals("ok", reported.get("status").stringValue());
        assertEquals(Double.parseDouble(own.get("estimate")), reported.get("estimate").doubleValue(), 0);
        assertEquals(Double.parseDouble(own.get("p_value")), reported.get("p_value").doubleValue(), 0);
        assertEquals("free_meals + home_reading", reported.get("labels").get("pupil controls").stringValue());

        List<CSVRecord> fitted = rows.stream().filter(r -> r.get("status").equals("ok")).toList();
        JsonNode scales = reported.get("scales");
        // as fitted, the group fixes the model: the 64 least-squares specifications with this coding
        Predicate<CSVRecord> group = r -> r.get("tutoring").equals("hours, winsorized 5%") && r.get("model").equals("ols");
        check(scales.get("as_fitted"), fitted.stream().filter(group).toList(), own, r -> number(r, "estimate"));
        assertEquals(64, scales.get("as_fitted").get("specifications").intValue());
        // the average marginal effect puts Poisson and least squares together: 128
        Predicate<CSVRecord> coding = r -> r.get("tutoring").equals("hours, winsorized 5%");
        check(scales.get("average_marginal_effect"), fitted.stream().filter(coding).toList(), own,
                r -> number(r, "effect"));
        assertEquals(128, scales.get("average_marginal_effect").get("specifications").intValue());
        // the standardized coefficient and the partial correlation are defined for least squares only
        Predicate<CSVRecord> leastSquares = r -> r.get("model").equals("ols");
        check(scales.get("standardized"), fitted.stream().filter(leastSquares).toList(), own,
                r -> number(r, "std_estimate"));
        check(scales.get("partial_correlation"), fitted.stream().filter(leastSquares).toList(), own,
                r -> number(r, "statistic") / Math.sqrt(number(r, "statistic") * number(r, "statistic")
                        + number(r, "df")));
        check(scales.get("t_statistic"), fitted, own, r -> number(r, "statistic"));
        assertEquals(fitted.size(), scales.get("t_statistic").get("specifications").intValue());
    }

    @Test
    void aSampleSaysWhetherItHoldsTheReportedSpecification() throws IOException {
        JsonNode reported = run("\"sample\": 20, \"seed\": 5,").get("reported");
        long spec = reported.get("spec").longValue();
        boolean inSample = specifications().stream().anyMatch(r -> Long.parseLong(r.get("spec")) == spec);
        assertEquals(inSample, reported.get("in_run").booleanValue());
        assertFalse(inSample, "seed 5 was picked for a sample without the reported specification");
        assertTrue(reported.get("note").stringValue().contains("does not hold the reported one"));
        assertFalse(reported.has("estimate"));
    }

    /** The place the summary gives against the one counted here over {@code set} on one scale. */
    private static void check(JsonNode place, List<CSVRecord> set, CSVRecord own, ToDoubleFunction<CSVRecord> value) {
        double v = value.applyAsDouble(own);
        int below = 0;
        int tied = 0;
        int sameSign = 0;
        for (CSVRecord r : set) {
            double x = value.applyAsDouble(r);
            if (x < v) {
                below++;
            }
            if (x == v) {
                tied++;
            }
            if (number(r, "p_value") < 0.05 && Math.signum(x) == Math.signum(v)) {
                sameSign++;
            }
        }
        int n = set.size();
        assertEquals(v, place.get("value").doubleValue(), 1e-15 * Math.abs(v));
        assertEquals(n, place.get("specifications").intValue());
        assertEquals(below + 1, place.get("rank").intValue());
        assertEquals(100.0 * (below + tied / 2.0) / n, place.get("percentile").doubleValue(), 1e-12);
        assertEquals(below / (double) n, place.get("share_smaller").doubleValue(), 1e-15);
        assertEquals((n - below - tied) / (double) n, place.get("share_larger").doubleValue(), 1e-15);
        assertEquals(sameSign / (double) n, place.get("share_significant_same_sign").doubleValue(), 1e-15);
    }

    private static double number(CSVRecord r, String column) {
        return Double.parseDouble(r.get(column));
    }

    private JsonNode run(String extraKeys) throws IOException {
        Files.copy(DEMO.resolve("civic-demo.csv"), dir.resolve("civic-demo.csv"));
        String plan = Files.readString(DEMO.resolve("civic-demo-models.plan.json"), StandardCharsets.UTF_8)
                .replaceFirst("\"data\":", REPORTED + extraKeys + " \"data\":");
        Path planFile = dir.resolve("plan.json");
        Files.writeString(planFile, plan);
        ByteArrayOutputStream err = new ByteArrayOutputStream();
        int code = CommandLine.execute(new String[] {"run", planFile.toString(), "--out", dir.resolve("out").toString()},
                new PrintStream(new ByteArrayOutputStream(), true, StandardCharsets.UTF_8),
                new PrintStream(err, true, StandardCharsets.UTF_8));
        assertEquals(0, code, err.toString(StandardCharsets.UTF_8));
        return JsonMapper.builder().build().readTree(dir.resolve("out").resolve(RunOutputs.SUMMARY).toFile());
    }

    private List<CSVRecord> specifications() throws IOException {
        try (Reader in = Files.newBufferedReader(dir.resolve("out").resolve(RunOutputs.SPECIFICATIONS))) {
            return new ArrayList<>(CSVFormat.DEFAULT.builder().setHeader().setSkipHeaderRecord(true).get().parse(in)
                    .getRecords());
        }
    }
}
