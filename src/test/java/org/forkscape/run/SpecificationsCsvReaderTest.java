package org.forkscape.run;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import org.forkscape.data.CsvTableReader;
import org.forkscape.data.Table;
import org.forkscape.plan.Plan;
import org.forkscape.plan.PlanReader;
import org.forkscape.web.CivicTestData;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** A run read back from its specifications.csv is the run that wrote it, number for number. */
class SpecificationsCsvReaderTest {
    @TempDir
    Path folder;

    @Test
    void everyColumnReadsBackExactlyIncludingFailedSpecifications() throws Exception {
        Files.writeString(folder.resolve("data.csv"), CivicTestData.csv(200, 3));
        // a sample rule that leaves a handful of rows: specifications with many controls cannot be fitted
        String json = CivicTestData.plan(6).replace("{\"label\": \"urban\", \"keep\": \"urban == 1\"}",
                "{\"label\": \"few\", \"keep\": \"outreach_hours > 19.5\"}");
        check(new PlanReader(true).read(json, folder));
    }

    @Test
    void aSampledRunKeepsItsSpecificationNumbers() throws Exception {
        Files.writeString(folder.resolve("data.csv"), CivicTestData.csv(200, 4));
        Plan plan = new PlanReader(true).read(CivicTestData.plan(6), folder).withSample(300, 99);
        check(plan);
    }

    @Test
    void generalizedLinearModelsReadBackWithTheirOwnColumns() throws Exception {
        Files.writeString(folder.resolve("data.csv"), CivicTestData.csv(300, 5));
        String json = """
                {"data": "data.csv", "decisions": [
                  {"name": "outcome", "kind": "outcome", "alternatives": [{"label": "urban", "column": "urban"}]},
                  {"name": "outreach", "kind": "predictor", "alternatives": [
                    {"label": "hours", "column": "outreach_hours"}]},
                  {"name": "controls", "kind": "controls", "optional": ["median_age", "rainfall", "region"]},
                  {"name": "rows", "kind": "sample", "alternatives": [
                    {"label": "all"}, {"label": "few", "keep": "outreach_hours > 19.5"}]},
                  {"name": "errors", "kind": "errors", "alternatives": ["classical", "HC1", "cluster:district"]},
                  {"name": "fixed effects", "kind": "absorb", "alternatives": [
                    {"label": "none", "columns": []}, {"label": "region", "columns": ["region"]}]},
                  {"name": "model", "kind": "model", "alternatives": ["ols", "logit", "probit"]}]}
                """;
        Plan plan = new PlanReader(true).read(json, folder);
        check(plan);
        RunResult run = new MultiverseRunner(1).run(plan, new CsvTableReader().read(plan.dataFile()), RunProgress.SILENT,
                null);
        Path csv = folder.resolve("specifications.csv");
        SpecificationsCsv.write(run, csv);
        RunResult back = SpecificationsCsvReader.read(plan, run.table(), csv, run.seconds());
        int logits = 0;
        for (int s = 0; s < run.results().size(); s++) {
            assertEquals(run.results().family(s), back.results().family(s));
            assertEquals(run.results().effect(s), back.results().effect(s));
            assertEquals(run.results().effectStdError(s), back.results().effectStdError(s));
            assertEquals(run.results().deviance(s), back.results().deviance(s));
            if (run.results().family(s) == org.forkscape.plan.ModelFamily.LOGIT && run.results().fitted(s)) {
                logits++;
                assertEquals(Double.POSITIVE_INFINITY, back.results().df(s));
                assertTrue(Double.isNaN(back.results().adjustedR2(s)));
            }
        }
        assertTrue(logits > 0, "the plan must fit logit specifications");
    }

    private void check(Plan plan) throws Exception {
        Table table = new CsvTableReader().read(plan.dataFile());
        RunResult run = new MultiverseRunner(2).run(plan, table, RunProgress.SILENT, null);
        Path csv = folder.resolve("specifications.csv");
        SpecificationsCsv.write(run, csv);
        RunResult back = SpecificationsCsvReader.read(plan, table, csv, run.seconds());
        ResultTable a = run.results();
        ResultTable b = back.results();
        assertEquals(a.size(), b.size());
        int failed = 0;
        for (int s = 0; s < a.size(); s++) {
            assertEquals(a.specIndex(s), b.specIndex(s));
            assertEquals(a.fitted(s), b.fitted(s));
            assertEquals(a.status(s), b.status(s));
            assertEquals(a.nObs(s), b.nObs(s));
            assertEquals(a.nParams(s), b.nParams(s));
            assertEquals(a.estimate(s), b.estimate(s));
            // the ratio of standard deviations is read back as the written quotient: equal up to its rounding
            if (Double.isNaN(a.standardizedEstimate(s))) {
                assertTrue(Double.isNaN(b.standardizedEstimate(s)));
            } else {
                assertEquals(a.standardizedEstimate(s), b.standardizedEstimate(s),
                        4e-16 * Math.abs(a.standardizedEstimate(s)));
            }
            assertEquals(a.r2(s), b.r2(s));
            // the file keeps the model p-value; the statistic is derived back from R-squared
            if (Double.isNaN(a.modelPValue(s))) {
                assertTrue(Double.isNaN(b.modelPValue(s)));
            } else {
                assertEquals(a.modelPValue(s), b.modelPValue(s), 1e-9 * a.modelPValue(s));
            }
            if (a.fitted(s)) {
                assertEquals(a.stdError(s), b.stdError(s));
                assertEquals(a.df(s), b.df(s));
                assertEquals(a.pValue(s), b.pValue(s));
                assertEquals(a.ciLow(s, 0.95), b.ciLow(s, 0.95));
            } else {
                failed++;
            }
        }
        if (plan.sampleSize() == 0) {
            assertTrue(failed > 0, "the first plan must contain specifications without an estimate");
        }
        // the file written again from the read-back run is the same file, but for the last digits of the
        // model p-value
        Path again = folder.resolve("again.csv");
        SpecificationsCsv.write(back, again);
        List<String> first = Files.readAllLines(csv);
        List<String> second = Files.readAllLines(again);
        assertEquals(first.size(), second.size());
        int modelP = List.of(first.get(0).split(",")).indexOf("model_p_value");
        for (int i = 0; i < first.size(); i++) {
            List<String> x = new ArrayList<>(List.of(first.get(i).split(",", -1)));
            List<String> y = new ArrayList<>(List.of(second.get(i).split(",", -1)));
            String px = x.remove(modelP);
            String py = y.remove(modelP);
            assertEquals(x, y, "line " + (i + 1));
            if (i > 0 && !px.isEmpty()) {
                assertEquals(Double.parseDouble(px), Double.parseDouble(py), 1e-9 * Double.parseDouble(px));
            }
        }
    }
}
