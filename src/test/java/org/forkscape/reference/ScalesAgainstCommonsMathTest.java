package org.forkscape.reference;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import org.apache.commons.math3.distribution.TDistribution;
import org.apache.commons.math3.stat.correlation.PearsonsCorrelation;
import org.apache.commons.math3.stat.descriptive.moment.StandardDeviation;
import org.apache.commons.math3.stat.regression.OLSMultipleLinearRegression;
import org.forkscape.plan.Plan;
import org.forkscape.plan.PlanReader;
import org.forkscape.run.MultiverseRunner;
import org.forkscape.run.ResultTable;
import org.forkscape.run.RunProgress;
import org.forkscape.run.RunResult;
import org.forkscape.run.Scale;
import org.junit.jupiter.api.Test;

/**
 * The unit-free scales of every specification against computations from the rows with Apache Commons Math
 * 3.6.1, on the seeded data of {@link CommonsMathOlsReferenceTest} (missing cells, a categorical control,
 * absorbed fixed effects, a log outcome):
 * <ul>
 * <li>the standardized coefficient and its interval: the regression refit by
 * {@link OLSMultipleLinearRegression} with the outcome and the key predictor z-scored over the
 * specification's rows ({@link StandardDeviation}, n - 1), as R's {@code lm(scale(y) ~ scale(x) + ...)}
 * would fit it; the interval from that fit's standard error and {@link TDistribution}'s critical value;</li>
 * <li>the partial correlation (classical errors): {@link PearsonsCorrelation} of the residuals of outcome and
 * key predictor, each regressed by {@link OLSMultipleLinearRegression} on the controls and fixed-effect
 * dummies (the Frisch-Waugh construction of a partial correlation);</li>
 * <li>the t statistic: Commons Math's coefficient over its standard error.</li>
 * </ul>
 * Tolerance {@value #RELATIVE} relative, as for the coefficients themselves in
 * {@link CommonsMathOlsReferenceTest}: both sides are double-precision least squares.
 */
class ScalesAgainstCommonsMathTest {
    static final double RELATIVE = 1e-9;
    static final String PLAN = """
            {"data": "unused.csv", "decisions": [
              {"name": "outcome", "kind": "outcome", "alternatives": [
                {"label": "level", "column": "y"}, {"label": "log", "column": "ypos", "transform": "log"}]},
              {"name": "key", "kind": "predictor", "alternatives": [
                {"label": "x", "column": "x"}, {"label": "x alt", "column": "xalt"}]},
              {"name": "controls", "kind": "controls", "optional": ["c1", "c2", "zone"]},
              {"name": "effects", "kind": "absorb", "alternatives": [
                {"label": "none", "columns": []}, {"label": "group", "columns": ["group"]}]},
              {"name": "errors", "kind": "errors", "alternatives": ["classical", "HC1"]}
            ]}""";

    @Test
    void everySpecificationOnEveryScaleAgreesWithARefitFromItsRows() {
        CommonsMathOlsReferenceTest.Data data = CommonsMathOlsReferenceTest.data(2024);
        Plan plan = new PlanReader(false).read(PLAN, ReferenceFiles.path("versions.txt").getParent());
        RunResult run = new MultiverseRunner(2).run(plan, data.table(), RunProgress.SILENT, null);
        ResultTable r = run.results();
        double confidence = plan.confidence();
        String[] outcomes = {"y", "ypos"};
        String[] keys = {"x", "xalt"};
        String[] optional = {"c1", "c2", "zone"};
        List<String> failures = new ArrayList<>();
        int slot = 0;
        for (int o = 0; o < 2; o++) {
            for (int k = 0; k < 2; k++) {
                for (int mask = 0; mask < 8; mask++) {
                    for (int absorb = 0; absorb < 2; absorb++) {
                        for (int errors = 0; errors < 2; errors++) {
                            List<String> controls = new ArrayList<>();
                            for (int j = 0; j < optional.length; j++) {
                                if ((mask >> j & 1) == 1) {
                                    controls.add(optional[j]);
                                }
                            }
                            String where = "spec " + (slot + 1) + " (" + outcomes[o] + " on " + keys[k] + ", "
                                    + controls + (absorb == 1 ? ", group effects" : "") + (errors == 1 ? ", HC1" : "")
                                    + ")";
                            assertTrue(r.fitted(slot), where + ": " + r.status(slot));
                            check(failures, where, r, slot, confidence, data, outcomes[o], o == 1, keys[k], controls,
                                    absorb == 1, errors == 0);
                            slot++;
                        }
                    }
                }
            }
        }
        assertEquals(slot, r.size());
        assertTrue(failures.isEmpty(), failures.size() + " disagreements:\n" + String.join("\n",
                failures.subList(0, Math.min(20, failures.size()))));
    }

