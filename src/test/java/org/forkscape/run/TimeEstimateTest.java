package org.forkscape.run;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Path;
import java.util.List;
import java.util.SplittableRandom;
import org.forkscape.InputException;
import org.forkscape.data.NumericColumn;
import org.forkscape.data.Table;
import org.forkscape.plan.Plan;
import org.forkscape.plan.PlanReader;
import org.junit.jupiter.api.Test;

/**
 * What the time estimate measures and how it extrapolates (not how fast anything is: the figures it
 * measures are whatever this machine gives, so only their relations are checked).
 */
class TimeEstimateTest {
    private static Table table() {
        SplittableRandom r = new SplittableRandom(3);
        int n = 2_000;
        double[] y = new double[n];
        double[] used = new double[n];
        double[] x = new double[n];
        double[][] c = new double[4][n];
        for (int i = 0; i < n; i++) {
            x[i] = r.nextGaussian();
            for (double[] column : c) {
                column[i] = r.nextGaussian() + 0.2 * x[i];
            }
            y[i] = 0.3 * x[i] + c[0][i] + r.nextGaussian();
            used[i] = r.nextDouble() < 1 / (1 + Math.exp(-y[i])) ? 1 : 0;
        }
        return new Table("bins.csv", List.of(new NumericColumn("y", y), new NumericColumn("used", used),
                new NumericColumn("x", x), new NumericColumn("c1", c[0]), new NumericColumn("c2", c[1]),
                new NumericColumn("c3", c[2]), new NumericColumn("c4", c[3])));
    }

    private static Plan plan(String extra, String models) {
        return new PlanReader(false).read("""
                {"data": "bins.csv", %s "decisions": [
                  {"name": "o", "kind": "outcome", "alternatives": [{"label": "used", "column": "used"}]},
                  {"name": "k", "kind": "predictor", "alternatives": [{"label": "x", "column": "x"},
                    {"label": "x standardized", "column": "x", "transform": "standardize"}]},
                  {"name": "c", "kind": "controls", "optional": ["c1", "c2", "c3", "c4"]},
                  {"name": "s", "kind": "sample", "alternatives": [{"label": "all"}, {"label": "some", "keep": "c4 < 1"},
                    {"label": "others", "keep": "c3 < 1"}, {"label": "first", "keep": "c1 < 1"},
                    {"label": "second", "keep": "c2 < 1"}]},
                  {"name": "e", "kind": "errors", "alternatives": ["classical", "HC1"]},
                  {"name": "m", "kind": "model", "alternatives": [%s]}]}
                """.formatted(extra, models), Path.of("."));
    }

    @Test
    void measuresAFewSpecificationsOfSeveralVariantsAndExtrapolatesToTheRun() {
        Plan plan = plan("", "\"ols\", \"logit\"");
        TimeEstimate e = TimeEstimate.of(plan, table(), 2);
        // 2 codings x 16 subsets x 5 samples x 2 error types x 2 models; a data variant per sample
        assertEquals(640, e.specifications());
        assertEquals(5, e.variants());
        assertEquals(TimeEstimate.MEASURED_VARIANTS, e.built());
        // 32 spread over the 4 variants built
        assertEquals(TimeEstimate.TIMED, e.timed());
        assertTrue(e.fittingSeconds() > 0);
        assertEquals(0, e.nullDrawSeconds());
        assertEquals(e.fittingSeconds(), e.seconds());
        assertTrue(e.text(2).contains("from 32 of the 640 specifications fitted on this machine and 4 of the 5 data "
                + "variants built"), e.text(2));
    }

    @Test
    void aSampleIsTimedAsTheSpecificationsItFits() {
        TimeEstimate e = TimeEstimate.of(plan("\"sample\": 20, \"seed\": 4,", "\"ols\", \"logit\""), table(), 1);
        assertEquals(20, e.specifications());
        assertTrue(e.timed() > 0 && e.timed() <= 20, "timed " + e.timed());
        assertTrue(e.built() <= e.variants() && e.built() <= TimeEstimate.MEASURED_VARIANTS);
    }

    /** Each null draw refits every specification (a generalized linear model's bootstrap), so it counts. */
    @Test
    void nullDrawsEnterTheEstimateAsOneFitOfTheRunEach() {
        TimeEstimate e = TimeEstimate.of(plan("\"nullDraws\": 25, \"nullMethod\": \"bootstrap\", \"seed\": 1,",
                "\"logit\""), table(), 2);
        assertEquals(25 * e.fittingSeconds(), e.nullDrawSeconds(), 1e-9 * e.nullDrawSeconds());
        assertEquals(e.fittingSeconds() + e.nullDrawSeconds(), e.seconds(), 1e-12);
        assertTrue(e.text(2).contains("null draws"), e.text(2));
    }

    @Test
    void aPlanThatCannotRunIsRefusedAsARunWouldBe() {
        Plan plan = plan("", "\"ols\"");
        Table table = new Table("bins.csv", List.of(new NumericColumn("y", new double[] {1, 2, 3})));
        assertThrows(InputException.class, () -> TimeEstimate.of(plan, table, 1));
    }

    @Test
    void wordsForPeople() {
        assertEquals("under a second", TimeEstimate.words(0.4));
        assertEquals("about 42 s", TimeEstimate.words(42.4));
        assertEquals("about 2 min 10 s", TimeEstimate.words(128));
        assertEquals("about 12 min", TimeEstimate.words(719));
        assertEquals("about 1 h 2 min", TimeEstimate.words(3725));
        assertEquals("about 3 h", TimeEstimate.words(3 * 3600 + 20));
    }
}
