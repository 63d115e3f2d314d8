package org.forkscape.web;

import java.util.Locale;
import java.util.SplittableRandom;

/**
 * A small invented civic data set for the explorer's tests (not a reference for any number: the tests
 * that check numbers compare the explorer with a direct computation on the same run). Districts hold
 * neighbourhood assemblies; the question is whether outreach hours raise turnout (and, in
 * {@link #csvWithFollowUp}, whether an assembly goes on to schedule a follow-up meeting, a 0/1 outcome).
 * Seeded, so every run of the tests sees the same file.
 */
public final class CivicTestData {
    private CivicTestData() {
    }

    public static String csv(int rows, long seed) {
        return csv(rows, seed, false);
    }

    /**
     * The same rows with one more column, {@code follow_up}: 1 when the district's assembly scheduled a
     * follow-up meeting, more often with more outreach hours (a logistic model). It is drawn from a stream of
     * its own, so every other column is as {@link #csv} writes it.
     */
    public static String csvWithFollowUp(int rows, long seed) {
        return csv(rows, seed, true);
    }

    private static String csv(int rows, long seed, boolean followUp) {
        SplittableRandom random = new SplittableRandom(seed);
        SplittableRandom meetings = new SplittableRandom(seed + 1);
        String[] regions = {"north", "south", "east", "west"};
        StringBuilder b = new StringBuilder(
                "district,region,urban,outreach_hours,mailers,median_age,density,income_index,rainfall,turnout,turnout_change"
                        + (followUp ? ",follow_up\n" : "\n"));
        for (int i = 0; i < rows; i++) {
            int district = random.nextInt(12);
            String region = regions[district % 4];
            int urban = random.nextDouble() < 0.55 ? 1 : 0;
            double hours = 1 + 20 * random.nextDouble();
            double mailers = Math.round(hours * 3 + 10 * random.nextDouble());
            double age = 30 + 25 * random.nextDouble();
            double density = Math.exp(5 + 2 * random.nextGaussian());
            double income = 50 + 15 * random.nextGaussian();
            double rain = 2 + 10 * random.nextDouble();
            double districtEffect = (district - 6) * 0.8;
            double turnout = 35 + 0.45 * hours + 0.2 * age - 0.4 * rain + 3 * urban + districtEffect
                    + 6 * random.nextGaussian();
            double change = 0.15 * hours - 0.1 * rain + 4 * random.nextGaussian();
            String rainCell = random.nextDouble() < 0.05 ? "" : String.format(Locale.ROOT, "%.2f", rain);
            b.append(String.format(Locale.ROOT, "d%02d,%s,%d,%.3f,%.0f,%.1f,%.1f,%.2f,%s,%.2f,%.2f", district + 1,
                    region, urban, hours, mailers, age, density, income, rainCell, turnout, change));
            if (followUp) {
                double eta = -2 + 0.15 * hours + 0.03 * (age - 42);
                b.append(meetings.nextDouble() < 1 / (1 + Math.exp(-eta)) ? ",1" : ",0");
            }
            b.append('\n');
        }
        return b.toString();
    }

    /** A plan over {@link #csv} with every decision kind: 2 x 2 x 2^3 x 3 x 3 x 2 = 576 specifications. */
    public static String plan() {
        return plan(3);
    }

    /**
     * A plan over {@link #csvWithFollowUp} with a model decision: the 0/1 follow-up outcome by least squares
     * (a linear probability model) and by a logit, 2^2 x 2 x 2 = 16 specifications.
     */
    public static String modelPlan() {
        return """
                {
                  "title": "Outreach and follow-up meetings",
                  "data": "data.csv",
                  "decisions": [
                    {"name": "outcome", "kind": "outcome", "alternatives": [
                      {"label": "follow-up", "column": "follow_up"}]},
                    {"name": "outreach", "kind": "predictor", "alternatives": [
                      {"label": "hours", "column": "outreach_hours"}]},
                    {"name": "controls", "kind": "controls", "optional": ["median_age", "rainfall"]},
                    {"name": "errors", "kind": "errors", "alternatives": ["classical", "HC1"]},
                    {"name": "model", "kind": "model", "alternatives": ["ols", "logit"]}
                  ]
                }
                """;
    }

    /** The same plan with {@code optionalControls} (up to 6) optional controls. */
    public static String plan(int optionalControls) {
        StringBuilder optional = new StringBuilder();
        String[] usable = {"median_age", "rainfall", "income_index", "density", "urban", "region"};
        for (int j = 0; j < optionalControls; j++) {
            if (j > 0) {
                optional.append(", ");
            }
            optional.append('"').append(usable[j]).append('"');
        }
        return """
                {
                  "title": "Outreach and turnout",
                  "data": "data.csv",
                  "seed": 7,
                  "decisions": [
                    {"name": "outcome", "kind": "outcome", "alternatives": [
                      {"label": "turnout", "column": "turnout"},
                      {"label": "turnout change", "column": "turnout_change"}]},
                    {"name": "outreach", "kind": "predictor", "alternatives": [
                      {"label": "hours", "column": "outreach_hours"},
                      {"label": "log hours", "column": "outreach_hours", "transform": "log"}]},
                    {"name": "controls", "kind": "controls", "optional": [%s]},
                    {"name": "rows", "kind": "sample", "alternatives": [
                      {"label": "all"},
                      {"label": "urban", "keep": "urban == 1"},
                      {"label": "trimmed", "trim": {"column": "turnout", "z": 2.5}}]},
                    {"name": "errors", "kind": "errors", "alternatives": ["classical", "HC1", "cluster:district"]},
                    {"name": "fixed effects", "kind": "absorb", "alternatives": [
                      {"label": "none", "columns": []},
                      {"label": "region", "columns": ["region"]}]}
                  ]
                }
                """.formatted(optional);
    }
}
