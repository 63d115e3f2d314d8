package org.forkscape.reference;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Random;
import org.apache.commons.math3.stat.descriptive.SummaryStatistics;
import org.forkscape.data.Column;
import org.forkscape.data.NumericColumn;
import org.forkscape.data.Table;
import org.forkscape.plan.Plan;
import org.forkscape.plan.PlanReader;
import org.forkscape.run.MultiverseRunner;
import org.forkscape.run.ResultTable;
import org.forkscape.run.RunProgress;
import org.junit.jupiter.api.Test;

/**
 * A fact of the trade, checked by simulation (common practice, no source): with k pure-noise predictors and
 * n rows, R-squared averages k/(n - 1) and adjusted R-squared averages 0.
 *
 * <p>Each replicate is one specification: an outcome alternative of pure Gaussian noise on the key predictor
 * and k - 1 required controls, all noise too. A data set carries {@value #OUTCOMES} outcome columns (each its
 * own replicate); {@value #DATA_SETS} seeded data sets give {@value #DATA_SETS} x {@value #OUTCOMES}
 * replicates.
 *
 * <p>Monte Carlo tolerance: {@value #STANDARD_ERRORS} standard errors of the mean, the standard error
 * estimated from the replicates themselves. Under a correct engine a deviation that large has a chance of
 * about 6e-5, and the generator is seeded, so the test gives the same answer every run; with 20,000
 * replicates the band (about 0.003 for R-squared) is narrow enough to tell k/(n - 1) from k/n, the value an
 * engine that lost the intercept's degree of freedom would centre on (the test checks that too).
 */
class NoiseRSquaredSimulationTest {
    static final int ROWS = 30;
    static final int PREDICTORS = 5;
    static final int OUTCOMES = 50;
    static final int DATA_SETS = 400;
    static final double STANDARD_ERRORS = 4;

    @Test
    void rSquaredAveragesKOverNMinusOneAndAdjustedRSquaredZero() {
        Random random = new Random(20260611L);
        Plan plan = plan();
        SummaryStatistics r2 = new SummaryStatistics();
        SummaryStatistics adjusted = new SummaryStatistics();
        for (int set = 0; set < DATA_SETS; set++) {
            ResultTable r = new MultiverseRunner(1).run(plan, noise(random), RunProgress.SILENT, null).results();
            assertEquals(OUTCOMES, r.size());
            for (int slot = 0; slot < r.size(); slot++) {
                assertTrue(r.fitted(slot), r.status(slot));
                assertEquals(PREDICTORS + 1, r.nParams(slot));
                r2.addValue(r.r2(slot));
                adjusted.addValue(r.adjustedR2(slot));
            }
        }
        double expected = PREDICTORS / (ROWS - 1.0);
        double band = STANDARD_ERRORS * r2.getStandardDeviation() / Math.sqrt(r2.getN());
        double adjustedBand = STANDARD_ERRORS * adjusted.getStandardDeviation() / Math.sqrt(adjusted.getN());
        Map<String, Double> figures = new LinkedHashMap<>();
        figures.put("mean R-squared", r2.getMean());
        figures.put("expected k/(n-1)", expected);
        figures.put("band (4 standard errors)", band);
        figures.put("mean adjusted R-squared", adjusted.getMean());
        figures.put("adjusted band (4 standard errors)", adjustedBand);
        AgreementReport.write("noise-r2.txt", r2.getN() + " pure-noise fits, k = " + PREDICTORS + ", n = " + ROWS
                + " (common practice, no source)", figures);
        assertTrue(Math.abs(r2.getMean() - expected) <= band, String.format("mean R-squared of %d noise fits %.5f, "
                + "expected k/(n-1) = %.5f within %.5f (common practice, no source)", r2.getN(), r2.getMean(), expected,
                band));
        assertTrue(band < (expected - PREDICTORS / (double) ROWS) / 2, "the Monte Carlo band " + band
                + " must be narrow enough to tell k/(n-1) from k/n");
        assertTrue(Math.abs(adjusted.getMean()) <= adjustedBand, String.format("mean adjusted R-squared of %d noise "
                + "fits %.5f, expected 0 within %.5f (common practice, no source)", adjusted.getN(), adjusted.getMean(),
                adjustedBand));
    }

    /** Outcomes y01..y50 on x1 with x2..x5 as required controls. */
    private static Plan plan() {
        StringBuilder outcomes = new StringBuilder();
        for (int j = 1; j <= OUTCOMES; j++) {
            outcomes.append(j > 1 ? ", " : "").append(String.format("{\"label\": \"y%02d\", \"column\": \"y%02d\"}", j, j));
        }
        List<String> controls = new ArrayList<>();
        for (int j = 2; j <= PREDICTORS; j++) {
            controls.add("\"x" + j + "\"");
        }
        String json = "{\"data\": \"unused.csv\", \"decisions\": ["
                + "{\"name\": \"outcome\", \"kind\": \"outcome\", \"alternatives\": [" + outcomes + "]},"
                + "{\"name\": \"key\", \"kind\": \"predictor\", \"alternatives\": [{\"label\": \"x1\", \"column\": \"x1\"}]},"
                + "{\"name\": \"others\", \"kind\": \"controls\", \"required\": [" + String.join(", ", controls) + "]}]}";
        return new PlanReader(false).read(json, ReferenceFiles.path("versions.txt").getParent());
    }

    private static Table noise(Random random) {
        List<Column> columns = new ArrayList<>();
        for (int j = 1; j <= PREDICTORS; j++) {
            columns.add(new NumericColumn("x" + j, gaussian(random)));
        }
        for (int j = 1; j <= OUTCOMES; j++) {
            columns.add(new NumericColumn(String.format("y%02d", j), gaussian(random)));
        }
        return new Table("noise", columns);
    }

    private static double[] gaussian(Random random) {
        double[] v = new double[ROWS];
        for (int i = 0; i < ROWS; i++) {
            v[i] = random.nextGaussian();
        }
        return v;
    }
}
