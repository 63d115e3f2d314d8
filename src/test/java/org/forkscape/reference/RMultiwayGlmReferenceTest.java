package org.forkscape.reference;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import java.util.TreeMap;
import java.util.concurrent.atomic.AtomicBoolean;
import org.forkscape.data.Table;
import org.forkscape.fit.FullFit;
import org.forkscape.fit.FullFitter;
import org.forkscape.fit.SpecificationModels;
import org.forkscape.plan.Plan;
import org.forkscape.run.MultiverseRunner;
import org.forkscape.run.ResultTable;
import org.forkscape.run.RunProgress;
import org.forkscape.run.RunResult;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.ValueSource;

/**
 * Multi-way cluster-robust errors of the generalized linear models: every specification of
 * {@code tutoring-logit-plan.json}, {@code tutoring-probit-plan.json} and {@code tutoring-poisson-plan.json}
 * (all terms or the first two, term effects absorbed or not, unweighted or with prior weights, HC1, one-way,
 * two-way and three-way clustering) against R's {@code glm(weights = w)} with
 * {@code sandwich::vcovCL(fit, cluster = ~ a + b, type = "HC1", cadjust = TRUE, multi0 = FALSE)} (Cameron,
 * Gelbach &amp; Miller 2011, Journal of Business &amp; Economic Statistics 29(2)), {@code vcovCL}'s glm
 * default for one-way clusters and {@code vcovHC} for HC1, with the average marginal effect's delta-method
 * error, all computed in {@code src/test/r/multiway-glm-reference.R} (R 4.2.2, sandwich 3.0.2;
 * {@code multiway-glm-versions.txt}) on its invented panel. Specifications whose multi-way variance R finds
 * not positive must have that status and no standard error.
 *
 * <p>Tolerances {@link GlmTolerance}'s and for its reasons: estimate, standard error, marginal effect and
 * its error 1e-7 relative, the normal p-value {@link GlmTolerance#pValue}; rows and coefficients exact.
 */
class RMultiwayGlmReferenceTest {
    private static final String SOURCE = "R glm(weights = ) with sandwich::vcovCL (multi-way HC1) and vcovHC";

    @ParameterizedTest
    @ValueSource(strings = {"logit", "probit", "poisson"})
    void everySpecificationAgreesWithMultiwayVcovCL(String model) {
        Plan plan = ReferenceFiles.plan("tutoring-" + model + "-plan.json");
        Table table = ReferenceFiles.table(plan);
        RunResult run = new MultiverseRunner(2).run(plan, table, RunProgress.SILENT, new AtomicBoolean());
        ResultTable r = run.results();
        List<Map<String, String>> expected = ReferenceFiles.rows("tutoring-" + model + "-expected.csv");
        assertEquals(expected.size(), r.size());
        double tolerance = GlmTolerance.GLM.relative;
        List<String> failures = new ArrayList<>();
        Map<String, Double> worst = new TreeMap<>();
        int multiway = 0;
        int notPositive = 0;
        for (ReferenceRows.Match match : ReferenceRows.match(run, plan, expected, failures)) {
            Map<String, String> row = match.row();
            int slot = match.slot();
            String where = match.where();
            ReferenceChecks.check(failures, worst, where, "n_obs", r.nObs(slot), row, SOURCE, 0);
            ReferenceChecks.check(failures, worst, where, "n_params", r.nParams(slot), row, SOURCE, 0);
            ReferenceChecks.check(failures, worst, where, "estimate", r.estimate(slot), row, SOURCE, tolerance);
            if (!row.get("status").equals("ok")) {
                notPositive++;
                if (!Double.isNaN(r.stdError(slot))) {
                    failures.add(where + ": standard error " + r.stdError(slot)
                            + " where R's variance is not positive");
                }
                continue;
            }
            ReferenceChecks.check(failures, worst, where, "std_error", r.stdError(slot), row, SOURCE, tolerance);
            double z = r.estimate(slot) / r.stdError(slot);
            ReferenceChecks.check(failures, worst, where, "p_value", r.pValue(slot), row, SOURCE, GlmTolerance.GLM.pValue(z));
            ReferenceChecks.check(failures, worst, where, "effect", r.effect(slot), row, SOURCE, tolerance);
            ReferenceChecks.check(failures, worst, where, "effect_std_error", r.effectStdError(slot), row, SOURCE, tolerance);
            if (!row.get("one_way_std_error").isEmpty()) {
                multiway++;
                // the route taken is the multi-way sum with its (n - 1)/(n - K): neither the first column's
                // one-way error nor the same sum without that factor agrees
                differs(failures, where, "one_way_std_error", r.stdError(slot), row, tolerance);
                differs(failures, where, "hc0_std_error", r.stdError(slot), row, tolerance);
            }
        }
        AgreementReport.write("r-reference-tutoring-" + model + ".txt", SOURCE + " ("
                + ReferenceFiles.versions("multiway-glm-versions.txt") + ")", worst);
        assertTrue(multiway >= 50, multiway + " multi-way specifications compared");
        assertTrue(notPositive >= 1, notPositive + " specifications whose multi-way variance is not positive");
        assertTrue(failures.isEmpty(), failures.size() + " disagreements with " + SOURCE + ":\n"
                + String.join("\n", failures.subList(0, Math.min(20, failures.size()))));
    }

