package org.forkscape.fit;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNotNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.Reader;
import java.net.URISyntaxException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;
import org.apache.commons.csv.CSVFormat;
import org.apache.commons.csv.CSVParser;
import org.apache.commons.csv.CSVRecord;
import org.forkscape.data.CsvTableReader;
import org.forkscape.data.Table;
import org.forkscape.plan.Plan;
import org.forkscape.plan.PlanReader;
import org.forkscape.run.MultiverseRunner;
import org.forkscape.run.ResultTable;
import org.forkscape.run.RunProgress;
import org.forkscape.run.RunResult;
import org.junit.jupiter.api.Test;

/**
 * Every coefficient of a full fit against R 4.2.2's lm with standard errors from the sandwich package
 * 3.0.2 (vcov, vcovHC HC0-HC3, vcovCL type HC1 for CR1), values written by src/test/r/full-fit-reference.R
 * on R's longley and mtcars data; and the key coefficient against the engine's own estimate and standard
 * error for the same specification.
 */
class FullFitterTest {
    /** Order of the errors decision in every plan below, as named in the reference file. */
    private static final List<String> ERRORS = List.of("classical", "HC0", "HC1", "HC2", "HC3", "cluster");

    @Test
    void longleyMatchesLmAndSandwich() throws Exception {
        String plan = """
                {"data": "longley.csv", "decisions": [
                  {"name": "outcome", "kind": "outcome", "alternatives": [{"label": "employed", "column": "Employed"}]},
                  {"name": "key", "kind": "predictor", "alternatives": [{"label": "gnp", "column": "GNP"}]},
                  {"name": "controls", "kind": "controls",
                   "required": ["GNP.deflator", "Unemployed", "Armed.Forces", "Population", "Year"]},
                  {"name": "se", "kind": "errors",
                   "alternatives": ["classical", "HC0", "HC1", "HC2", "HC3", "cluster:block"]}]}""";
        // Longley's design is nearly collinear (condition number near 1e9 before centering): two QR codes
        // agree to eight digits there, not to the last bit; the worst seen is 1.5e-8, on the HC2 intercept,
        // where dividing by 1 - h_i amplifies the leverages' rounding
        check("longley", plan, 5e-8);
    }

    @Test
    void absorbedFixedEffectsMatchExplicitDummies() throws Exception {
        String plan = """
                {"data": "mtcars.csv", "decisions": [
                  {"name": "outcome", "kind": "outcome", "alternatives": [{"label": "mpg", "column": "mpg"}]},
                  {"name": "key", "kind": "predictor", "alternatives": [{"label": "weight", "column": "wt"}]},
                  {"name": "controls", "kind": "controls", "required": ["hp"]},
                  {"name": "se", "kind": "errors",
                   "alternatives": ["classical", "HC0", "HC1", "HC2", "HC3", "cluster:gear"]},
                  {"name": "fe", "kind": "absorb", "alternatives": [{"label": "cylinders", "columns": ["cyl"]}]}]}""";
        check("mtcars-absorb-cyl", plan, 1e-10);
    }

    @Test
    void sampleRuleAndCategoricalControlMatchLm() throws Exception {
        String plan = """
                {"data": "mtcars.csv", "decisions": [
                  {"name": "outcome", "kind": "outcome", "alternatives": [{"label": "mpg", "column": "mpg"}]},
                  {"name": "key", "kind": "predictor", "alternatives": [{"label": "axle ratio", "column": "drat"}]},
                  {"name": "controls", "kind": "controls", "required": ["qsec", "engine"]},
                  {"name": "rows", "kind": "sample", "alternatives": [{"label": "automatic", "keep": "am == 0"}]},
                  {"name": "se", "kind": "errors",
                   "alternatives": ["classical", "HC0", "HC1", "HC2", "HC3", "cluster:gear"]}]}""";
        check("mtcars-automatic", plan, 1e-10);
    }

    @Test
    void specificationWithoutFitSaysWhy() throws Exception {
        String plan = """
                {"data": "mtcars.csv", "decisions": [
                  {"name": "outcome", "kind": "outcome", "alternatives": [{"label": "mpg", "column": "mpg"}]},
                  {"name": "key", "kind": "predictor", "alternatives": [{"label": "weight", "column": "wt"}]},
                  {"name": "rows", "kind": "sample", "alternatives": [{"label": "two rows", "keep": "mpg > 30"}]},
                  {"name": "controls", "kind": "controls", "required": ["hp", "qsec"]}]}""";
        Path folder = resources();
        Plan p = new PlanReader(false).read(plan, folder);
        Table table = new CsvTableReader().read(p.dataFile());
        FullFit fit = new FullFitter().fit(p, new SpecificationModels(p, table), 0);
        assertFalse(fit.ok());
        assertTrue(fit.coefficients().isEmpty());
        assertTrue(fit.status().startsWith("too few rows"), fit.status());
    }

