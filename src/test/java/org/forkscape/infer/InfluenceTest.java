package org.forkscape.infer;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;

import java.util.ArrayList;
import java.util.List;
import org.forkscape.plan.Factor;
import org.junit.jupiter.api.Test;

/** Influence on small grids whose answers can be worked out by hand. */
class InfluenceTest {
    private static final Factor A = new Factor(0, "A", 0, null, -1, List.of("a1", "a2"));
    private static final Factor B = new Factor(1, "B", 1, null, -1, List.of("b1", "b2"));
    private static final Factor C = new Factor(2, "C", 2, null, -1, List.of("c1", "c2"));

    /** A full 2 x 2 x 2 factorial in row-major order (A slowest), with the given estimates and p-values. */
    private static SpecificationGrid cube(double[] estimate, double[] p) {
        int[][] levels = new int[3][8];
        for (int i = 0; i < 8; i++) {
            levels[0][i] = i >> 2 & 1;
            levels[1][i] = i >> 1 & 1;
            levels[2][i] = i & 1;
        }
        return new SpecificationGrid(List.of(A, B, C), levels, estimate, p, 0.05);
    }

    private static double[] significantUnless(boolean[] fails) {
        double[] p = new double[fails.length];
        for (int i = 0; i < p.length; i++) {
            p[i] = fails[i] ? 0.3 : 0.01;
        }
        return p;
    }

    @Test
    void twoByTwoSharesAreTheMainEffectsAndTheRestIsTheInteraction() {
        // estimates 1, 3 (A = a1) and 2, 6 (A = a2): grand mean 3, total SS 4 + 0 + 1 + 9 = 14;
        // A means 2 and 4: SS 2 (1 + 1) = 4; B means 1.5 and 4.5: SS 2 (2.25 + 2.25) = 9; interaction 1
        SpecificationGrid grid = new SpecificationGrid(List.of(A, B), new int[][] {{0, 0, 1, 1}, {0, 1, 0, 1}},
                new double[] {1, 3, 2, 6}, new double[] {0.01, 0.01, 0.01, 0.01}, 0.05);
        InfluenceReport r = Influence.of(grid);
        assertArrayEquals(new double[] {2, 4}, r.factors().get(0).mean(), 1e-15);
        assertArrayEquals(new double[] {1.5, 4.5}, r.factors().get(1).mean(), 1e-15);
        assertEquals(4.0 / 14, r.factors().get(0).varianceShare(), 1e-15);
        assertEquals(9.0 / 14, r.factors().get(1).varianceShare(), 1e-15);
        assertEquals(13.0 / 14, r.mainEffectsShare(), 1e-15);
        assertEquals(1.0 / 14, r.interactionsShare(), 1e-15);
        assertEquals("significant in the dominant sign (positive) in 100% of 4 specifications; no single choice and "
                + "no pair of choices brings it below half", r.sentence());
    }

    @Test
    void aSingleChoiceThatTurnsTheShareIsNamed() {
        // every specification with A = a2 fails: 4 of 8 significant overall (50%, not below half)
        boolean[] fails = {false, false, false, false, true, true, true, true};
        InfluenceReport r = Influence.of(cube(new double[] {1, 1, 1, 1, 1, 1, 1, 1}, significantUnless(fails)));
        assertEquals(0.5, r.shareSignificant(), 0);
        assertArrayEquals(new double[] {1, 0}, r.factors().get(0).shareSignificant(), 0);
        assertArrayEquals(new double[] {0.5, 0.5}, r.factors().get(1).shareSignificant(), 0);
        assertEquals("significant in the dominant sign (positive) in 50% of 8 specifications; below half only when "
                + "A = a2 (0% of 4)", r.sentence());
    }

    @Test
    void whenNoSingleChoiceDoesItPairsAreSearched() {
        // only A = a2 with B = b2 fails: 6 of 8 (75%); A = a2 alone and B = b2 alone keep 2 of 4 (50%)
        boolean[] fails = {false, false, false, false, false, false, true, true};
        InfluenceReport r = Influence.of(cube(new double[] {2, 2, 2, 2, 2, 2, 2, 2}, significantUnless(fails)));
        assertEquals("significant in the dominant sign (positive) in 75% of 8 specifications; no single choice "
                + "brings it below half; below half only when A = a2 and B = b2 (0% of 2)", r.sentence());
        assertEquals(1, r.restrictionsFound());
        assertEquals(List.of(new InfluenceReport.Condition("A", "a2"), new InfluenceReport.Condition("B", "b2")),
                r.restrictions().get(0).conditions());
    }

    @Test
    void belowHalfOverallSearchesForWhatBringsItToHalf() {
        // significant only when A = a1 and B = b1: 2 of 8 (25%); A = a1 and B = b1 each reach 2 of 4
        boolean[] fails = {false, false, true, true, true, true, true, true};
        InfluenceReport r = Influence.of(cube(new double[] {1, 1, 1, 1, 1, 1, 1, 1}, significantUnless(fails)));
        assertEquals("significant in the dominant sign (positive) in 25% of 8 specifications; at least half only "
                + "when A = a1 (50% of 4), or when B = b1 (50% of 4)", r.sentence());
    }

    @Test
    void theDominantSignIsTheMediansAndSignificanceInTheOtherSignDoesNotCount() {
        // five negative estimates and three positive, all with p = 0.01: the dominant sign is negative and
        // only the five negative ones count
        double[] b = {-1, -1, -1, -1, -1, 2, 2, 2};
        double[] p = new double[8];
        java.util.Arrays.fill(p, 0.01);
        InfluenceReport r = Influence.of(cube(b, p));
        assertEquals(-1, r.dominantSign());
        assertEquals(5.0 / 8, r.shareSignificant(), 0);
        assertEquals("significant in the dominant sign (negative) in 62.5% of 8 specifications",
                r.sentence().substring(0, r.sentence().indexOf(';')));
    }

    @Test
    void aSubsetOfTheSpecificationsIsAnalysedOnItsOwn() {
        RunResultSlots slots = new RunResultSlots();
        InfluenceReport all = Influence.of(slots.run, InfluenceAgainstRTest.allSlots(slots.run.results().size()));
        InfluenceReport firstHalf = Influence.of(slots.run, slots.firstHalf());
        assertEquals(slots.run.results().size(), all.fitted());
        assertEquals(slots.run.results().size() / 2, firstHalf.fitted());
        // the first half of the specifications all use the first outcome: that factor no longer varies
        assertEquals(0, firstHalf.factors().get(0).varianceShare(), 0);
        assertEquals(0, firstHalf.factors().get(0).count()[1]);
    }

    @Test
    void percentagesBelowHalfNeverRoundToHalf() {
        assertEquals("49.6%", Influence.percent(0.496));
        assertEquals("49.97%", Influence.percent(0.4997));
        assertEquals("just under 50%", Influence.percent(0.499999));
        assertEquals("50%", Influence.percent(0.5));
        assertEquals("84.1%", Influence.percent(0.8412));
        assertEquals("> 99.9%", Influence.percent(0.9996));
    }

    /** A small real run (the simulated scenario) and the slots of its first outcome. */
    private static final class RunResultSlots {
        final org.forkscape.run.RunResult run = Scenarios.run(Scenarios.PLAN, Scenarios.table(50, 0.3, 4, 5));

        int[] firstHalf() {
            List<Integer> out = new ArrayList<>();
            for (int s = 0; s < run.results().size() / 2; s++) {
                out.add(s);
            }
            return out.stream().mapToInt(Integer::intValue).toArray();
        }
    }
}
