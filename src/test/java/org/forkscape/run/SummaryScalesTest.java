package org.forkscape.run;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Path;
import java.time.Instant;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import java.util.Random;
import org.apache.commons.math3.stat.descriptive.rank.Percentile;
import org.forkscape.data.Column;
import org.forkscape.data.NumericColumn;
import org.forkscape.data.Table;
import org.forkscape.plan.ModelFamily;
import org.forkscape.plan.Plan;
import org.forkscape.plan.PlanReader;
import org.junit.jupiter.api.Test;

/**
 * summary.json's scales: today's headline keys unchanged and in order, the mark that the overall median
 * mixes units, and the numbers per comparable group and on each unit-free scale against Commons Math's
 * {@link Percentile} (type 7, as R's default) over the specifications.csv columns of the same run; with
 * a model decision, the least-squares and logit coefficients kept apart and their average marginal
 * effects summarised together, the scales defined for least squares only over its specifications.
 */
class SummaryScalesTest {
    private static final String PLAN = """
            {"data": "unused.csv", "decisions": [
              {"name": "outcome", "kind": "outcome", "alternatives": [
                {"label": "score", "column": "score"}%s]},
              {"name": "tutoring", "kind": "predictor", "alternatives": [
                {"label": "hours", "column": "hours"}%s]},
              {"name": "controls", "kind": "controls", "optional": ["prior", "attendance"]},
              {"name": "errors", "kind": "errors", "alternatives": ["classical", "HC1"]}
            ]}""";

    private static final String SECOND_OUTCOME = ", {\"label\": \"log fluency\", \"column\": \"fluency\", "
            + "\"transform\": \"log\"}";
    private static final String SECOND_CODING = ", {\"label\": \"hours, standardized\", \"column\": \"hours\", "
            + "\"transform\": \"standardize\"}";

    /** A 0/1 outcome fitted by least squares (a linear probability model) and by a logit. */
    static final String GLM_PLAN = """
            {"data": "unused.csv", "decisions": [
              {"name": "outcome", "kind": "outcome", "alternatives": [{"label": "passed", "column": "passed"}]},
              {"name": "tutoring", "kind": "predictor", "alternatives": [{"label": "hours", "column": "hours"}]},
              {"name": "controls", "kind": "controls", "optional": ["prior", "attendance"]},
              {"name": "errors", "kind": "errors", "alternatives": ["classical", "HC1"]},
              {"name": "model", "kind": "model", "alternatives": ["ols", "logit"]}
            ]}""";

    private static final Provenance PROVENANCE = new Provenance("0", "a", "b", 7, "test", Instant.EPOCH, "17", 1, null);

