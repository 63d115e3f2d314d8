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
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.ValueSource;

/**
 * Prior weights in the generalized linear models: every specification of {@code water-logit-plan.json},
 * {@code water-probit-plan.json} and {@code water-poisson-plan.json} against R's {@code glm(weights = w)}
 * with {@code vcov}, {@code sandwich::vcovHC} (HC0, HC1, HC3) and {@code vcovCL} (HC0 with G/(G-1), its glm default), and the average
 * marginal effect as the prior-weighted mean of mu'(eta) b with its delta-method error, all computed in
 * {@code src/test/r/weights-reference.R} (R 4.2.2, sandwich 3.0.2; {@code weights-versions.txt}) on its
 * invented survey, whose weights hold zeros and missing cells.
 *
 * <p>Tolerances {@link GlmTolerance}'s and for its reasons: estimate, standard error, marginal effect and
 * its error 1e-7 relative; deviance and McFadden's R-squared 1e-9; rows and coefficients exact.
 */
class RWeightsGlmReferenceTest {
    private static final String SOURCE = "R glm(weights = ) with vcov, sandwich::vcovHC and vcovCL";

    @ParameterizedTest
    @ValueSource(strings = {"logit", "probit", "poisson"})
    void everySpecificationAgreesWithWeightedGlm(String model) {
        Plan plan = ReferenceFiles.plan("water-" + model + "-plan.json");
        Table table = ReferenceFiles.table(plan);
        ResultTable r = new MultiverseRunner(2).run(plan, table, RunProgress.SILENT, new AtomicBoolean()).results();
        List<Map<String, String>> expected = ReferenceFiles.rows("water-" + model + "-expected.csv");
        assertEquals(expected.size(), r.size());
        int[] slotOf = new int[r.size()];
        for (int slot = 0; slot < r.size(); slot++) {
            slotOf[(int) r.specIndex(slot)] = slot;
        }
        double tolerance = GlmTolerance.GLM.relative;
        List<String> failures = new ArrayList<>();
        Map<String, Double> worst = new TreeMap<>();
        int weighted = 0;
        for (Map<String, String> row : expected) {
            int slot = slotOf[Integer.parseInt(row.get("spec")) - 1];
            String where = "spec " + row.get("spec") + " (" + row.get("controls") + ", " + row.get("weights") + ", "
                    + row.get("errors") + ")";
            if (!r.status(slot).equals("ok")) {
                failures.add(where + ": status " + r.status(slot));
                continue;
            }
            if (row.get("weights").equals("survey")) {
                weighted++;
            }
            ReferenceChecks.check(failures, worst, where, "n_obs", r.nObs(slot), row, SOURCE, 0);
            ReferenceChecks.check(failures, worst, where, "n_params", r.nParams(slot), row, SOURCE, 0);
            ReferenceChecks.check(failures, worst, where, "estimate", r.estimate(slot), row, SOURCE, tolerance);
            ReferenceChecks.check(failures, worst, where, "std_error", r.stdError(slot), row, SOURCE, tolerance);
            ReferenceChecks.check(failures, worst, where, "effect", r.effect(slot), row, SOURCE, tolerance);
            ReferenceChecks.check(failures, worst, where, "effect_std_error", r.effectStdError(slot), row, SOURCE, tolerance);
            ReferenceChecks.check(failures, worst, where, "deviance", r.deviance(slot), row, SOURCE, GlmTolerance.LIKELIHOOD);
            ReferenceChecks.check(failures, worst, where, "r2", r.r2(slot), row, SOURCE, GlmTolerance.LIKELIHOOD);
        }
        AgreementReport.write("r-reference-water-" + model + ".txt", SOURCE + " (" 
                + ReferenceFiles.versions("weights-versions.txt") + ")", worst);
        assertTrue(weighted >= 16, weighted + " weighted specifications compared");
        assertTrue(failures.isEmpty(), failures.size() + " disagreements with " + SOURCE + ":\n"
                + String.join("\n", failures.subList(0, Math.min(20, failures.size()))));
    }

    /** The explorer's full fit of each weighted GLM specification gives R's key coefficient and error too. */
    @ParameterizedTest
    @ValueSource(strings = {"logit", "probit", "poisson"})
    void theFullFitsKeyCoefficientAgreesWithWeightedGlm(String model) {
        Plan plan = ReferenceFiles.plan("water-" + model + "-plan.json");
        SpecificationModels models = new SpecificationModels(plan, ReferenceFiles.table(plan));
        FullFitter fitter = new FullFitter();
        List<String> failures = new ArrayList<>();
        Map<String, Double> worst = new TreeMap<>();
        for (Map<String, String> row : ReferenceFiles.rows("water-" + model + "-expected.csv")) {
            String where = "spec " + row.get("spec");
            FullFit fit = fitter.fit(plan, models, Long.parseLong(row.get("spec")) - 1);
            if (!fit.ok()) {
                failures.add(where + ": " + fit.status());
                continue;
            }
            ReferenceChecks.check(failures, worst, where, "estimate", fit.key().estimate(), row, SOURCE, GlmTolerance.GLM.relative);
            ReferenceChecks.check(failures, worst, where, "std_error", fit.key().stdError(), row, SOURCE, GlmTolerance.GLM.relative);
            ReferenceChecks.check(failures, worst, where, "n_obs", fit.nObs(), row, SOURCE, 0);
        }
        AgreementReport.write("r-reference-water-" + model + "-full-fit.txt", SOURCE, worst);
        assertTrue(failures.isEmpty(), failures.size() + " disagreements with " + SOURCE + ":\n"
                + String.join("\n", failures.subList(0, Math.min(20, failures.size()))));
    }

    /** The weighted GLM fits do not depend on the number of threads. */
    @Test
    void weightedLogitIsBitIdenticalWhateverTheThreadCount() {
        Plan plan = ReferenceFiles.plan("water-logit-plan.json");
        Table table = ReferenceFiles.table(plan);
        assertArrayEquals(ReferenceChecks.bits(new MultiverseRunner(1).run(plan, table, RunProgress.SILENT, new AtomicBoolean())
                .results()), ReferenceChecks.bits(new MultiverseRunner(2).run(plan, table, RunProgress.SILENT, new AtomicBoolean())
                .results()));
    }
}
