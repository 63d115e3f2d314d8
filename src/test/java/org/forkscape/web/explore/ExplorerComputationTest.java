package org.forkscape.web.explore;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.SplittableRandom;
import org.apache.commons.math3.stat.descriptive.rank.Percentile;
import org.apache.commons.math3.stat.descriptive.rank.Percentile.EstimationType;
import org.apache.commons.math3.stat.inference.OneWayAnova;
import org.forkscape.InputException;
import org.forkscape.data.CsvTableReader;
import org.forkscape.data.Table;
import org.forkscape.plan.Decision;
import org.forkscape.plan.Factor;
import org.forkscape.plan.Plan;
import org.forkscape.plan.PlanReader;
import org.forkscape.plan.SpecificationSpace;
import org.forkscape.run.MultiverseRunner;
import org.forkscape.run.ResultTable;
import org.forkscape.run.RunProgress;
import org.forkscape.run.RunResult;
import org.forkscape.web.CivicTestData;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * The explorer's columnar passes against direct computations: filters against decoding every
 * specification's choices from its index, quantiles against Apache Commons Math's Percentile (R type 7),
 * variance shares against Commons Math's one-way analysis of variance, bins against their members.
 */
class ExplorerComputationTest {
    @TempDir
    static Path folder;
    static RunResult run;
    static RankedRun ranked;

    @BeforeAll
    static void fit() throws Exception {
        Files.writeString(folder.resolve("data.csv"), CivicTestData.csv(300, 11));
        // 2 x 2 x 2^6 x 3 x 3 x 2 = 4,608 specifications: above the point limit, so the curve is binned
        Plan plan = new PlanReader(true).read(CivicTestData.plan(6), folder);
        Table table = new CsvTableReader().read(plan.dataFile());
        run = new MultiverseRunner(2).run(plan, table, RunProgress.SILENT, null);
        ranked = RankedRun.of(run);
    }

    @Test
    void ranksHoldEveryFittedSpecificationOnceInOrderOfEstimate() {
        ResultTable r = run.results();
        int fitted = 0;
        for (int s = 0; s < r.size(); s++) {
            fitted += r.fitted(s) ? 1 : 0;
        }
        assertEquals(fitted, ranked.size());
        boolean[] seen = new boolean[r.size()];
        for (int k = 0; k < ranked.size(); k++) {
            int s = ranked.slot(k);
            assertTrue(r.fitted(s));
            assertTrue(!seen[s]);
            seen[s] = true;
            assertEquals(r.estimate(s), ranked.estimate(k));
            assertEquals(r.ciLow(s, 0.95), ranked.low(k));
            if (k > 0) {
                assertTrue(ranked.estimate(k - 1) <= ranked.estimate(k));
            }
        }
        // decisions: outcome, outreach, 6 optional controls, rows, errors, fixed effects
        assertEquals(11, ranked.factors().size());
        assertEquals(2 + 2 + 6 + 3 + 3 + 2, ranked.gridRows().size());
    }

    @Test
    void filterKeepsExactlyTheSpecificationsWhoseChoicesAreAllAllowed() {
        SplittableRandom random = new SplittableRandom(3);
        for (int trial = 0; trial < 20; trial++) {
            Selection selection = Selection.all(ranked.factors());
            int drops = 1 + random.nextInt(3);
            for (int d = 0; d < drops; d++) {
                Factor f = ranked.factors().get(random.nextInt(ranked.factors().size()));
                selection = selection.drop(f.id(), random.nextInt(f.levels().size()));
            }
            int[] kept = SpecificationFilter.keep(ranked, selection);
            assertArrayEquals(bruteForceKept(selection), slotsOf(kept), selection.dropText());
            assertEquals(selection.dropText(), Selection.parse(ranked.factors(), selection.dropText()).dropText());
        }
    }

    @Test
    void summaryMatchesPercentilesOfTheKeptEstimates() {
        Selection selection = Selection.all(ranked.factors()).drop(0, 1);
        int[] kept = SpecificationFilter.keep(ranked, selection);
        CurveSummary s = CurveSummary.of(ranked, kept);
        double[] e = estimates(kept);
        Percentile p = new Percentile().withEstimationType(EstimationType.R_7);
        assertEquals(kept.length, s.count());
        assertEquals(p.evaluate(e, 50), s.median(), 1e-12);
        assertEquals(p.evaluate(e, 25), s.lowerQuartile(), 1e-12);
        assertEquals(p.evaluate(e, 75), s.upperQuartile(), 1e-12);
        long sigPositive = Arrays.stream(kept).filter(k -> ranked.run().results().pValue(ranked.slot(k)) < 0.05
                && ranked.estimate(k) > 0).count();
        assertEquals(sigPositive / (double) kept.length, s.shareSignificantPositive(), 1e-15);
        assertEquals(0, CurveSummary.of(ranked, new int[0]).count());
    }

