package org.forkscape.fit;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Path;
import java.util.List;
import java.util.SplittableRandom;
import org.forkscape.data.NumericColumn;
import org.forkscape.data.Table;
import org.forkscape.plan.ModelFamily;
import org.forkscape.plan.Plan;
import org.forkscape.plan.PlanChecker;
import org.forkscape.plan.PlanReader;
import org.junit.jupiter.api.Test;

/**
 * A logistic and a Poisson fit whose columns are recorded 1e9 from zero give the numbers of the same fit on
 * the columns near zero (a property of the model: a shift of a column moves only the intercept, or the
 * levels' coefficients; the numbers near zero are those reference.RGlmReferenceTest holds to R). The
 * iterations read the rows in within coordinates, and the one-pass cross-products subtract only the
 * weighted level means of those, so the offset must cancel before any product is formed. Invented lake
 * survey: algal bloom (0/1) and bloom days by water temperature and a nutrient reading, lakes as levels.
 * Both fits must take the Cholesky route: the test asserts it, so that a QR fallback cannot hide a
 * cancellation.
 */
class GlmBadlyScaledTest {
    private static final double GRID = 1 << 20;

    private static Table lakes(double offset) {
        SplittableRandom r = new SplittableRandom(17);
        int n = 400;
        double[] bloom = new double[n];
        double[] days = new double[n];
        double[] temperature = new double[n];
        double[] nutrient = new double[n];
        double[] lake = new double[n];
        for (int i = 0; i < n; i++) {
            lake[i] = r.nextInt(8);
            // on a grid of 2^-20, so that the values plus 1e9 (whose spacing is 2^-23) are held exactly
            temperature[i] = Math.rint((14 + 8 * r.nextDouble()) * GRID) / GRID;
            nutrient[i] = Math.rint(1e-3 * r.nextGaussian() * GRID) / GRID;
            double eta = -6 + 0.3 * temperature[i] + 400 * nutrient[i] + 0.1 * lake[i];
            bloom[i] = r.nextDouble() < 1 / (1 + Math.exp(-eta)) ? 1 : 0;
            days[i] = Math.floor(Math.exp(eta / 3 + 1) * r.nextDouble() * 2);
            temperature[i] += offset;
            nutrient[i] += offset;
        }
        return new Table("lakes.csv", List.of(new NumericColumn("bloom", bloom), new NumericColumn("days", days),
                new NumericColumn("temperature", temperature), new NumericColumn("nutrient", nutrient),
                new NumericColumn("lake", lake)));
    }

    private static KeyFit fit(GeneralizedLinear glm, Table table, String outcome, String model, String absorb,
            String errors) {
        String json = """
                {"data": "lakes.csv", "decisions": [
                  {"name": "o", "kind": "outcome", "alternatives": [{"label": "y", "column": "%s"}]},
                  {"name": "k", "kind": "predictor", "alternatives": [{"label": "x", "column": "temperature"}]},
                  {"name": "c", "kind": "controls", "required": ["nutrient"]},
                  {"name": "e", "kind": "errors", "alternatives": ["%s"]},
                  {"name": "f", "kind": "absorb", "alternatives": [{"label": "f", "columns": [%s]}]},
                  {"name": "m", "kind": "model", "alternatives": ["%s"]}]}
                """.formatted(outcome, errors, absorb, model);
        Plan plan = new PlanReader(false).read(json, Path.of("."));
        PlanChecker.check(plan, table);
        SpecificationModels models = new SpecificationModels(plan, table);
        long[] choices = new long[models.space().decisionCount()];
        models.space().decode(0, choices);
        DataVariant variant = models.variant(models.variantKey(models.variantOrdinal(choices)));
        return glm.fit(models.model(choices), new ObservedRows().of(variant));
    }

    @Test
    void columnsFarFromZeroGiveTheNumbersOfColumnsNearIt() {
        Table near = lakes(0);
        Table far = lakes(1e9);
        for (String model : new String[] {"logit", "poisson"}) {
            String outcome = model.equals("logit") ? "bloom" : "days";
            for (String absorb : new String[] {"", "\"lake\""}) {
                for (String errors : new String[] {"classical", "HC3", "cluster:lake"}) {
                    GeneralizedLinear nearFit = new GeneralizedLinear();
                    GeneralizedLinear farFit = new GeneralizedLinear();
                    KeyFit a = fit(nearFit, near, outcome, model, absorb, errors);
                    KeyFit b = fit(farFit, far, outcome, model, absorb, errors);
                    String where = model + " " + absorb + " " + errors;
                    // the offset cancels before any product is formed, so both fits take the Cholesky of
                    // the cross-products: had it not, their pivots would have sent the far one to QR
                    assertFalse(nearFit.factoredByQr() || farFit.factoredByQr(), where + ": factored by QR");
                    assertTrue(nearFit.startedFromParentInformation() && farFit.startedFromParentInformation(),
                            where + ": started from the parent's information");
                    assertTrue(a.ok() && b.ok(), where + ": " + a.statusText() + " / " + b.statusText());
                    assertEquals(ModelFamily.valueOf(model.toUpperCase()), b.family(), where);
                    assertEquals(a.estimate(), b.estimate(), 1e-9 * Math.abs(a.estimate()), where);
                    assertEquals(a.stdError(), b.stdError(), 1e-9 * a.stdError(), where);
                    assertEquals(a.effect(), b.effect(), 1e-9 * Math.abs(a.effect()), where);
                    assertEquals(a.rss(), b.rss(), 1e-9 * a.rss(), where + " deviance");
                }
            }
        }
    }
}
