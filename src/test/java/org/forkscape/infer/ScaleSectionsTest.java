package org.forkscape.infer;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.ByteArrayOutputStream;
import java.io.IOException;
import java.io.StringReader;
import java.nio.charset.StandardCharsets;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.Map;
import org.apache.commons.csv.CSVFormat;
import org.apache.commons.csv.CSVRecord;
import org.apache.commons.math3.stat.descriptive.rank.Percentile;
import org.apache.commons.math3.stat.inference.OneWayAnova;
import org.forkscape.run.RunProgress;
import org.forkscape.run.RunResult;
import org.forkscape.run.SpecificationsCsv;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;

/**
 * summary.json's {@code by_scale} against an independent computation from the run's specifications.csv:
 * each comparable group's smallest p, its median (Apache Commons Math's {@code Percentile}, R type 7) and
 * the variance shares of its decisions (from Commons Math's {@code OneWayAnova} F: share = F (k - 1) /
 * (F (k - 1) + n - k)); and the null draws' per-group tests and rank-by-rank band.
 */
class ScaleSectionsTest {
    private static RunResult run;
    private static Map<String, Object> sections;
    private static List<CSVRecord> csv;

    @BeforeAll
    static void runWithDraws() throws IOException {
        run = Scenarios.run(Scenarios.PLAN, Scenarios.table(80, 0.3, 5, 10));
        sections = InferenceSections.compute(run, new NullDrawSettings(60, NullMethod.BOOTSTRAP, 7, null, false), 2,
                RunProgress.SILENT, null).sections();
        ByteArrayOutputStream out = new ByteArrayOutputStream();
        SpecificationsCsv.write(run, out);
        csv = CSVFormat.DEFAULT.builder().setHeader().setSkipHeaderRecord(true).build()
                .parse(new StringReader(out.toString(StandardCharsets.UTF_8))).getRecords();
    }

    @SuppressWarnings("unchecked")
    private static Map<String, Object> map(Object o) {
        return (Map<String, Object>) o;
    }

    @SuppressWarnings("unchecked")
    private static List<Map<String, Object>> groups() {
        return (List<Map<String, Object>>) map(sections.get("by_scale")).get("groups");
    }

    private static List<CSVRecord> rowsOf(Map<String, Object> group) {
        return csv.stream().filter(r -> r.get("outcome").equals(group.get("outcome"))
                && r.get("key").equals(group.get("predictor"))).toList();
    }

    @Test
    void everyOutcomeAndCodingIsAGroupAndTheWholeRunSaysItMixesUnits() {
        assertEquals(4, groups().size(), "2 outcomes x 2 codings");
        for (Map<String, Object> g : groups()) {
            assertEquals(8, g.get("specifications"));
            assertEquals(8, rowsOf(g).size());
        }
        assertEquals(true, map(sections.get("null")).get("median_mixes_units"));
        assertEquals(true, map(sections.get("influence_overall")).get("mixes_units"));
    }

    @Test
    void eachGroupsMedianAndSmallestPMatchItsRowsOfSpecificationsCsv() {
        for (Map<String, Object> g : groups()) {
            List<CSVRecord> rows = rowsOf(g);
            double[] estimates = rows.stream().mapToDouble(r -> Double.parseDouble(r.get("estimate"))).toArray();
            double median = new Percentile().withEstimationType(Percentile.EstimationType.R_7).evaluate(estimates, 50);
            Map<String, Object> observed = map(map(g.get("null")).get("observed"));
            assertEquals(median, (double) observed.get("median"), 1e-15 * Math.abs(median), g.get("outcome") + "");
            CSVRecord best = rows.stream().min((a, b) -> Double.compare(Double.parseDouble(a.get("p_value")),
                    Double.parseDouble(b.get("p_value")))).orElseThrow();
            Map<String, Object> bestJson = map(g.get("best"));
            assertEquals(Long.parseLong(best.get("spec")), ((Number) bestJson.get("spec")).longValue());
            assertEquals(Double.parseDouble(best.get("p_value")), (double) bestJson.get("p_nominal"), 0);
            assertEquals(60, map(bestJson.get("adjusted_test")).get("draws"));
        }
    }

    @Test
    void eachGroupsVarianceSharesMatchAOneWayAnovaOfItsRows() {
        for (Map<String, Object> g : groups()) {
            List<CSVRecord> rows = rowsOf(g);
            @SuppressWarnings("unchecked")
            List<Map<String, Object>> influence = (List<Map<String, Object>>) g.get("influence");
            int checked = 0;
            for (String control : List.of("a", "b", "c")) {
                List<double[]> levels = new ArrayList<>();
                for (boolean in : new boolean[] {false, true}) {
                    levels.add(rows.stream().filter(r -> Arrays.asList(r.get("controls").split(" \\+ ")).contains(control) == in)
                            .mapToDouble(r -> Double.parseDouble(r.get("estimate"))).toArray());
                }
                double f = new OneWayAnova().anovaFValue(levels);
                double expected = f / (f + rows.size() - 2);
                Map<String, Object> entry = influence.stream().filter(e -> e.get("factor").equals(control)).findFirst()
                        .orElseThrow();
                assertEquals(expected, (double) entry.get("variance_share"), 1e-10, control);
                checked++;
            }
            assertEquals(3, checked);
            // within a group the outcome and the coding do not vary: they explain nothing
            for (Map<String, Object> e : influence) {
                if (e.get("factor").equals("outcome") || e.get("factor").equals("key")) {
                    assertEquals(0.0, (double) e.get("variance_share"), 0, e.get("factor") + "");
                }
            }
        }
    }

