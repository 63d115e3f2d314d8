package org.forkscape.infer;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.forkscape.data.Table;
import org.forkscape.plan.ModelFamily;
import org.forkscape.plan.Plan;
import org.forkscape.run.MultiverseRunner;
import org.forkscape.run.ResultTable;
import org.forkscape.run.RunProgress;
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

    static void assertSameDraws(NullDrawResult a, NullDrawResult b) {
        assertEquals(a.drawCount(), b.drawCount());
        for (int d = 0; d < a.drawCount(); d++) {
            assertEquals(a.draw(d), b.draw(d), "draw " + (d + 1));
        }
        assertEquals(a.failedFits(), b.failedFits());
        assertEquals(a.curveCount(), b.curveCount());
        for (int c = 0; c < a.curveCount(); c++) {
            for (int d = 0; d < a.drawCount(); d++) {
                assertEquals(a.drawCurve(d, c).statistics(), b.drawCurve(d, c).statistics(), "curve " + c);
                assertArrayEquals(a.drawCurve(d, c).atRanks(), b.drawCurve(d, c).atRanks(), 0, "curve " + c);
            }
            // the per-group tests and the rank-by-rank band as summary.json writes them
            assertEquals(a.curveJson(c), b.curveJson(c), "curve " + c);
        }
    }

    @Test
    void drawsDoNotDependOnTheThreadCount() {
        Table table = Scenarios.table(90, 0.2, 7, 12);
        RunResult run = Scenarios.run(PLAN, table);
        assertEquals(96, run.results().size(), "2 outcomes x 2 codings x 8 control sets x 3 error types");
        assertEquals(4 + 2, Scenarios.nullDraws(run, 1, NullMethod.BOOTSTRAP, 99, null, 1).curveCount(),
                "a curve per outcome and coding, then the t statistic and the partial correlation");
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

    /** Least squares with two-way clustered errors: single rows by default, or whole clusters of one of them. */
    @Test
    void multiwayClusteredDrawsDoNotDependOnTheThreadCount() {
        String plan = PLAN.replace("[\"classical\", \"HC3\", \"cluster:g\"]", "[\"HC1\", \"cluster:g+pass\"]");
        RunResult run = Scenarios.run(plan, Scenarios.table(90, 0.2, 7, 12));
        assertEquals(64, run.results().size(), "2 outcomes x 2 codings x 8 control sets x 2 error types");
        for (String cluster : new String[] {null, "g"}) {
            NullDrawResult one = Scenarios.nullDraws(run, 30, NullMethod.BOOTSTRAP, 5, cluster, 1);
            NullDrawResult three = Scenarios.nullDraws(run, 30, NullMethod.BOOTSTRAP, 5, cluster, 3);
            assertSameDraws(one, three);
            assertTrue(one.failedFits() < 30L * 64 / 10, cluster + ": " + one.failedFits() + " failed fits");
        }
    }

    /** The generalized linear models: their fits, warm-started from the plan's tree, and their refits in draws. */
    @Test
    void generalizedLinearFitsAndDrawsDoNotDependOnTheThreadCount() {
        String plan = PLAN.replace("""
                {"label": "score", "column": "y"}, {"label": "score (standardized)", "column": "y2"}]},""", """
                {"label": "passed", "column": "pass"}]},""").replace("""
               {"name": "errors", "kind": "errors", "alternatives": ["classical", "HC3", "cluster:g"]}""", """
               {"name": "errors", "kind": "errors", "alternatives": ["classical", "HC3", "cluster:g"]},
               {"name": "model", "kind": "model", "alternatives": ["logit", "probit"]}""");
        Table table = Scenarios.table(120, 0.4, 11, 12);
        Plan parsed = Scenarios.plan(plan);
        ResultTable one = new MultiverseRunner(1).run(parsed, table, RunProgress.SILENT, null).results();
        RunResult run = new MultiverseRunner(3).run(parsed, table, RunProgress.SILENT, null);
        ResultTable three = run.results();
        assertEquals(96, three.size(), "2 codings x 8 control sets x 3 error types x 2 models");
        for (int s = 0; s < one.size(); s++) {
            assertEquals(ModelFamily.values()[1 + s % 2], three.family(s));
            assertEquals(one.status(s), three.status(s));
            assertTrue(three.fitted(s), three.status(s));
            assertEquals(Double.doubleToRawLongBits(one.estimate(s)), Double.doubleToRawLongBits(three.estimate(s)));
            assertEquals(Double.doubleToRawLongBits(one.stdError(s)), Double.doubleToRawLongBits(three.stdError(s)));
            assertEquals(Double.doubleToRawLongBits(one.effect(s)), Double.doubleToRawLongBits(three.effect(s)));
            assertEquals(Double.doubleToRawLongBits(one.effectStdError(s)),
                    Double.doubleToRawLongBits(three.effectStdError(s)));
        }
        for (NullMethod method : NullMethod.values()) {
            NullDrawResult a = Scenarios.nullDraws(run, 12, method, 3, null, 1);
            NullDrawResult b = Scenarios.nullDraws(run, 12, method, 3, null, 2);
            assertSameDraws(a, b);
            assertEquals(0, a.failedFits(), "every refit converges on these data");
        }
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