    @Test
    void influenceMatchesOneWayAnalysisOfVariancePerFactorAndPercentilesPerLevel() {
        int[] kept = SpecificationFilter.keep(ranked, Selection.all(ranked.factors()).drop(8, 2));
        Influence influence = new DecisionInfluence().of(ranked, kept);
        Percentile p = new Percentile().withEstimationType(EstimationType.R_7);
        int n = kept.length;
        for (Factor f : ranked.factors()) {
            List<double[]> groups = new ArrayList<>();
            for (int l = 0; l < f.levels().size(); l++) {
                int level = l;
                double[] g = Arrays.stream(kept).filter(k -> ranked.level(f.id(), k) == level)
                        .mapToDouble(ranked::estimate).toArray();
                Influence.LevelEstimates stats = influence.factors().get(f.id()).levels().get(l);
                assertEquals(f.levels().get(l), stats.label());
                assertEquals(g.length, stats.count());
                if (g.length == 0) {
                    assertTrue(Double.isNaN(stats.median()));
                    continue;
                }
                groups.add(g);
                assertEquals(Arrays.stream(g).average().orElseThrow(), stats.mean(), 1e-12);
                assertEquals(p.evaluate(g, 25), stats.lowerQuartile(), 1e-12);
                assertEquals(p.evaluate(g, 50), stats.median(), 1e-12);
                assertEquals(p.evaluate(g, 75), stats.upperQuartile(), 1e-12);
            }
            if (groups.size() < 2) {
                continue;
            }
            // share = SSB / SST = F (k - 1) / (F (k - 1) + n - k), F from Commons Math
            double fValue = new OneWayAnova().anovaFValue(groups);
            int k = groups.size();
            double expected = fValue * (k - 1) / (fValue * (k - 1) + n - k);
            assertEquals(expected, influence.factors().get(f.id()).varianceShare(), 1e-10, f.name());
        }
    }

    @Test
    void theWholeSetsInfluenceIsTheOneSummaryJsonReports() {
        int[] kept = SpecificationFilter.keep(ranked, Selection.all(ranked.factors()));
        Influence influence = new DecisionInfluence().of(ranked, kept);
        int[] slots = new int[run.results().size()];
        for (int s = 0; s < slots.length; s++) {
            slots[s] = s;
        }
        org.forkscape.infer.InfluenceReport report = org.forkscape.infer.Influence.of(run, slots);
        String sentence = report.sentence();
        assertEquals(Character.toUpperCase(sentence.charAt(0)) + sentence.substring(1) + ".", influence.sentence());
        assertEquals(report.shareSignificant(), influence.shareDominant(), 1e-15);
        assertEquals(report.interactionsShare(), influence.interactions(), 1e-12);
        for (int f = 0; f < report.factors().size(); f++) {
            assertEquals(report.factors().get(f).varianceShare(), influence.factors().get(f).varianceShare(), 1e-12);
        }
        // a control's level 1 is the explorer's "with" and the inference report's "in"
        Influence.LevelEstimates with = influence.factors().get(2).levels().get(1);
        assertEquals("with", with.label());
        assertEquals("in", report.factors().get(2).factor().reportLabel(1));
        assertEquals(report.factors().get(2).mean()[1], with.mean(), 1e-12);
        assertEquals("No specification has an estimate.", new DecisionInfluence().of(ranked, new int[0]).sentence());
    }

    @Test
    void binsSummariseTheirMembersAndGridSharesCountAlternatives() {
        int[] kept = SpecificationFilter.keep(ranked, Selection.all(ranked.factors()));
        DisplayOrder order = DisplayOrder.byEstimate(kept);
        Curve curve = CurveReducer.reduce(ranked, order, 400);
        assertEquals("bins", curve.mode());
        assertNull(curve.points());
        Curve.Bins bins = curve.bins();
        assertEquals(400, bins.from().length);
        assertEquals(0, bins.from()[0]);
        assertEquals(kept.length, bins.to()[399]);
        Percentile p = new Percentile().withEstimationType(EstimationType.R_7);
        for (int b = 0; b < 400; b += 37) {
            int[] members = Arrays.copyOfRange(order.ranks(), bins.from()[b], bins.to()[b]);
            double[] e = estimates(members);
            assertEquals(Arrays.stream(e).min().orElseThrow(), bins.min()[b]);
            assertEquals(Arrays.stream(e).max().orElseThrow(), bins.max()[b]);
            assertEquals(p.evaluate(e, 50), bins.median()[b], 1e-12);
            assertEquals(Arrays.stream(members).mapToDouble(ranked::low).min().orElseThrow(), bins.low()[b]);
            assertEquals(Arrays.stream(members).mapToDouble(ranked::high).max().orElseThrow(), bins.high()[b]);
            for (int r = 0; r < ranked.gridRows().size(); r++) {
                RankedRun.GridRow row = ranked.gridRows().get(r);
                long using = Arrays.stream(members).filter(k -> ranked.level(row.factor(), k) == row.level()).count();
                assertEquals(using / (double) members.length, bins.share()[r][b], 1e-15);
            }
        }
    }