    private static void check(List<String> failures, String where, ResultTable r, int slot, double confidence,
            CommonsMathOlsReferenceTest.Data data, String outcome, boolean log, String key, List<String> controls,
            boolean absorb, boolean classical) {
        Map<String, double[]> num = data.numeric();
        List<Integer> rows = new ArrayList<>();
        for (int i = 0; i < CommonsMathOlsReferenceTest.ROWS; i++) {
            boolean complete = !Double.isNaN(num.get(outcome)[i]) && !Double.isNaN(num.get(key)[i])
                    && (!absorb || data.group()[i] >= 0);
            for (String c : controls) {
                complete &= c.equals("zone") ? data.zone()[i] >= 0 : !Double.isNaN(num.get(c)[i]);
            }
            if (complete) {
                rows.add(i);
            }
        }
        int n = rows.size();
        double[] y = CommonsMathOlsReferenceTest.column(num.get(outcome), rows);
        if (log) {
            for (int i = 0; i < n; i++) {
                y[i] = Math.log(y[i]);
            }
        }
        double[] x = CommonsMathOlsReferenceTest.column(num.get(key), rows);
        List<double[]> others = new ArrayList<>();
        for (String c : controls) {
            if (c.equals("zone")) {
                others.addAll(CommonsMathOlsReferenceTest.dummies(data.zone(), rows));
            } else {
                others.add(CommonsMathOlsReferenceTest.column(num.get(c), rows));
            }
        }
        if (absorb) {
            others.addAll(CommonsMathOlsReferenceTest.dummies(data.group(), rows));
        }
        // the regression of z-scored outcome on z-scored key predictor and the same controls
        double[] zy = zScores(y);
        double[] zx = zScores(x);
        OLSMultipleLinearRegression standardized = new OLSMultipleLinearRegression();
        standardized.newSampleData(zy, design(zx, others, n));
        double beta = standardized.estimateRegressionParameters()[1];
        compare(failures, where, "standardized coefficient", Scale.STANDARDIZED.value(r, slot), beta);
        if (classical) {
            double se = standardized.estimateRegressionParametersStandardErrors()[1];
            double critical = new TDistribution(n - 2 - others.size())
                    .inverseCumulativeProbability(1 - (1 - confidence) / 2);
            compare(failures, where, "standardized interval, low", Scale.STANDARDIZED.low(r, slot, confidence),
                    beta - critical * se);
            compare(failures, where, "standardized interval, high", Scale.STANDARDIZED.high(r, slot, confidence),
                    beta + critical * se);
            double partial = new PearsonsCorrelation().correlation(residuals(y, others), residuals(x, others));
            compare(failures, where, "partial correlation", Scale.PARTIAL_CORRELATION.value(r, slot), partial);
            OLSMultipleLinearRegression fitted = new OLSMultipleLinearRegression();
            fitted.newSampleData(y, design(x, others, n));
            compare(failures, where, "t statistic", Scale.T_STATISTIC.value(r, slot),
                    fitted.estimateRegressionParameters()[1] / fitted.estimateRegressionParametersStandardErrors()[1]);
        }
    }

    private static double[][] design(double[] first, List<double[]> others, int n) {
        double[][] d = new double[n][1 + others.size()];
        for (int i = 0; i < n; i++) {
            d[i][0] = first[i];
            for (int j = 0; j < others.size(); j++) {
                d[i][j + 1] = others.get(j)[i];
            }
        }
        return d;
    }

    /** Residuals of v regressed on the other columns with an intercept (about the mean when there are none). */
    private static double[] residuals(double[] v, List<double[]> others) {
        int n = v.length;
        if (others.isEmpty()) {
            double mean = 0;
            for (double a : v) {
                mean += a / n;
            }
            double[] e = new double[n];
            for (int i = 0; i < n; i++) {
                e[i] = v[i] - mean;
            }
            return e;
        }
        double[][] d = new double[n][others.size()];
        for (int i = 0; i < n; i++) {
            for (int j = 0; j < others.size(); j++) {
                d[i][j] = others.get(j)[i];
            }
        }
        OLSMultipleLinearRegression ols = new OLSMultipleLinearRegression();
        ols.newSampleData(v, d);
        return ols.estimateResiduals();
    }

    private static double[] zScores(double[] v) {
        double mean = 0;
        for (double a : v) {
            mean += a;
        }
        mean /= v.length;
        double sd = new StandardDeviation(true).evaluate(v);
        double[] z = new double[v.length];
        for (int i = 0; i < v.length; i++) {
            z[i] = (v[i] - mean) / sd;
        }
        return z;
    }

    private static void compare(List<String> failures, String where, String what, double actual, double expected) {
        double err = Agreement.relativeError(actual, expected);
        if (!(err <= RELATIVE)) {
            failures.add(String.format("%s: %s %.17g, Commons Math %.17g (relative error %.2e > %.0e)", where, what,
                    actual, expected, err, RELATIVE));
        }
    }
}