    @Test
    void theTStatisticCurveHoldsEverySpecificationAndItsUnitFreeTestsAreTheWholeRuns() {
        Map<String, Object> t = map(map(sections.get("by_scale")).get("t_statistic"));
        assertEquals(32, t.get("specifications"));
        Map<String, Object> tests = map(map(t.get("null")).get("tests"));
        Map<String, Object> whole = map(map(sections.get("null")).get("tests"));
        // share significant and the normal scores do not depend on the scale: the same tally as the whole run's
        assertEquals(whole.get("share_significant"), tests.get("share_significant"));
        assertEquals(whole.get("stouffer"), tests.get("stouffer"));
        double[] statistics = csv.stream().mapToDouble(r -> Double.parseDouble(r.get("statistic"))).toArray();
        assertEquals(new Percentile().withEstimationType(Percentile.EstimationType.R_7).evaluate(statistics, 50),
                (double) map(map(t.get("null")).get("observed")).get("median"), 1e-12);
        assertNull(map(map(sections.get("by_scale")).get("standardized")).get("null"),
                "the draws do not re-standardize");
    }

    @Test
    @SuppressWarnings("unchecked")
    void theBandFollowsTheRanksAndIsOrderedLikeTheCurve() {
        for (Map<String, Object> g : groups()) {
            Map<String, Object> envelope = map(map(g.get("null")).get("envelope"));
            assertEquals(List.of(0, 1, 2, 3, 4, 5, 6, 7), envelope.get("ranks"), "all 8 ranks of a small group");
            List<Double> low = (List<Double>) envelope.get("low");
            List<Double> middle = (List<Double>) envelope.get("median");
            List<Double> high = (List<Double>) envelope.get("high");
            for (int k = 0; k < low.size(); k++) {
                assertTrue(low.get(k) <= middle.get(k) && middle.get(k) <= high.get(k), "rank " + k);
                // each draw's sorted values rise with the rank, so every quantile of them does too
                if (k > 0) {
                    assertTrue(low.get(k - 1) <= low.get(k) && high.get(k - 1) <= high.get(k), "rank " + k);
                }
            }
            assertTrue(low.get(0) < 0 && high.get(7) > 0, "bootstrap draws are centred on zero");
        }
    }

    @Test
    void theBandAtEachRankIsTheQuantileOfTheDrawsSortedValuesThere() {
        NullDrawResult draws = Scenarios.nullDraws(run, 40, NullMethod.PERMUTE, 3, null, 2);
        Percentile q = new Percentile().withEstimationType(Percentile.EstimationType.R_7);
        for (int c = 0; c < draws.curveCount(); c++) {
            Map<String, Object> envelope = map(draws.curveJson(c).get("envelope"));
            @SuppressWarnings("unchecked")
            List<Double> low = (List<Double>) envelope.get("low");
            @SuppressWarnings("unchecked")
            List<Double> high = (List<Double>) envelope.get("high");
            for (int k = 0; k < low.size(); k++) {
                double[] at = new double[draws.drawCount()];
                for (int d = 0; d < at.length; d++) {
                    at[d] = draws.drawCurve(d, c).atRanks()[k];
                }
                assertEquals(q.evaluate(at, 2.5), low.get(k), 0);
                assertEquals(q.evaluate(at, 97.5), high.get(k), 0);
            }
            // each draw's values at the ranks are its sorted values: its median is the middle of them
            for (int d = 0; d < draws.drawCount(); d++) {
                double[] at = draws.drawCurve(d, c).atRanks();
                double[] sorted = at.clone();
                Arrays.sort(sorted);
                assertTrue(Arrays.equals(sorted, at), "sorted");
                assertEquals(q.evaluate(at, 50), draws.drawCurve(d, c).statistics().median(), 1e-12);
            }
        }
    }

    @Test
    void ranksSpreadEvenlyAndAShortDrawIsReadByInterpolation() {
        int[] ranks = ScaleCurves.ranks(1000);
        assertEquals(ScaleCurves.MAX_RANKS, ranks.length);
        assertEquals(0, ranks[0]);
        assertEquals(999, ranks[199]);
        for (int k = 1; k < ranks.length; k++) {
            assertTrue(ranks[k] - ranks[k - 1] == 5 || ranks[k] - ranks[k - 1] == 6, "step " + k);
        }
        assertEquals(List.of(0), Arrays.stream(ScaleCurves.ranks(1)).boxed().toList());
        // a draw with 7 of 10 values: rank r of 10 is its type-7 quantile at r / 9 (Commons Math Percentile R_7)
        double[] sorted = {-2, -1, 0, 0.5, 1, 3, 8};
        Percentile q = new Percentile().withEstimationType(Percentile.EstimationType.R_7);
        for (int r = 0; r < 10; r++) {
            double expected = r == 0 ? sorted[0] : q.evaluate(sorted, 100.0 * r / 9);
            assertEquals(expected, ScaleCurves.valueAtRank(sorted, 7, r, 10), 1e-12, "rank " + r);
        }
    }
}
