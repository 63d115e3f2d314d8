package org.forkscape.reference;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.ArrayList;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.TreeMap;
import java.util.concurrent.atomic.AtomicBoolean;
import org.forkscape.data.Table;
import org.forkscape.plan.Decision;
import org.forkscape.plan.Plan;
import org.forkscape.plan.SpecificationSpace;
import org.forkscape.run.MultiverseRunner;
import org.forkscape.run.ResultTable;
import org.forkscape.run.RunProgress;
import org.forkscape.run.RunResult;
import org.forkscape.run.Scale;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.CsvSource;

/**
 * Every specification of four committed plans against R's lm() with the sandwich package: reference
 * values in {@code src/test/resources/reference/*-expected.csv}, produced by
 * {@code src/test/r/make-reference.R} with the versions named in {@code versions.txt} (R 4.2.2, sandwich
 * 3.0.2). The R script enumerates the specifications with its own loops, codes the variables, applies
 * the sample rules, drops incomplete rows and fits each specification from its rows with lm(), fixed
 * effects as explicit factor dummies; here Forkscape's engine runs the same plan file. Rows are joined
 * by the decision labels, and the spec numbers must agree too.
 *
 * <p>Tolerances, each quantity with its reason (the largest errors measured are written to
 * {@code target/reference-reports/r-reference-*.txt}):
 * <ul>
 * <li>estimate, std_error: {@value #RELATIVE} relative. Both sides are double-precision least squares on
 * designs whose scaled condition numbers are below 1e4; they differ only by rounding (R's Householder QR
 * against the engine's Cholesky on centered cross-products), measured below 1e-12.</li>
 * <li>ci_low, ci_high: {@value #RELATIVE} relative to the larger of |bound| and the standard error, since a
 * bound near zero is the difference of two comparable numbers and has no relative accuracy of its own.
 * The t quantile itself is checked to 1e-12 by {@link DistributionsReferenceTest}.</li>
 * <li>p_value, model_p_value: {@value #P_RELATIVE} relative. A tail probability magnifies the relative error
 * of its statistic (by about t^2 for t), and the two sides evaluate the incomplete beta function by
 * different series (R's pt/pf; Commons Math's regularized beta); measured below 1e-11 here, with t up to
 * about 70 and model p-values down to 1e-170.</li>
 * <li>r2: {@value #RELATIVE} relative; adj_r2: {@value #RELATIVE} absolute, since it can sit at or below
 * zero where a relative error means nothing.</li>
 * <li>df, n_obs, n_params: exact.</li>
 * <li>std_estimate (R: the coefficient of lm on the outcome and key predictor standardized over the
 * specification's rows) and the partial-correlation scale (R: with classical errors the correlation of the
 * outcome's and the key predictor's lm residuals on the controls and fixed effects, otherwise t / sqrt(t^2 +
 * df) of the error type): {@value #RELATIVE} relative, as the estimate.</li>
 * </ul>
 */
class RLmSandwichReferenceTest {
    static final double RELATIVE = 1e-9;
    static final double P_RELATIVE = 1e-9;

    /**
     * @param bothRoutes whether some of the plan's specifications (those with a control that is constant in
     *                   their rows or collinear with the fixed effects) take the QR refit while the rest take
     *                   the Cholesky route, so that both are compared with R
     */
    @ParameterizedTest(name = "{0}")
    @CsvSource({"airquality, true", "airquality-common, true", "chickweight, true", "toothgrowth, false"})
    void everySpecificationAgreesWithLmAndSandwich(String name, boolean bothRoutes) {
        Plan plan = ReferenceFiles.plan(name + "-plan.json");
        Table table = ReferenceFiles.table(plan);
        RunResult run = new MultiverseRunner(2).run(plan, table, RunProgress.SILENT, new AtomicBoolean());
        ResultTable results = run.results();
        List<Map<String, String>> expected = ReferenceFiles.rows(name + "-expected.csv");
        String source = "R lm() and sandwich, " + name + "-expected.csv (" + ReferenceFiles.versions() + ")";
        assertEquals(expected.size(), results.size(), "specification count of " + name + "-plan.json against "
                + source);

        if (bothRoutes) {
            assertTrue(run.refitByQr() > 0 && run.refitByQr() < results.size(), name + ": " + run.refitByQr()
                    + " of " + results.size() + " specifications refit by QR; expected some, not all");
        }
        Map<String, Integer> slotByLabels = ReferenceFiles.slotsByLabels(run);
        List<String> decisionNames = plan.decisions().stream().map(Decision::name).toList();
        List<String> failures = new ArrayList<>();
        Map<String, Double> worst = new TreeMap<>();
        for (Map<String, String> row : expected) {
            List<String> labels = decisionNames.stream().map(row::get).toList();
            Integer slot = slotByLabels.remove(String.join(" | ", labels));
            String where = name + " spec " + row.get("spec") + " (" + String.join(" | ", labels) + ")";
            if (slot == null) {
                failures.add(where + ": no such specification in Forkscape's run");
                continue;
            }
            new RowCheck(results, slot, row, where, errorSource(row.get("errors")), plan.confidence(), failures,
                    worst).run();
        }
        AgreementReport.write("r-reference-" + name + ".txt", source, worst);
        assertTrue(slotByLabels.isEmpty(), "Forkscape specifications missing from " + source + ": "
                + slotByLabels.keySet());
        assertTrue(failures.isEmpty(), failures.size() + " disagreements with " + source + ":\n"
                + String.join("\n", failures.subList(0, Math.min(20, failures.size()))));
    }

