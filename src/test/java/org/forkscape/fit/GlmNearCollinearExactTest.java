package org.forkscape.fit;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Path;
import java.util.List;
import java.util.SplittableRandom;
import org.forkscape.data.NumericColumn;
import org.forkscape.data.Table;
import org.forkscape.plan.Plan;
import org.forkscape.plan.PlanChecker;
import org.forkscape.plan.PlanReader;
import org.forkscape.reference.ExactGeneralizedLinear;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.CsvSource;

/**
 * Logit and Poisson fits with two nearly equal controls (the second is the first plus a small multiple of
 * another variable: norm ratios from 1e-1 down to 1e-6 after the first) against the exact maximum
 * likelihood fit of the same doubles in 60-digit decimal arithmetic ({@link ExactGeneralizedLinear}). The
 * cross-products of such a design square its condition number, so a Cholesky factor of them keeps too few
 * digits (or, below a pivot share of 1e-8, drops the column that R's {@code glm} keeps); the iterations then
 * factor the weighted design by QR. The test asserts which factorisation was used. The errors: classical,
 * HC0, HC1, and one-way and two-way cluster-robust ({@link ExactGeneralizedLinear.KeyResult#clustered}), all
 * from the same exact scores.
 *
 * <p>Tolerance 1e-7 relative, the engine's stopping tolerance against a fit run past convergence
 * (reference.GlmTolerance.GLM); the errors' own rounding is far below it.
 */
class GlmNearCollinearExactTest {
    private static final int ROWS = 600;
    private static final int[] SCHOOL = new int[ROWS];
    private static final int[] WAVE = new int[ROWS];

    static {
        for (int i = 0; i < ROWS; i++) {
            SCHOOL[i] = i % 30;
            WAVE[i] = (i * 7 / 11) % 12;
        }
    }

    static Table rows(double gap, boolean poisson) {
        SplittableRandom r = new SplittableRandom(29);
        double[] y = new double[ROWS];
        double[] key = new double[ROWS];
        double[] first = new double[ROWS];
        double[] second = new double[ROWS];
        for (int i = 0; i < ROWS; i++) {
            double a = r.nextGaussian();
            double z = r.nextGaussian();
            first[i] = a;
            second[i] = a + gap * z;
            key[i] = 0.5 * a + 0.3 * z + r.nextGaussian();
            if (poisson) {
                double mean = Math.exp(0.2 * key[i] + 0.3 * a - 0.1 * second[i]);
                // inversion of the Poisson distribution function
                double u = r.nextDouble();
                double term = Math.exp(-mean);
                double cumulative = term;
                int k = 0;
                while (u > cumulative && k < 100) {
                    k++;
                    term *= mean / k;
                    cumulative += term;
                }
                y[i] = k;
            } else {
                double eta = -0.3 + 0.4 * key[i] + 0.5 * a - 0.2 * second[i] + 0.3 * z;
                y[i] = r.nextDouble() < 1 / (1 + Math.exp(-eta)) ? 1 : 0;
            }
        }
        // two crossed groupings of the rows (30 schools, 12 survey waves), fixed by the row number alone
        double[] school = new double[ROWS];
        double[] wave = new double[ROWS];
        for (int i = 0; i < ROWS; i++) {
            school[i] = SCHOOL[i];
            wave[i] = WAVE[i];
        }
        return new Table("near.csv", List.of(new NumericColumn("y", y), new NumericColumn("key", key),
                new NumericColumn("first", first), new NumericColumn("second", second),
                new NumericColumn("school", school), new NumericColumn("wave", wave)));
    }

    @ParameterizedTest(name = "{0}, gap {1}")
    @CsvSource({"logit, 1e-1, false", "logit, 1e-3, true", "logit, 1e-5, true", "logit, 1e-6, true",
            "poisson, 1e-1, false", "poisson, 1e-3, true", "poisson, 1e-5, true", "poisson, 1e-6, true"})
    void nearlyEqualControlsGiveTheExactFit(String model, double gap, boolean byQr) {
        boolean poisson = model.equals("poisson");
        Table table = rows(gap, poisson);
        double[][] regressors = {
            ((NumericColumn) table.column("first")).values(), ((NumericColumn) table.column("second")).values(),
            ((NumericColumn) table.column("key")).values()};
        ExactGeneralizedLinear.KeyResult exact = ExactGeneralizedLinear.fit(poisson, regressors,
                ((NumericColumn) table.column("y")).values());
        double oneWay = Double.NaN;
        for (String errors : new String[] {"classical", "HC0", "HC1", "cluster:school", "cluster:school+wave"}) {
            GeneralizedLinear glm = new GeneralizedLinear();
            KeyFit fit = fit(glm, table, model, errors);
            String where = model + ", gap " + gap + ", " + errors;
            assertTrue(fit.ok() && fit.statusText().equals("ok"), where + ": " + fit.statusText());
            assertEquals(byQr, glm.factoredByQr(), where + ": factored by QR");
            // its start is its parent's estimate (the model without the second control), whose information it takes
            assertTrue(glm.startedFromParentInformation(), where + ": started from the parent's information");
            double se = switch (errors) {
                case "classical" -> exact.classical();
                case "HC0" -> exact.hc0();
                case "HC1" -> exact.hc1();
                case "cluster:school" -> exact.clustered(SCHOOL);
                default -> exact.clustered(SCHOOL, WAVE);
            };
            if (errors.equals("cluster:school")) {
                oneWay = fit.stdError();
            } else if (errors.contains("+")) {
                // the two-way route, not the one-way sum again
                assertTrue(Math.abs(fit.stdError() - oneWay) > 1e-4 * oneWay, where + ": two-way equals one-way");
            }
            assertEquals(exact.estimate(), fit.estimate(), 1e-7 * Math.abs(exact.estimate()), where + " estimate");
            assertEquals(se, fit.stdError(), 1e-7 * se, where + " standard error (exact 60-digit arithmetic)");
        }
    }

    private static KeyFit fit(GeneralizedLinear glm, Table table, String model, String errors) {
        String json = """
                {"data": "near.csv", "decisions": [
                  {"name": "o", "kind": "outcome", "alternatives": [{"label": "y", "column": "y"}]},
                  {"name": "k", "kind": "predictor", "alternatives": [{"label": "x", "column": "key"}]},
                  {"name": "c", "kind": "controls", "required": ["first", "second"]},
                  {"name": "e", "kind": "errors", "alternatives": ["%s"]},
                  {"name": "m", "kind": "model", "alternatives": ["%s"]}]}
                """.formatted(errors, model);
        Plan plan = new PlanReader(false).read(json, Path.of("."));
        PlanChecker.check(plan, table);
        SpecificationModels models = new SpecificationModels(plan, table);
        long[] choices = new long[models.space().decisionCount()];
        models.space().decode(0, choices);
        DataVariant variant = models.variant(models.variantKey(models.variantOrdinal(choices)));
        return glm.fit(models.model(choices), new ObservedRows().of(variant));
    }
}
