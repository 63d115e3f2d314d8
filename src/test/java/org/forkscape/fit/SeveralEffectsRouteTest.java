package org.forkscape.fit;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNotEquals;
import static org.junit.jupiter.api.Assertions.assertNotNull;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertSame;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.net.URISyntaxException;
import java.nio.file.Path;
import java.util.BitSet;
import org.forkscape.data.CsvTableReader;
import org.forkscape.data.Table;
import org.forkscape.plan.Plan;
import org.forkscape.plan.PlanReader;
import org.junit.jupiter.api.Test;

/**
 * Which route absorbs what, on the reference plan {@code school-panel-plan.json} (whose numbers
 * {@code reference.RTwoWayEffectsReferenceTest} holds against R): one column through the cell sums, two through
 * the alternating projections, each usable row set demeaned on its own, the same numbers when demeaned again,
 * and the bounded cache of demeaned rows.
 */
class SeveralEffectsRouteTest {
    private static final int NONE = 0;
    private static final int PUPIL = 1;
    private static final int BOTH = 3;

    private final Plan plan;
    private final Table table;
    private final SpecificationModels models;

    SeveralEffectsRouteTest() throws URISyntaxException {
        Path path = Path.of(SeveralEffectsRouteTest.class.getResource("/reference/school-panel-plan.json").toURI());
        plan = new PlanReader(false).read(path);
        table = new CsvTableReader().read(plan.dataFile());
        models = new SpecificationModels(plan, table);
    }

    private DataVariant variant(int absorbChoice) {
        return models.variant(new VariantKey(new int[] {0}, absorbChoice));
    }

    @Test
    void oneColumnTakesTheCellSumsAndTwoTheProjections() {
        DataVariant pupil = variant(PUPIL);
        assertFalse(pupil.absorbsSeveral);
        assertTrue(pupil.levels > 1, "one absorbed column: its levels are the cells' levels");
        DataVariant both = variant(BOTH);
        assertTrue(both.absorbsSeveral);
        assertEquals(1, both.levels, "two absorbed columns: one cell level, the projections do the rest");
        assertEquals("pupil, term", both.absorbColumn);
        assertFalse(variant(NONE).absorbs);
    }

    @Test
    void eachUsableRowSetIsDemeanedOnItsOwn() {
        DataVariant both = variant(BOTH);
        long attendance = 1L << both.layout.variable("attendance", true);
        Moments without = both.moments(0);
        Moments with = both.moments(attendance);
        assertNotEquals(without.usableGroups, with.usableGroups);
        assertTrue(with.n < without.n, "attendance has missing cells");
        assertTrue(without.demeaned && with.demeaned, "both converged");
        // 51 pupils and 10 terms in two components (R: the rank of the factors' model matrix, 59)
        assertEquals(59, without.levelsPresent);
        assertSame(without, both.moments(0), "moments are cached per usable row set");
        // the rows a pass reads are the set's own demeaned rows: zero outside it, and orthogonal to a level
        double[][] rowsWith = both.rowColumns(with);
        int y = models.layout().outcomeColumn(0);
        double termSum = 0;
        int[] term = both.coded.dimensionCodes[1];
        for (int r = 0; r < both.rows; r++) {
            if (!with.uses(r)) {
                assertEquals(0.0, rowsWith[y][r]);
            } else if (term[r] == 0) {
                termSum += rowsWith[y][r];
            }
        }
        assertEquals(0, termSum, 1e-12 * Math.sqrt(with.totalSquares[y]), "demeaned within the first term");
    }

    @Test
    void demeaningAgainGivesTheSameNumbers() {
        DataVariant both = variant(BOTH);
        Moments mom = both.moments(0);
        SeveralEffectsWithin first = SeveralEffectsWithin.of(both, mom.usableGroups);
        SeveralEffectsWithin again = SeveralEffectsWithin.of(both, mom.usableGroups);
        for (int j = 0; j < both.columns; j++) {
            if (first.columns[j] != null) {
                assertArrayEquals(first.columns[j], again.columns[j], 0.0, "column " + j);
            }
        }
        assertArrayEquals(mom.within, again.within, 0.0);
    }

    @Test
    void theCacheEvictsTheLeastRecentlyUsedSetButKeepsTheLatest() {
        DemeanedCache cache = new DemeanedCache(10);
        BitSet a = BitSet.valueOf(new long[] {1});
        BitSet b = BitSet.valueOf(new long[] {2});
        BitSet c = BitSet.valueOf(new long[] {3});
        cache.put(a, new double[][] {new double[6]});
        cache.put(b, new double[][] {new double[4], null});
        assertNotNull(cache.get(a));
        cache.put(c, new double[][] {new double[5]});
        assertNull(cache.get(b), "b was used least recently");
        assertNotNull(cache.get(c));
        cache.put(b, new double[][] {new double[20]});
        assertNotNull(cache.get(b), "the latest set is kept whatever its size");
        assertNull(cache.get(a));
        assertNull(cache.get(c));
    }
}
