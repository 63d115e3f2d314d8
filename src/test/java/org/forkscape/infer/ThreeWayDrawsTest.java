package org.forkscape.infer;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.SplittableRandom;
import org.forkscape.data.CategoricalColumn;
import org.forkscape.data.Table;
import org.forkscape.run.RunResult;
import org.junit.jupiter.api.Test;

/**
 * Null draws beside three absorbed columns: as {@link TwoWayDrawsTest}, a draw's fit of every specification must
 * be the engine's own fit of the resampled data set, to 1e-9 relative, with its df (whose K is the exact rank of
 * the draw's own dummies) and statuses. The same panel (two groups of pupils whose terms never meet, missing
 * cells, weights with zeros and missing values, a redundant control), absorbing pupil, term and a crossed
 * grouping h, or pupil, term and school (s, a copy of the school g, nested in the pupil, so its dummies add
 * nothing to the rank; a copy, because a resampled school's copies are new clusters of g but keep their pupils'
 * and their school's fixed-effect levels, as the draws do); the error types beside three columns (classical,
 * HC0, HC1, HC2 and HC3 with the exact leverages of the drawn rows, one- and two-way clusters).
 */
class ThreeWayDrawsTest {
    private static final String PLAN = """
            {"data": "panel.csv",
             "decisions": [
               {"name": "outcome", "kind": "outcome", "alternatives": [{"label": "y", "column": "y"}]},
               {"name": "key", "kind": "predictor", "alternatives": [
                  {"label": "x", "column": "x"}, {"label": "x2", "column": "x2"}]},
               {"name": "controls", "kind": "controls", "optional": ["a", "b", "c"]},
               {"name": "errors", "kind": "errors", "alternatives": ["classical", "HC0", "HC1", "HC2", "HC3", "cluster:g",
                  "cluster:g+h"]},
               {"name": "fe", "kind": "absorb", "alternatives": [{"label": "none", "columns": []},
                  {"label": "pupil, term and h", "columns": ["f", "t", "h"]},
                  {"label": "pupil, term and school", "columns": ["f", "t", "s"]}]}%s
             ]}
            """;
    private static final String WEIGHTED = PLAN.formatted("""
            ,
               {"name": "weights", "kind": "weights", "alternatives": [{"label": "unweighted"},
                  {"label": "w", "column": "w"}]}""");
    private static final String UNWEIGHTED = PLAN.formatted("");

    /** {@link TwoWayDrawsTest}'s panel with s, a copy of the school column g. */
    private static Table panel(boolean missingKey) {
        Table t = TwoWayDrawsTest.panel(missingKey);
        CategoricalColumn g = (CategoricalColumn) t.column("g");
        java.util.List<org.forkscape.data.Column> columns = new java.util.ArrayList<>(t.columns());
        columns.add(new CategoricalColumn("s", g.codes().clone(), g.levels()));
        return new Table(t.source(), columns);
    }

    @Test
    void rowBootstrapEqualsTheEngineOnTheRepeatedRows() {
        Table table = panel(false);
        int[] weights = ResampledVariantTest.rowDrawCounts(table.rowCount(), 5);
        int[] compared = TwoWayDrawsTest.compare(WEIGHTED, table, ResampledVariantTest.repeat(table, weights, null),
                rv -> rv.bootstrap(weights, null), choice -> choice > 0);
        assertTrue(compared[1] > 300, "three-way specifications compared: " + compared[1] + " of " + compared[0]);
    }

    /** Whole schools drawn, each copy a new school; one draw leaves out every school of one group of pupils. */
    @Test
    void clusterBootstrapEqualsTheEngineWithEachCopyOfASchoolANewSchool() {
        Table table = panel(false);
        int[] school = ((CategoricalColumn) table.column("g")).codes();
        for (int[] schoolDraws : new int[][] {{2, 0, 1, 1, 0, 1, 3, 0, 1, 1}, {0, 0, 0, 0, 0, 3, 2, 1, 2, 2}}) {
            int[] weights = new int[table.rowCount()];
            for (int i = 0; i < weights.length; i++) {
                weights[i] = schoolDraws[school[i]];
            }
            int[] compared = TwoWayDrawsTest.compare(WEIGHTED, table, ResampledVariantTest.repeat(table, weights, "g"),
                    rv -> rv.bootstrap(weights, school), choice -> choice > 0);
            assertTrue(compared[1] > 300, "three-way specifications compared: " + compared[1] + " of " + compared[0]);
        }
    }

    @Test
    void permutationEqualsTheEngineOnThePermutedPredictor() {
        Table table = panel(true);
        int[] order = new int[table.rowCount()];
        ResampleDesign.of(table, null).order(new SplittableRandom(23), order);
        int[] compared = TwoWayDrawsTest.compare(UNWEIGHTED, table, TwoWayDrawsTest.permuteKey(table, order),
                rv -> rv.permute(order), choice -> choice > 0);
        assertTrue(compared[1] > 150, "three-way specifications compared: " + compared[1] + " of " + compared[0]);
    }

    @Test
    void threeWayDrawsDoNotDependOnTheThreadCount() {
        RunResult run = Scenarios.run(WEIGHTED, panel(false));
        assertEquals(2 * 8 * 7 * 3 * 2, run.results().size());
        for (String cluster : new String[] {null, "g"}) {
            NullDrawsDeterminismTest.assertSameDraws(Scenarios.nullDraws(run, 8, NullMethod.BOOTSTRAP, 7, cluster, 1),
                    Scenarios.nullDraws(run, 8, NullMethod.BOOTSTRAP, 7, cluster, 3));
        }
    }
}
