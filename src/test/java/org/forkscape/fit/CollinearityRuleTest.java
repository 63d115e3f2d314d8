package org.forkscape.fit;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.SplittableRandom;
import org.forkscape.data.CategoricalColumn;
import org.forkscape.data.Column;
import org.forkscape.data.NumericColumn;
import org.forkscape.data.Table;
import org.forkscape.plan.Plan;
import org.forkscape.plan.PlanReader;
import org.forkscape.reference.ExactLeastSquares;
import org.forkscape.run.MultiverseRunner;
import org.forkscape.run.ResultTable;
import org.forkscape.run.RunProgress;
import org.forkscape.run.RunResult;
import org.junit.jupiter.api.Test;

/**
 * One collinearity rule for every route: a column is dropped when its remaining norm, after the fixed
 * effects and the columns before it, is below 1e-7 of its norm about the mean (R's lm, LINPACK dqrdc2).
 * Weather stations with station effects absorbed carry a station attribute (an elevation) recorded
 * three ways: exactly constant within a station, times (1 + 1e-9 u) (within/total norm ratio about
 * 1e-9: the rule drops it) and times (1 + 1e-5 u) (ratio about 1e-5: the rule keeps it). The run and the
 * full fit of the explorer's dialog must agree on the dropped set, K and the numbers; where the rule
 * drops a column the numbers must be those of the model without it (exact 90-digit arithmetic).
 */
class CollinearityRuleTest {
    static final int STATIONS = 30;
    static final int PER_STATION = 10;

    private static final String PLAN = "{\"data\": \"unused.csv\", \"decisions\": ["
            + "{\"name\": \"o\", \"kind\": \"outcome\", \"alternatives\": [{\"label\": \"y\", \"column\": \"y\"}]},"
            + "{\"name\": \"k\", \"kind\": \"predictor\", \"alternatives\": [{\"label\": \"x\", \"column\": \"x\"}]},"
            + "{\"name\": \"c\", \"kind\": \"controls\", \"required\": [\"rain\"], \"optional\": [\"elevation\","
            + "  \"elevation_noisy\", \"elevation_rounded\"]},"
            + "{\"name\": \"e\", \"kind\": \"errors\", \"alternatives\": [\"classical\", \"HC1\", \"HC3\","
            + "  \"cluster:station\"]},"
            + "{\"name\": \"f\", \"kind\": \"absorb\", \"alternatives\": [{\"label\": \"station\", \"columns\": [\"station\"]}]}]}";

    static Table weather() {
        SplittableRandom r = new SplittableRandom(7);
        int n = STATIONS * PER_STATION;
        double[] y = new double[n];
        double[] x = new double[n];
        double[] rain = new double[n];
        double[] elevation = new double[n];
        double[] rounded = new double[n];
        double[] noisy = new double[n];
        int[] station = new int[n];
        double[] height = new double[STATIONS];
        for (int s = 0; s < STATIONS; s++) {
            height[s] = 200 + 150 * r.nextGaussian();
        }
        for (int i = 0; i < n; i++) {
            int s = i / PER_STATION;
            station[i] = s;
            elevation[i] = height[s];
            rounded[i] = height[s] * (1 + 1e-9 * r.nextGaussian());
            noisy[i] = height[s] * (1 + 1e-5 * r.nextGaussian());
            rain[i] = r.nextGaussian();
            x[i] = 0.002 * height[s] + r.nextGaussian();
            y[i] = 0.5 * x[i] + 0.3 * rain[i] + 0.01 * height[s] + r.nextGaussian();
        }
        List<String> names = new ArrayList<>();
        for (int s = 0; s < STATIONS; s++) {
            names.add(String.format("st%02d", s));
        }
        List<Column> cols = new ArrayList<>();
        cols.add(new NumericColumn("y", y));
        cols.add(new NumericColumn("x", x));
        cols.add(new NumericColumn("rain", rain));
        cols.add(new NumericColumn("elevation", elevation));
        cols.add(new NumericColumn("elevation_rounded", rounded));
        cols.add(new NumericColumn("elevation_noisy", noisy));
        cols.add(new CategoricalColumn("station", station, names));
        return new Table("weather", cols);
    }

    @Test
    void theRunAndTheFullFitDropTheSameColumns() {
        Table t = weather();
        Plan plan = new PlanReader(false).read(PLAN, Path.of("."));
        RunResult result = new MultiverseRunner(1).run(plan, t, RunProgress.SILENT, null);
        ResultTable run = result.results();
        SpecificationModels models = new SpecificationModels(plan, t);
        FullFitter full = new FullFitter();
        int[] station = ((CategoricalColumn) t.column("station")).codes();
        int droppedRounded = 0;
        for (int i = 0; i < run.size(); i++) {
            FullFit f = full.fit(plan, models, run.specIndex(i));
            String where = "specification " + (i + 1);
            assertEquals(f.status(), run.status(i).startsWith("ok") ? "ok" : run.status(i), where);
            assertEquals(f.nParams(), run.nParams(i), "K, " + where);
            assertEquals(f.note(), note(run.status(i)), "dropped columns, " + where);
            assertEquals(f.key().estimate(), run.estimate(i), 1e-10 * Math.abs(f.key().estimate()), where);
            assertEquals(f.key().stdError(), run.stdError(i), 1e-10 * f.key().stdError(), where);

            // the numbers are those of the model without the dropped columns, in exact arithmetic
            long[] choices = new long[models.space().decisionCount()];
            models.space().decode(run.specIndex(i), choices);
            List<double[]> kept = new ArrayList<>();
            kept.add(NearCopyExactArithmeticTest.values(t, "rain"));
            String[] optional = {"elevation", "elevation_noisy", "elevation_rounded"};
            for (int j = 0; j < 3; j++) {
                if ((choices[2] & (1L << j)) != 0 && !f.note().contains(optional[j])) {
                    kept.add(NearCopyExactArithmeticTest.values(t, optional[j]));
                }
            }
            if ((choices[2] & 4L) != 0) {
                assertTrue(f.note().contains("elevation_rounded: collinear with the fixed effects"), f.note());
                droppedRounded++;
            }
            if ((choices[2] & 2L) != 0) {
                assertTrue(!f.note().contains("elevation_noisy"), "a ratio of 1e-5 is kept: " + f.note());
            }
            kept.add(NearCopyExactArithmeticTest.values(t, "x"));
            ExactLeastSquares.KeyResult exact = ExactLeastSquares.fit(kept.toArray(new double[0][]), NearCopyExactArithmeticTest.values(t, "y"),
                    station, station);
            String type = plan.decisions().get(3).label(choices[3]);
            assertEquals(exact.k(), run.nParams(i), "K against the model without the dropped columns, " + where);
            assertEquals(exact.estimate(), run.estimate(i), 1e-9 * Math.abs(exact.estimate()), where);
            assertEquals(exact.stdError(type), run.stdError(i), 1e-9 * exact.stdError(type), type + ", " + where);
        }
        assertEquals(run.size() / 2, droppedRounded);
        // the route: every specification whose column the rule drops was declined by the Cholesky solve
        assertTrue(result.refitByQr() >= droppedRounded, "refit by QR: " + result.refitByQr());
    }

    /** The note of a status "ok; note" or "ok", as the result table keeps them together. */
    private static String note(String status) {
        return status.startsWith("ok; ") ? status.substring(4) : "";
    }
}