    /** The explorer's full fit of each specification gives R's key coefficient and error too. */
    @ParameterizedTest
    @ValueSource(strings = {"logit", "poisson"})
    void theFullFitsKeyCoefficientAgreesWithMultiwayVcovCL(String model) {
        Plan plan = ReferenceFiles.plan("tutoring-" + model + "-plan.json");
        SpecificationModels models = new SpecificationModels(plan, ReferenceFiles.table(plan));
        FullFitter fitter = new FullFitter();
        List<String> failures = new ArrayList<>();
        Map<String, Double> worst = new TreeMap<>();
        for (Map<String, String> row : ReferenceFiles.rows("tutoring-" + model + "-expected.csv")) {
            String where = "spec " + row.get("spec");
            FullFit fit = fitter.fit(plan, models, Long.parseLong(row.get("spec")) - 1);
            if (!row.get("status").equals("ok")) {
                if (fit.ok()) {
                    failures.add(where + ": the full fit is ok where R's multi-way variance is not positive");
                }
                continue;
            }
            if (!fit.ok()) {
                failures.add(where + ": " + fit.status());
                continue;
            }
            ReferenceChecks.check(failures, worst, where, "estimate", fit.key().estimate(), row, SOURCE, GlmTolerance.GLM.relative);
            ReferenceChecks.check(failures, worst, where, "std_error", fit.key().stdError(), row, SOURCE, GlmTolerance.GLM.relative);
            ReferenceChecks.check(failures, worst, where, "n_obs", fit.nObs(), row, SOURCE, 0);
        }
        AgreementReport.write("r-reference-tutoring-" + model + "-full-fit.txt", SOURCE, worst);
        assertTrue(failures.isEmpty(), failures.size() + " disagreements with " + SOURCE + ":\n"
                + String.join("\n", failures.subList(0, Math.min(20, failures.size()))));
    }

    /** The multi-way GLM errors do not depend on the number of threads. */
    @Test
    void multiwayPoissonIsBitIdenticalWhateverTheThreadCount() {
        Plan plan = ReferenceFiles.plan("tutoring-poisson-plan.json");
        Table table = ReferenceFiles.table(plan);
        assertArrayEquals(ReferenceChecks.bits(new MultiverseRunner(1).run(plan, table, RunProgress.SILENT, new AtomicBoolean())
                .results()), ReferenceChecks.bits(new MultiverseRunner(2).run(plan, table, RunProgress.SILENT, new AtomicBoolean())
                .results()));
    }

    private static void differs(List<String> failures, String where, String column, double actual,
            Map<String, String> row, double tolerance) {
        double other = ReferenceFiles.number(row.get(column));
        if (!Double.isNaN(other) && Agreement.relativeError(actual, other) <= 100 * tolerance) {
            failures.add(String.format("%s: standard error %.17g agrees with R's %s %.17g, not the multi-way HC1 sum",
                    where, actual, column, other));
        }
    }
}
