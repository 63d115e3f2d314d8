package org.forkscape.infer;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.List;
import org.forkscape.plan.Factor;
import org.junit.jupiter.api.Test;

/**
 * The bounded pair search the explorer uses: a hand-computable 2 x 2 set where no single level turns the
 * share significant below half (each leaves 1 of 2) but one pair does (0 of 1).
 */
class InfluencePairLimitTest {
    private static SpecificationGrid grid() {
        List<Factor> factors = List.of(new Factor(0, "a", 0, null, -1, List.of("a0", "a1")),
                new Factor(1, "b", 1, null, -1, List.of("b0", "b1")));
        int[][] levels = {{0, 0, 1, 1}, {0, 1, 0, 1}};
        return new SpecificationGrid(factors, levels, new double[] {1, 1, 1, 1}, new double[] {0.01, 0.01, 0.01, 0.5}, 0.05);
    }

    @Test
    void pairsAreSearchedWithinTheLimit() {
        InfluenceReport r = Influence.of(grid(), 4);
        assertEquals(Influence.of(grid()).sentence(), r.sentence());
        assertTrue(r.sentence().contains("below half only when a = a1 and b = b1 (0% of 1)"), r.sentence());
    }

    @Test
    void aboveTheLimitTheSentenceSaysPairsWereNotSearched() {
        InfluenceReport r = Influence.of(grid(), 3);
        assertEquals("significant in the dominant sign (positive) in 75% of 4 specifications; no single choice brings it "
                + "below half (pairs of choices are not searched in a set this large)", r.sentence());
        assertEquals(0, r.restrictionsFound());
    }
}