    @Test
    void headlineKeysStayAndEachGroupAndScaleHasItsOwnNumbers() {
        RunResult run = run(PLAN.formatted(SECOND_OUTCOME, SECOND_CODING));
        Map<String, Object> summary = SummaryJson.of(run, Map.of(), PROVENANCE);
        assertEquals(List.of("specifications", "fitted", "failed", "median_estimate", "median_mixes_units",
                "share_positive", "share_significant_positive", "share_significant_negative", "confidence",
                "specifications_in_plan", "sampled", "data_rows", "refit_by_qr", "standard_error_routes", "seconds",
                "scales", "provenance"), new ArrayList<>(summary.keySet()));
        assertEquals(true, summary.get("median_mixes_units"));
        Map<?, ?> scales = (Map<?, ?>) summary.get("scales");
        List<?> groups = (List<?>) scales.get("groups");
        assertEquals(4, groups.size());
        ResultTable r = run.results();
        for (int g = 0; g < 4; g++) {
            Map<?, ?> group = (Map<?, ?>) groups.get(g);
            List<Double> estimates = new ArrayList<>();
            for (int slot = 0; slot < r.size(); slot++) {
                // 16 specifications per outcome, 8 per coding within it (the last two decisions vary fastest)
                if (slot / 8 == g) {
                    estimates.add(r.estimate(slot));
                }
            }
            assertEquals(8, group.get("specifications"));
            assertEquals(List.of("score", "score", "log fluency", "log fluency").get(g), group.get("outcome"));
            assertEquals(List.of("hours", "hours, standardized").get(g % 2), group.get("predictor"));
            checkQuartiles(group, estimates);
        }
        assertEquals("score per unit of tutoring (hours)", ((Map<?, ?>) groups.get(0)).get("unit"));
        List<Double> standardized = new ArrayList<>();
        List<Double> statistics = new ArrayList<>();
        for (int slot = 0; slot < r.size(); slot++) {
            standardized.add(r.standardizedEstimate(slot));
            statistics.add(r.statistic(slot));
        }
        checkQuartiles((Map<?, ?>) scales.get("standardized"), standardized);
        checkQuartiles((Map<?, ?>) scales.get("t_statistic"), statistics);
        Map<?, ?> partial = (Map<?, ?>) scales.get("partial_correlation");
        assertEquals(32, partial.get("specifications"));
        assertEquals(summary.get("share_positive"), partial.get("share_positive"));
        assertEquals(summary.get("share_significant_positive"), partial.get("share_significant_positive"));
        // the pooled sections present are named: here only the headline median (no inference sections given)
        assertEquals(List.of("median_estimate"), scales.get("pooled_as_fitted"));
        Map<String, Object> withSections = SummaryJson.of(run, Map.of("interval_bounds", Map.of(), "null",
                Map.of(), "comparable_groups", List.of()), PROVENANCE);
        assertEquals(List.of("median_estimate", "null", "interval_bounds"),
                ((Map<?, ?>) withSections.get("scales")).get("pooled_as_fitted"));
    }

    @Test
    void oneOutcomeAndOneCodingDoNotMixUnits() {
        Map<String, Object> summary = SummaryJson.of(run(PLAN.formatted("", "")), Map.of(), PROVENANCE);
        assertEquals(false, summary.get("median_mixes_units"));
        List<?> groups = (List<?>) ((Map<?, ?>) summary.get("scales")).get("groups");
        assertEquals(1, groups.size());
        assertEquals(summary.get("median_estimate"), ((Map<?, ?>) groups.get(0)).get("median"));
        assertNull(((Map<?, ?>) summary.get("scales")).get("as_fitted"));
        assertNull(((Map<?, ?>) summary.get("scales")).get("pooled_as_fitted"), "one group pools nothing");
    }

    @Test
    void modelsAreKeptApartAsFittedAndShareTheEffectScale() {
        RunResult run = run(GLM_PLAN);
        ResultTable r = run.results();
        List<Double> effects = new ArrayList<>();
        List<Double> leastSquaresStandardized = new ArrayList<>();
        List<Double> leastSquaresPartial = new ArrayList<>();
        int logit = 0;
        for (int slot = 0; slot < r.size(); slot++) {
            assertTrue(r.fitted(slot), r.status(slot));
            effects.add(r.effect(slot));
            if (r.family(slot) == ModelFamily.LOGIT) {
                logit++;
                assertTrue(Double.isNaN(Scale.PARTIAL_CORRELATION.value(r, slot)), "no partial correlation on the normal reference");
                assertTrue(Double.isNaN(Scale.STANDARDIZED.value(r, slot)));
            } else {
                leastSquaresStandardized.add(r.standardizedEstimate(slot));
                double t = r.statistic(slot);
                leastSquaresPartial.add(t / Math.sqrt(t * t + r.df(slot)));
            }
        }
        assertEquals(8, logit, "half the specifications took the logit route");
        Map<String, Object> summary = SummaryJson.of(run, Map.of(), PROVENANCE);
        assertEquals(true, summary.get("median_mixes_units"), "least-squares and logit coefficients pooled");
        Map<?, ?> scales = (Map<?, ?>) summary.get("scales");
        assertEquals(List.of("median_estimate"), scales.get("pooled_as_fitted"));
        List<?> groups = (List<?>) scales.get("groups");
        assertEquals(2, groups.size());
        assertEquals(List.of("ols", "logit"), groups.stream().map(g -> ((Map<?, ?>) g).get("model")).toList());
        assertEquals(List.of("passed per unit of tutoring (hours)", "log-odds of passed per unit of tutoring (hours)"),
                groups.stream().map(g -> ((Map<?, ?>) g).get("unit")).toList());
        for (Object g : groups) {
            assertEquals(8, ((Map<?, ?>) g).get("specifications"));
        }
        List<?> effectGroups = (List<?>) scales.get("average_marginal_effect");
        assertEquals(1, effectGroups.size(), "the effects of both models share one group");
        Map<?, ?> effect = (Map<?, ?>) effectGroups.get(0);
        assertNull(effect.get("model"));
        assertEquals("change in the probability of passed per unit of tutoring (hours)", effect.get("unit"));
        assertEquals(16, effect.get("specifications"));
        checkQuartiles(effect, effects);
        Map<?, ?> standardized = (Map<?, ?>) scales.get("standardized");
        assertEquals(8, standardized.get("specifications"));
        assertEquals(8, standardized.get("left_out"));
        checkQuartiles(standardized, leastSquaresStandardized);
        Map<?, ?> partial = (Map<?, ?>) scales.get("partial_correlation");
        assertEquals(8, partial.get("left_out"));
        checkQuartiles(partial, leastSquaresPartial);
        Map<?, ?> t = (Map<?, ?>) scales.get("t_statistic");
        assertEquals(16, t.get("specifications"));
        assertEquals(0, t.get("left_out"));
    }

