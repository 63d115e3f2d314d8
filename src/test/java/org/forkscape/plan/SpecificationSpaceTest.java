package org.forkscape.plan;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Path;
import java.util.Arrays;
import java.util.HashSet;
import java.util.Set;
import org.junit.jupiter.api.Test;

/** Counting, numbering and sampling the specifications of a plan without materialising them. */
class SpecificationSpaceTest {
    /** Radices 2 (outcome), 3 (predictor), 4 (two optional controls), 2 (errors): 48 specifications. */
    static Plan plan(int optionalControls) {
        StringBuilder optional = new StringBuilder();
        for (int i = 0; i < optionalControls; i++) {
            optional.append(i == 0 ? "" : ", ").append("\"c").append(i).append('"');
        }
        return new PlanReader(false).read("{\"data\": \"d.csv\", \"decisions\": ["
                + "{\"name\": \"y\", \"kind\": \"outcome\", \"alternatives\": [{\"label\": \"y1\", \"column\": \"y1\"}, "
                + "{\"label\": \"y2\", \"column\": \"y2\"}]},"
                + "{\"name\": \"x\", \"kind\": \"predictor\", \"alternatives\": [{\"label\": \"x1\", \"column\": \"x1\"}, "
                + "{\"label\": \"x2\", \"column\": \"x2\"}, {\"label\": \"x3\", \"column\": \"x3\"}]},"
                + "{\"name\": \"c\", \"kind\": \"controls\", \"optional\": [" + optional + "]},"
                + "{\"name\": \"se\", \"kind\": \"errors\", \"alternatives\": [\"classical\", \"HC1\"]}]}", Path.of("."));
    }

    @Test
    void theCountIsTheProductOfTheAlternativeCounts() {
        assertEquals(2 * 3 * 4 * 2, new SpecificationSpace(plan(2)).size());
        assertEquals(2 * 3 * 2, new SpecificationSpace(plan(0)).size());
        assertEquals(2L * 3 * (1L << 40) * 2, new SpecificationSpace(plan(40)).size());
    }

    @Test
    void aCountBeyondLongIsReportedAsLongMaxValue() {
        Plan p = plan(40);
        Decision controls = p.decisions().get(2);
        Plan huge = new Plan(p.dataFile(), p.confidence(), p.missing(),
                java.util.List.of(p.decisions().get(0), p.decisions().get(1), controls,
                        new Decision.Controls("c2", java.util.List.of(), ((Decision.Controls) controls).optional().stream()
                                .map(s -> s + "b").toList(), null)),
                0, 1, Plan.DEFAULT_MAX_SPECIFICATIONS, 0, "bootstrap", null, null);
        assertEquals(Long.MAX_VALUE, new SpecificationSpace(huge).size());
    }

    @Test
    void decodeAndEncodeAreInversesWithTheLastDecisionFastest() {
        SpecificationSpace s = new SpecificationSpace(plan(2));
        long[] c = new long[4];
        s.decode(0, c);
        assertArrayEquals(new long[] {0, 0, 0, 0}, c);
        s.decode(1, c);
        assertArrayEquals(new long[] {0, 0, 0, 1}, c);
        s.decode(2, c);
        assertArrayEquals(new long[] {0, 0, 1, 0}, c);
        s.decode(47, c);
        assertArrayEquals(new long[] {1, 2, 3, 1}, c);
        // 1*24 + 2*8 + 3*2 + 1 with radices 2, 3, 4, 2
        s.decode(24 + 16 + 4 + 1, c);
        assertArrayEquals(new long[] {1, 2, 2, 1}, c);
        Set<String> seen = new HashSet<>();
        for (long i = 0; i < s.size(); i++) {
            s.decode(i, c);
            assertEquals(i, s.encode(c));
            assertTrue(seen.add(Arrays.toString(c)));
        }
        assertEquals(48, seen.size());
    }

    @Test
    void indicesAndChoicesOutsideTheSpaceAreRefused() {
        SpecificationSpace s = new SpecificationSpace(plan(2));
        long[] c = new long[4];
        assertThrows(IndexOutOfBoundsException.class, () -> s.decode(48, c));
        assertThrows(IndexOutOfBoundsException.class, () -> s.decode(-1, c));
        assertThrows(IndexOutOfBoundsException.class, () -> s.encode(new long[] {0, 3, 0, 0}));
        assertThrows(IndexOutOfBoundsException.class, () -> s.encode(new long[] {0, 0, -1, 0}));
    }

    @Test
    void withoutASampleEveryIndexIsFittedInOrder() {
        SpecificationSpace s = new SpecificationSpace(plan(2));
        long[] all = s.indices(0, 7);
        assertEquals(48, all.length);
        for (int i = 0; i < all.length; i++) {
            assertEquals(i, all[i]);
        }
        assertArrayEquals(all, s.indices(48, 7));
        assertArrayEquals(all, s.indices(1000, 7));
    }

    @Test
    void aSeededSampleIsDistinctSortedInRangeAndTheSameForTheSameSeed() {
        SpecificationSpace s = new SpecificationSpace(plan(40));
        long[] a = s.indices(5000, 42);
        assertEquals(5000, a.length);
        assertEquals(5000, Arrays.stream(a).distinct().count());
        for (int i = 1; i < a.length; i++) {
            assertTrue(a[i - 1] < a[i]);
        }
        assertTrue(a[0] >= 0 && a[a.length - 1] < s.size());
        assertArrayEquals(a, s.indices(5000, 42));
        assertArrayEquals(a, new SpecificationSpace(plan(40)).indices(5000, 42));
        assertFalse(Arrays.equals(a, s.indices(5000, 43)));
    }

    /**
     * Sampling without replacement gives each index the inclusion probability n/N (Floyd's algorithm is
     * exact, Bentley &amp; Floyd 1987). Over 4,800 seeded samples of 12 of 48, each index is expected
     * 1,200 times with binomial standard deviation sqrt(4800 * 0.25 * 0.75) = 30; six deviations is
     * the bound (common practice for a fixed-seed check that must not flake).
     */
    @Test
    void everyIndexIsEquallyLikelyToBeSampled() {
        SpecificationSpace s = new SpecificationSpace(plan(2));
        int[] hits = new int[48];
        for (long seed = 0; seed < 4800; seed++) {
            for (long i : s.indices(12, seed)) {
                hits[(int) i]++;
            }
        }
        for (int i = 0; i < 48; i++) {
            assertTrue(Math.abs(hits[i] - 1200) < 6 * 30, "index " + i + " drawn " + hits[i] + " times");
        }
    }

    @Test
    void aCountTooLargeForOneRunIsRefused() {
        SpecificationSpace s = new SpecificationSpace(plan(40));
        assertThrows(IllegalArgumentException.class, () -> s.indices(0, 1));
    }
}
