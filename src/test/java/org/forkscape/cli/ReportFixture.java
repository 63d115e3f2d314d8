package org.forkscape.cli;

import static org.forkscape.cli.CommandLineTest.run;
import static org.junit.jupiter.api.Assertions.assertEquals;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import org.forkscape.cli.CommandLineTest.Outcome;
import org.forkscape.web.CivicTestData;

/**
 * Run folders for the {@code report} tests, written by the batch command on the invented civic data:
 * one comparable group (turnout on outreach hours, 4 optional controls x 2 error types = 32
 * specifications, 19 null draws), and a plan of two outcomes whose t-scale curve of 4,608 specifications
 * is drawn in bins.
 */
final class ReportFixture {
    private ReportFixture() {
    }

    static final String ONE_GROUP = """
            {
              "title": "Outreach and turnout, one group",
              "data": "data.csv",
              "decisions": [
                {"name": "outcome", "kind": "outcome", "alternatives": [{"label": "turnout", "column": "turnout"}]},
                {"name": "outreach", "kind": "predictor", "alternatives": [
                  {"label": "hours", "column": "outreach_hours"}]},
                {"name": "controls", "kind": "controls",
                 "optional": ["median_age", "rainfall", "income_index", "density"]},
                {"name": "errors", "kind": "errors", "alternatives": ["classical", "HC1"]}
              ]
            }
            """;

    /** 2 outcomes x 2^7 controls x 3 samples x 3 error types x 2 = 4,608 specifications, two groups as fitted. */
    static final String LARGE = """
            {
              "title": "Outreach and turnout, large",
              "data": "data.csv",
              "decisions": [
                {"name": "outcome", "kind": "outcome", "alternatives": [
                  {"label": "turnout", "column": "turnout"}, {"label": "turnout change", "column": "turnout_change"}]},
                {"name": "outreach", "kind": "predictor", "alternatives": [
                  {"label": "hours", "column": "outreach_hours"}]},
                {"name": "controls", "kind": "controls",
                 "optional": ["median_age", "rainfall", "income_index", "density", "urban", "region", "mailers"]},
                {"name": "rows", "kind": "sample", "alternatives": [
                  {"label": "all"}, {"label": "urban", "keep": "urban == 1"},
                  {"label": "trimmed", "trim": {"column": "turnout", "z": 2.5}}]},
                {"name": "errors", "kind": "errors", "alternatives": ["classical", "HC1", "HC3"]},
                {"name": "fixed effects", "kind": "absorb", "alternatives": [
                  {"label": "none", "columns": []}, {"label": "region", "columns": ["region"]}]}
              ]
            }
            """;

    /** Writes the data and plan into {@code dir}, runs the plan into {@code dir/run} and returns that folder. */
    static Path runFolder(Path dir, String plan, String... runOptions) throws IOException {
        Files.writeString(dir.resolve("data.csv"), CivicTestData.csv(240, 31));
        Path planFile = dir.resolve("plan.json");
        Files.writeString(planFile, plan);
        Path out = dir.resolve("run");
        List<String> args = new ArrayList<>(List.of("run", planFile.toString(), "--out", out.toString(), "--threads",
                "2"));
        args.addAll(List.of(runOptions));
        Outcome o = run(args.toArray(String[]::new));
        assertEquals(0, o.code(), o.err());
        return out;
    }

    /** Runs {@code report} on a run folder into {@code out}, asserting that it succeeded. */
    static Outcome report(Path runFolder, Path out, String... options) {
        List<String> args = new ArrayList<>(List.of("report", runFolder.toString(), "--out", out.toString()));
        args.addAll(List.of(options));
        Outcome o = run(args.toArray(String[]::new));
        assertEquals(0, o.code(), o.err());
        return o;
    }
}