    /** Which R function produced the standard error of an errors label, for messages. */
    private static String errorSource(String errors) {
        if (errors == null || errors.equals("classical")) {
            return "R vcov() of lm";
        }
        if (errors.startsWith("cluster:")) {
            return "sandwich::vcovCL(type = \"HC1\"), df G - 1";
        }
        return "sandwich::vcovHC(type = \"" + errors + "\")";
    }

    /** Compares one specification's figures, adding a line per disagreement to {@code failures}. */
    private record RowCheck(ResultTable r, int slot, Map<String, String> row, String where, String seSource,
            double confidence, List<String> failures, Map<String, Double> worst) {
        void run() {
            long spec = Long.parseLong(row.get("spec"));
            if (r.specIndex(slot) + 1 != spec) {
                failures.add(where + ": Forkscape numbers it " + (r.specIndex(slot) + 1));
            }
            String status = row.get("status");
            boolean ok = status.equals("ok");
            if (ok != r.fitted(slot) || !ok && !r.status(slot).startsWith(status)) {
                failures.add(where + ": status \"" + r.status(slot) + "\", R gives \"" + status + "\"");
                return;
            }
            relative("estimate", r.estimate(slot), "R lm() coefficient", RELATIVE);
            exact("n_obs", r.nObs(slot), "R nobs()");
            exact("n_params", r.nParams(slot), "R lm() rank");
            relative("r2", r.r2(slot), "R summary.lm r.squared", RELATIVE);
            absolute("adj_r2", r.adjustedR2(slot), "R summary.lm adj.r.squared", RELATIVE);
            relative("model_p_value", r.modelPValue(slot), "R pf() of summary.lm fstatistic", P_RELATIVE);
            relative("std_estimate", r.standardizedEstimate(slot), "R lm() on scale(y) and scale(x) over the "
                    + "specification's rows", RELATIVE);
            if (!ok) {
                return;
            }
            relative("partial_correlation", Scale.PARTIAL_CORRELATION.value(r, slot), row.get("errors").equals(
                    "classical") ? "R cor() of the lm() residuals of y and x on the controls and fixed effects"
                    : "R t / sqrt(t^2 + df) of this error type", RELATIVE);
            relative("std_error", r.stdError(slot), seSource, RELATIVE);
            exact("df", r.df(slot), "R df.residual or G - 1");
            relative("p_value", r.pValue(slot), "R 2 * pt(-|t|, df)", P_RELATIVE);
            double scale = Math.max(r.stdError(slot), 0);
            bound("ci_low", r.ciLow(slot, confidence), scale);
            bound("ci_high", r.ciHigh(slot, confidence), scale);
        }

        private double expected(String column) {
            return ReferenceFiles.number(row.get(column));
        }

        private void relative(String column, double actual, String source, double tolerance) {
            double e = expected(column);
            double err = Agreement.relativeError(actual, e);
            worst.merge(column + " (relative)", err, Math::max);
            if (!(err <= tolerance)) {
                failures.add(String.format("%s: %s %.17g, %s gives %.17g (relative error %.2e > %.0e)", where, column,
                        actual, source, e, err, tolerance));
            }
        }

        private void absolute(String column, double actual, String source, double tolerance) {
            double e = expected(column);
            worst.merge(column + " (absolute)", Math.abs(actual - e), Math::max);
            if (!(Math.abs(actual - e) <= tolerance)) {
                failures.add(String.format("%s: %s %.17g, %s gives %.17g (absolute error %.2e > %.0e)", where, column,
                        actual, source, e, Math.abs(actual - e), tolerance));
            }
        }

        private void exact(String column, double actual, String source) {
            double e = expected(column);
            if (actual != e) {
                failures.add(where + ": " + column + " " + actual + ", " + source + " gives " + e);
            }
        }

        private void bound(String column, double actual, double se) {
            double e = expected(column);
            double scale = Math.max(Math.abs(e), se);
            worst.merge(column + " (relative to max(|bound|, se))", Math.abs(actual - e) / scale, Math::max);
            if (!(Math.abs(actual - e) <= RELATIVE * scale)) {
                failures.add(String.format("%s: %s %.17g, R estimate -/+ qt() * se gives %.17g (error %.2e > %.0e "
                        + "of %.3g)", where, column, actual, e, Math.abs(actual - e), RELATIVE, scale));
            }
        }
    }
}