    @Test
    void groupedOrderKeepsEstimateOrderInsideEachGroupAndBinsStraddlingGroupsStillHaveTheirMedian() {
        int[] kept = SpecificationFilter.keep(ranked, Selection.all(ranked.factors()));
        int rows = 8; // the sample decision: all, urban, trimmed
        DisplayOrder order = DisplayOrder.groupedBy(ranked, kept, rows);
        assertEquals(3, order.groups().size());
        assertEquals(kept.length, order.size());
        for (DisplayOrder.Group g : order.groups()) {
            for (int i = g.from(); i < g.to(); i++) {
                assertEquals(g.label(), ranked.factors().get(rows).levels().get(ranked.level(rows, order.ranks()[i])));
                if (i > g.from()) {
                    assertTrue(order.ranks()[i - 1] < order.ranks()[i]);
                }
            }
        }
        Curve.Bins bins = CurveReducer.reduce(ranked, order, 333).bins();
        Percentile p = new Percentile().withEstimationType(EstimationType.R_7);
        for (int b = 0; b < 333; b++) {
            double[] e = estimates(Arrays.copyOfRange(order.ranks(), bins.from()[b], bins.to()[b]));
            assertEquals(p.evaluate(e, 50), bins.median()[b], 1e-12);
        }
    }

    @Test
    void smallSetsAreSentAsPoints() {
        Selection selection = Selection.all(ranked.factors()).drop(0, 1).drop(1, 1).drop(9, 0).drop(9, 1);
        int[] kept = SpecificationFilter.keep(ranked, selection);
        Curve curve = CurveReducer.reduce(ranked, DisplayOrder.byEstimate(kept), 800);
        assertEquals("points", curve.mode());
        assertEquals(kept.length, curve.points().spec().length);
        for (int i = 0; i < kept.length; i++) {
            assertEquals(ranked.run().results().specIndex(ranked.slot(kept[i])) + 1, curve.points().spec()[i]);
            assertEquals(ranked.level(3, kept[i]), curve.points().levels()[3][i]);
        }
    }

    @Test
    void badDropParametersAreRefusedAtDrop() {
        InputException e = assertThrows(InputException.class, () -> Selection.parse(ranked.factors(), "0.9"));
        assertEquals("drop", e.where());
        assertThrows(InputException.class, () -> Selection.parse(ranked.factors(), "x"));
        assertThrows(InputException.class, () -> Selection.parse(ranked.factors(), "99.0"));
        assertEquals("", Selection.parse(ranked.factors(), " ").dropText());
    }

    private static double[] estimates(int[] ranks) {
        return Arrays.stream(ranks).mapToDouble(ranked::estimate).toArray();
    }

    private static int[] slotsOf(int[] ranks) {
        int[] s = Arrays.stream(ranks).map(ranked::slot).toArray();
        Arrays.sort(s);
        return s;
    }

    /** The kept slots by decoding each specification's index, independent of the ranked columns. */
    @Test
    void alternativeCountsOfAFilteredSetMatchDecodingEachKeptSpecification() {
        Selection selection = Selection.all(ranked.factors()).drop(0, 1).drop(4, 0);
        int[] kept = SpecificationFilter.keep(ranked, selection);
        int[][] counts = AlternativeCounts.of(ranked, kept);
        SpecificationSpace space = run.models().space();
        long[] choices = new long[run.plan().decisions().size()];
        int[][] direct = new int[ranked.factors().size()][];
        for (Factor f : ranked.factors()) {
            direct[f.id()] = new int[f.levels().size()];
        }
        for (int s : bruteForceKept(selection)) {
            space.decode(run.results().specIndex(s), choices);
            for (Factor f : ranked.factors()) {
                long c = choices[f.decisionIndex()];
                direct[f.id()][f.isControl() ? (int) ((c >> f.controlBit()) & 1) : (int) c]++;
            }
        }
        assertArrayEquals(direct, counts);
        assertEquals(0, counts[0][1], "a dropped alternative is used by no shown specification");
        assertEquals(kept.length, Arrays.stream(counts[2]).sum());
    }

    private static int[] bruteForceKept(Selection selection) {
        ResultTable r = run.results();
        SpecificationSpace space = run.models().space();
        List<Decision> decisions = run.plan().decisions();
        long[] choices = new long[decisions.size()];
        List<Integer> out = new ArrayList<>();
        for (int s = 0; s < r.size(); s++) {
            if (!r.fitted(s)) {
                continue;
            }
            space.decode(r.specIndex(s), choices);
            boolean keep = true;
            for (Factor f : ranked.factors()) {
                long c = choices[f.decisionIndex()];
                int level = f.isControl() ? (int) ((c >> f.controlBit()) & 1) : (int) c;
                keep &= selection.allowed(f.id(), level);
            }
            if (keep) {
                out.add(s);
            }
        }
        return out.stream().mapToInt(Integer::intValue).toArray();
    }

    @Test
    void everyFittedSpecificationAppearsWhenNothingIsDropped() {
        int[] kept = SpecificationFilter.keep(ranked, Selection.all(ranked.factors()));
        assertArrayEquals(bruteForceKept(Selection.all(ranked.factors())), slotsOf(kept));
    }
}