    private static void checkQuartiles(Map<?, ?> section, List<Double> values) {
        double[] v = values.stream().mapToDouble(Double::doubleValue).toArray();
        Percentile type7 = new Percentile().withEstimationType(Percentile.EstimationType.R_7);
        assertEquals(type7.evaluate(v, 50), (Double) section.get("median"), 1e-12 * Math.abs(type7.evaluate(v, 50)));
        assertEquals(type7.evaluate(v, 25), (Double) section.get("lower_quartile"), 1e-12 * Math.abs(type7.evaluate(v, 25)));
        assertEquals(type7.evaluate(v, 75), (Double) section.get("upper_quartile"), 1e-12 * Math.abs(type7.evaluate(v, 75)));
        long positive = values.stream().filter(x -> x > 0).count();
        assertEquals(positive / (double) values.size(), (Double) section.get("share_positive"), 1e-15);
    }

    static RunResult run(String planText) {
        Random random = new Random(17);
        // the 0/1 outcome from its own stream, so that the other columns stay as they were
        Random passing = new Random(18);
        int n = 300;
        double[] hours = new double[n];
        double[] prior = new double[n];
        double[] attendance = new double[n];
        double[] score = new double[n];
        double[] fluency = new double[n];
        double[] passed = new double[n];
        for (int i = 0; i < n; i++) {
            prior[i] = 50 + 10 * random.nextGaussian();
            attendance[i] = 90 + 5 * random.nextGaussian();
            hours[i] = Math.max(0, 20 - 0.3 * (prior[i] - 50) + 8 * random.nextGaussian());
            score[i] = 40 + 0.1 * hours[i] + 0.6 * prior[i] + 0.2 * attendance[i] + 6 * random.nextGaussian();
            fluency[i] = Math.exp(4 + 0.002 * hours[i] + 0.01 * prior[i] + 0.2 * random.nextGaussian());
            double eta = -1.5 + 0.06 * hours[i] + 0.04 * (prior[i] - 50);
            passed[i] = passing.nextDouble() < 1 / (1 + Math.exp(-eta)) ? 1 : 0;
        }
        List<Column> columns = List.of(new NumericColumn("hours", hours), new NumericColumn("prior", prior),
                new NumericColumn("attendance", attendance), new NumericColumn("score", score),
                new NumericColumn("fluency", fluency), new NumericColumn("passed", passed));
        Plan plan = new PlanReader(false).read(planText, Path.of("."));
        return new MultiverseRunner(1).run(plan, new Table("invented", columns), RunProgress.SILENT, null);
    }
}
