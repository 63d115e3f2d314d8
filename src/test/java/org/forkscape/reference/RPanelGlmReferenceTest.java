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
 * Logit, probit and Poisson beside two and three absorbed columns: every specification of
 * {@code reading-logit-plan.json}, {@code reading-probit-plan.json} and {@code reading-poisson-plan.json}
 * (a continuous and a 0/1 key predictor, classroom and term or classroom, term and tutor effects, every subset
 * of a control the classroom effects span and one with missing cells, unweighted or with prior weights,
 * classical, HC0, HC1, one-way and two-way cluster errors) against R's {@code glm(weights = )} with a
 * {@code factor()} term per absorbed column, {@code vcov}, {@code sandwich::vcovHC} and {@code vcovCL}, the
 * average marginal effect and its delta-method error by formula, {@code fit$rank}, the deviance, McFadden's
 * R-squared and the likelihood-ratio test against {@code glm} with the fixed effects alone, all computed in
 * {@code src/test/r/panel-glm-reference.R} (R 4.2.2, sandwich 3.0.2; {@code panel-glm-versions.txt}) on its
 * invented panel of two schools that share no classroom, term or tutor.
 *
 * <p>Tolerances {@link GlmTolerance}'s and for its reasons: estimate, standard errors, marginal effect and its
 * error, deviance and R-squared 1e-7 relative, the normal p-value {@link GlmTolerance#pValue}, the
 * likelihood-ratio p-value 1e-6 relative (a tail probability moves by its statistic's error times the
 * density's ratio to it, which is of order one to ten here); rows and coefficients exact.
 */
class RPanelGlmReferenceTest {
    private static final String SOURCE = "R glm(weights = ) with factor() dummies, vcov, sandwich::vcovHC and vcovCL";

    @ParameterizedTest
    @ValueSource(strings = {"logit", "probit", "poisson"})
    void everySpecificationAgreesWithGlmWithDummies(String model) {
        Plan plan = ReferenceFiles.plan("reading-" + model + "-plan.json");
        Table table = ReferenceFiles.table(plan);
        RunResult run = new MultiverseRunner(2).run(plan, table, RunProgress.SILENT, new AtomicBoolean());
        ResultTable r = run.results();
        List<Map<String, String>> expected = ReferenceFiles.rows("reading-" + model + "-expected.csv");
        assertEquals(expected.size(), r.size());
        double tolerance = GlmTolerance.GLM.relative;
        List<String> failures = new ArrayList<>();
        Map<String, Double> worst = new TreeMap<>();
        int compared = 0;
        for (ReferenceRows.Match match : ReferenceRows.match(run, plan, expected, failures)) {
            Map<String, String> row = match.row();
            int slot = match.slot();
            String where = match.where();
            String status = row.get("status");
            if (status.equals("separation")) {
                if (!r.status(slot).startsWith("separation")) {
                    failures.add(where + ": status " + r.status(slot) + " where R's fit is separated");
                }
                continue;
            }
            ReferenceChecks.check(failures, worst, where, "n_obs", r.nObs(slot), row, SOURCE, 0);
            ReferenceChecks.check(failures, worst, where, "n_params", r.nParams(slot), row, SOURCE, 0);
            ReferenceChecks.check(failures, worst, where, "estimate", r.estimate(slot), row, SOURCE, tolerance);
            ReferenceChecks.check(failures, worst, where, "deviance", r.deviance(slot), row, SOURCE, tolerance);
            ReferenceChecks.check(failures, worst, where, "r2", r.r2(slot), row, SOURCE, tolerance);
            ReferenceChecks.check(failures, worst, where, "model_p_value", r.modelPValue(slot), row, SOURCE, 1e-6);
            if (!status.equals("ok")) {
                if (!Double.isNaN(r.stdError(slot))) {
                    failures.add(where + ": standard error " + r.stdError(slot) + " where R's variance is not positive");
                }
                continue;
            }
            ReferenceChecks.check(failures, worst, where, "std_error", r.stdError(slot), row, SOURCE, tolerance);
            double z = r.estimate(slot) / r.stdError(slot);
            ReferenceChecks.check(failures, worst, where, "p_value", r.pValue(slot), row, SOURCE, GlmTolerance.GLM.pValue(z));
            ReferenceChecks.check(failures, worst, where, "effect", r.effect(slot), row, SOURCE, tolerance);
            ReferenceChecks.check(failures, worst, where, "effect_std_error", r.effectStdError(slot), row, SOURCE, tolerance);
            compared++;
        }
        AgreementReport.write("r-reference-reading-" + model + ".txt", SOURCE + " ("
                + ReferenceFiles.versions("panel-glm-versions.txt") + ")", worst);
        assertTrue(compared >= 120, compared + " specifications compared");
        assertTrue(failures.isEmpty(), failures.size() + " disagreements with " + SOURCE + ":\n"
                + String.join("\n", failures.subList(0, Math.min(20, failures.size()))));
    }

    /** The explorer's full fit of each specification gives R's key coefficient and error too. */
    @ParameterizedTest
    @ValueSource(strings = {"logit", "poisson"})
    void theFullFitsKeyCoefficientAgreesWithGlmWithDummies(String model) {
        Plan plan = ReferenceFiles.plan("reading-" + model + "-plan.json");
        SpecificationModels models = new SpecificationModels(plan, ReferenceFiles.table(plan));
        FullFitter fitter = new FullFitter();
        List<String> failures = new ArrayList<>();
        Map<String, Double> worst = new TreeMap<>();
        for (Map<String, String> row : ReferenceFiles.rows("reading-" + model + "-expected.csv")) {
            String where = "spec " + row.get("spec");
            if (!row.get("status").equals("ok")) {
                continue;
            }
            FullFit fit = fitter.fit(plan, models, Long.parseLong(row.get("spec")) - 1);
            if (!fit.ok()) {
                failures.add(where + ": " + fit.status());
                continue;
            }
            ReferenceChecks.check(failures, worst, where, "estimate", fit.key().estimate(), row, SOURCE, GlmTolerance.GLM.relative);
            ReferenceChecks.check(failures, worst, where, "std_error", fit.key().stdError(), row, SOURCE, GlmTolerance.GLM.relative);
            ReferenceChecks.check(failures, worst, where, "n_obs", fit.nObs(), row, SOURCE, 0);
        }
        AgreementReport.write("r-reference-reading-" + model + "-full-fit.txt", SOURCE, worst);
        assertTrue(failures.isEmpty(), failures.size() + " disagreements with " + SOURCE + ":\n"
                + String.join("\n", failures.subList(0, Math.min(20, failures.size()))));
    }

    @Test
    void aLogitBesideSeveralAbsorbedColumnsIsBitIdenticalWhateverTheThreadCount() {
        Plan plan = ReferenceFiles.plan("reading-logit-plan.json");
        Table table = ReferenceFiles.table(plan);
        assertArrayEquals(ReferenceChecks.bits(new MultiverseRunner(1).run(plan, table, RunProgress.SILENT, new AtomicBoolean())
                .results()), ReferenceChecks.bits(new MultiverseRunner(2).run(plan, table, RunProgress.SILENT, new AtomicBoolean())
                .results()));
    }
}
