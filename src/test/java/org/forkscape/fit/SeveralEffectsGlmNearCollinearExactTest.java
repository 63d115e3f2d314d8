package org.forkscape.fit;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Path;
import org.forkscape.data.NumericColumn;
import org.forkscape.data.Table;
import org.forkscape.plan.Plan;
import org.forkscape.plan.PlanChecker;
import org.forkscape.plan.PlanReader;
import org.forkscape.reference.ExactGeneralizedLinear;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.CsvSource;

/**
 * Logit and Poisson fits beside two absorbed columns (the 30 schools and 12 waves of
 * {@link GlmNearCollinearExactTest}'s design) with two nearly equal controls, against the exact maximum
 * likelihood fit of the same doubles with the dummies written out (29 school and 11 wave dummies beside the
 * intercept; the two groupings are connected, so that is their rank) in 60-digit decimal arithmetic
 * ({@link ExactGeneralizedLinear}). The estimator takes the several-effects route ({@link SeveralEffectsGlm},
 * asserted), whose scoring steps project the dummies out of the weighted design; where the projected
 * columns' cross-products would cost digits (the squared condition number of such a design), the
 * information is factored by QR of the weighted projected design instead (asserted: from a gap of 1e-3).
 *
 * <p>Tolerance 1e-7 relative, the engine's stopping tolerance against a fit run past convergence
 * (reference.GlmTolerance.GLM).
 */
class SeveralEffectsGlmNearCollinearExactTest {
    private static final int SCHOOLS = 30;
    private static final int WAVES = 12;

    @ParameterizedTest(name = "{0}, gap {1}")
    @CsvSource({"logit, 1e-1, false", "logit, 1e-3, true", "logit, 1e-5, true", "logit, 1e-6, true",
            "poisson, 1e-1, false", "poisson, 1e-3, true", "poisson, 1e-5, true", "poisson, 1e-6, true"})
    void nearlyEqualControlsBesideTwoAbsorbedColumnsGiveTheExactFit(String model, double gap, boolean byQr) {
        boolean poisson = model.equals("poisson");
        Table table = GlmNearCollinearExactTest.rows(gap, poisson);
        double[] school = ((NumericColumn) table.column("school")).values();
        double[] wave = ((NumericColumn) table.column("wave")).values();
        int rows = school.length;
        double[][] regressors = new double[3 + SCHOOLS - 1 + WAVES - 1][];
        regressors[0] = ((NumericColumn) table.column("first")).values();
        regressors[1] = ((NumericColumn) table.column("second")).values();
        for (int s = 1; s < SCHOOLS; s++) {
            regressors[1 + s] = dummy(school, s);
        }
        for (int w = 1; w < WAVES; w++) {
            regressors[SCHOOLS + w] = dummy(wave, w);
        }
        // the key predictor last, as the exact fit reports the last regressor
        regressors[regressors.length - 1] = ((NumericColumn) table.column("key")).values();
        ExactGeneralizedLinear.KeyResult exact = ExactGeneralizedLinear.fit(poisson, regressors,
                ((NumericColumn) table.column("y")).values());
        int[] schoolCodes = new int[rows];
        int[] waveCodes = new int[rows];
        for (int i = 0; i < rows; i++) {
            schoolCodes[i] = (int) school[i];
            waveCodes[i] = (int) wave[i];
        }
        for (String errors : new String[] {"classical", "HC0", "HC1", "cluster:school", "cluster:school+wave"}) {
            ModelDispatch estimator = new ModelDispatch(true);
            KeyFit fit = fit(estimator, table, model, errors);
            String where = model + ", gap " + gap + ", " + errors;
            assertTrue(fit.ok() && fit.statusText().equals("ok"), where + ": " + fit.statusText());
            assertEquals(1, estimator.severalEffectsFits(), where + ": the several-effects route");
            assertEquals(byQr, estimator.severalEffectsFactoredByQr(), where + ": factored by QR");
            assertEquals(3 + SCHOOLS + WAVES - 1, fit.nParams(), where + ": K = 3 columns + 30 + 12 - 1 dummies");
            double se = switch (errors) {
                case "classical" -> exact.classical();
                case "HC0" -> exact.hc0();
                case "HC1" -> exact.hc1();
                case "cluster:school" -> exact.clustered(schoolCodes);
                default -> exact.clustered(schoolCodes, waveCodes);
            };
            assertEquals(exact.estimate(), fit.estimate(), 1e-7 * Math.abs(exact.estimate()), where + " estimate");
            assertEquals(se, fit.stdError(), 1e-7 * se, where + " standard error (exact 60-digit arithmetic)");
        }
    }

    private static double[] dummy(double[] codes, int level) {
        double[] d = new double[codes.length];
        for (int i = 0; i < codes.length; i++) {
            d[i] = codes[i] == level ? 1 : 0;
        }
        return d;
    }

    private static KeyFit fit(ModelDispatch estimator, Table table, String model, String errors) {
        String json = """
                {"data": "near.csv", "decisions": [
                  {"name": "o", "kind": "outcome", "alternatives": [{"label": "y", "column": "y"}]},
                  {"name": "k", "kind": "predictor", "alternatives": [{"label": "x", "column": "key"}]},
                  {"name": "c", "kind": "controls", "required": ["first", "second"]},
                  {"name": "a", "kind": "absorb", "alternatives": [{"label": "school and wave",
                    "columns": ["school", "wave"]}]},
                  {"name": "e", "kind": "errors", "alternatives": ["%s"]},
                  {"name": "m", "kind": "model", "alternatives": ["%s"]}]}
                """.formatted(errors, model);
        Plan plan = new PlanReader(false).read(json, Path.of("."));
        PlanChecker.check(plan, table);
        SpecificationModels models = new SpecificationModels(plan, table);
        long[] choices = new long[models.space().decisionCount()];
        models.space().decode(0, choices);
        DataVariant variant = models.variant(models.variantKey(models.variantOrdinal(choices)));
        return estimator.fit(models.model(choices), new ObservedRows().of(variant));
    }
}
