package org.forkscape.infer;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotEquals;

import org.forkscape.data.Table;
import org.forkscape.run.RunResult;
import org.junit.jupiter.api.Test;

/**
 * The same seed gives bit-identical null draws whatever the number of threads, for the row bootstrap,
 * the cluster bootstrap and the permutation; another seed gives other draws.
 */
class NullDrawsDeterminismTest {
    private static final String PLAN = Scenarios.PLAN.replace("""
               {"name": "controls", "kind": "controls", "optional": ["a", "b", "c"]}""", """
               {"name": "controls", "kind": "controls", "optional": ["a", "b", "c"]},
               {"name": "errors", "kind": "errors", "alternatives": ["classical", "HC3", "cluster:g"]}""");

    private static void assertSameDraws(NullDrawResult a, NullDrawResult b) {
        assertEquals(a.drawCount(), b.drawCount());
        for (int d = 0; d < a.drawCount(); d++) {
            assertEquals(a.draw(d), b.draw(d), "draw " + (d + 1));
        }
        assertEquals(a.failedFits(), b.failedFits());
    }

    @Test
    void drawsDoNotDependOnTheThreadCount() {
        Table table = Scenarios.table(90, 0.2, 7, 12);
        RunResult run = Scenarios.run(PLAN, table);
        assertEquals(96, run.results().size(), "2 outcomes x 2 codings x 8 control sets x 3 error types");
        for (NullMethod method : NullMethod.values()) {
            NullDrawResult one = Scenarios.nullDraws(run, 40, method, 99, null, 1);
            NullDrawResult three = Scenarios.nullDraws(run, 40, method, 99, null, 3);
            assertSameDraws(one, three);
            assertEquals(one.pMedian(), three.pMedian(), 0);
            assertEquals(one.pShareSignificant(), three.pShareSignificant(), 0);
            assertEquals(one.pStouffer(), three.pStouffer(), 0);
        }
        NullDrawResult one = Scenarios.nullDraws(run, 40, NullMethod.BOOTSTRAP, 99, "g", 1);
        NullDrawResult two = Scenarios.nullDraws(run, 40, NullMethod.BOOTSTRAP, 99, "g", 2);
        assertSameDraws(one, two);
    }

    @Test
    void anotherSeedGivesOtherDraws() {
        RunResult run = Scenarios.run(PLAN, Scenarios.table(90, 0.2, 7, 12));
        NullDrawResult a = Scenarios.nullDraws(run, 5, NullMethod.BOOTSTRAP, 1, null, 2);
        NullDrawResult b = Scenarios.nullDraws(run, 5, NullMethod.BOOTSTRAP, 2, null, 2);
        assertNotEquals(a.draw(0).median(), b.draw(0).median());
        NullDrawResult again = Scenarios.nullDraws(run, 5, NullMethod.BOOTSTRAP, 1, null, 2);
        assertSameDraws(a, again);
    }

    @Test
    void aDrawDependsOnlyOnTheSeedAndItsNumber() {
        RunResult run = Scenarios.run(PLAN, Scenarios.table(90, 0.2, 7, 12));
        NullDrawResult ten = Scenarios.nullDraws(run, 10, NullMethod.PERMUTE, 5, null, 2);
        NullDrawResult four = Scenarios.nullDraws(run, 4, NullMethod.PERMUTE, 5, null, 1);
        for (int d = 0; d < 4; d++) {
            assertEquals(ten.draw(d), four.draw(d), "draw " + (d + 1));
        }
    }
}