    private void check(String caseName, String planJson, double tolerance) throws Exception {
        Plan plan = new PlanReader(false).read(planJson, resources());
        Table table = new CsvTableReader().read(plan.dataFile());
        SpecificationModels models = new SpecificationModels(plan, table);
        RunResult engine = new MultiverseRunner(1).run(plan, table, RunProgress.SILENT, null);
        ResultTable results = engine.results();
        List<CSVRecord> reference = reference(caseName);
        FullFitter fitter = new FullFitter();
        for (int spec = 0; spec < ERRORS.size(); spec++) {
            String errors = ERRORS.get(spec);
            FullFit fit = fitter.fit(plan, models, spec);
            assertTrue(fit.ok(), fit.status());
            List<CSVRecord> rows = reference.stream().filter(r -> r.get("errors").equals(errors)).toList();
            CSVRecord first = rows.get(0);
            int matched = 0;
            for (FullFit.Coefficient c : fit.coefficients()) {
                CSVRecord r = rows.stream().filter(x -> normal(x.get("term")).equals(normal(c.term()))).findFirst()
                        .orElseThrow(() -> new AssertionError("no reference for " + c.term()));
                String what = caseName + " " + errors + " " + c.term();
                close(r, "estimate", c.estimate(), tolerance, what);
                close(r, "std_error", c.stdError(), tolerance, what);
                close(r, "statistic", c.statistic(), tolerance, what);
                absolute(r, "p_value", c.pValue(), Math.max(1e-9, tolerance), what);
                matched++;
            }
            // R lists absorbed fixed effects as dummies; the full fit absorbs them
            long dummies = rows.stream().filter(r -> r.get("term").startsWith("factor(")).count();
            assertEquals(rows.size() - dummies - (fit.absorbed().isEmpty() ? 0 : 1), matched, caseName + " " + errors);
            assertEquals(Integer.parseInt(first.get("n_obs")), fit.nObs());
            assertEquals(Integer.parseInt(first.get("n_params")), fit.nParams());
            assertEquals(Double.parseDouble(first.get("df")), fit.df());
            close(first, "r2", fit.r2(), tolerance, caseName + " R2");
            close(first, "adj_r2", fit.adjustedR2(), tolerance, caseName + " adjusted R2");
            close(first, "model_f", fit.modelF(), tolerance, caseName + " F");
            absolute(first, "model_p_value", fit.modelPValue(), Math.max(1e-9, tolerance), caseName + " F p");

            // the engine fits the same specification to the same key estimate and standard error
            FullFit.Coefficient key = fit.key();
            assertNotNull(key);
            assertEquals(results.estimate(spec), key.estimate(), 1e-10 * Math.abs(key.estimate()), errors);
            assertEquals(results.stdError(spec), key.stdError(), 1e-10 * key.stdError(), errors);
            assertEquals(results.df(spec), fit.df(), errors);
            assertEquals(results.pValue(spec), key.pValue(), 1e-9, errors);
        }
    }

    private static void close(CSVRecord r, String column, double actual, double tolerance, String what) {
        double expected = Double.parseDouble(r.get(column));
        assertEquals(expected, actual, tolerance * Math.abs(expected), what + " " + column + " (relative)");
    }

    private static void absolute(CSVRecord r, String column, double actual, double tolerance, String what) {
        assertEquals(Double.parseDouble(r.get(column)), actual, tolerance, what + " " + column);
    }

    private static String normal(String term) {
        return term.toLowerCase(Locale.ROOT).replace("=", "");
    }

    private static List<CSVRecord> reference(String caseName) throws Exception {
        try (Reader in = Files.newBufferedReader(resources().resolve("full-fit-reference.csv"));
                CSVParser csv = CSVParser.builder().setReader(in)
                        .setFormat(CSVFormat.RFC4180.builder().setHeader().setSkipHeaderRecord(true).get()).get()) {
            List<CSVRecord> out = new ArrayList<>();
            for (CSVRecord r : csv) {
                if (r.get("case").equals(caseName)) {
                    out.add(r);
                }
            }
            return out;
        }
    }

    private static Path resources() throws URISyntaxException {
        return Path.of(FullFitterTest.class.getResource("longley.csv").toURI()).getParent();
    }
}
