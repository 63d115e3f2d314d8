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
import org.junit.jupiter.api.Test;

/**
 * The statuses of a generalized linear fit that has no estimate (a property of the engine; the numbers
 * themselves are checked against R in reference.RGlmReferenceTest): a fit given up before it converged, a
 * key predictor that copies a control, and counts that a control predicts to be zero (the Poisson maximum
 * likelihood estimate does not exist: Santos Silva &amp; Tenreyro 2010). Invented river-survey data: fish
 * counted per net, by water temperature, current and a closed-season flag.
 */
class GlmStatusTest {
    private static Table survey() {
        SplittableRandom r = new SplittableRandom(41);
        int n = 300;
        double[] fish = new double[n];
        double[] caught = new double[n];
        double[] temperature = new double[n];
        double[] current = new double[n];
        double[] closed = new double[n];
        for (int i = 0; i < n; i++) {
            temperature[i] = 8 + 10 * r.nextDouble();
            current[i] = r.nextDouble();
            closed[i] = r.nextDouble() < 0.2 ? 1 : 0;
            double mean = Math.exp(0.2 + 0.08 * temperature[i] - 0.5 * current[i]);
            // nets are not set in the closed season: no fish are counted there
            fish[i] = closed[i] == 1 ? 0 : poisson(r, mean);
            caught[i] = fish[i] > 3 ? 1 : 0;
        }
        return new Table("survey.csv", List.of(new NumericColumn("fish", fish), new NumericColumn("caught", caught),
                new NumericColumn("temperature", temperature), new NumericColumn("current", current),
                new NumericColumn("current_copy", current.clone()), new NumericColumn("closed", closed)));
    }

    /** A Poisson variate: uniforms multiplied until their product falls below e^-mean (Knuth, The Art of Computer Programming, vol. 2, section 3.4.1; from memory). */
    static double poisson(SplittableRandom r, double mean) {
        double limit = Math.exp(-mean);
        double product = r.nextDouble();
        int k = 0;
        while (product > limit) {
            product *= r.nextDouble();
            k++;
        }
        return k;
    }

    private static KeyFit fit(Estimator estimator, String outcome, String model, String key, String controls) {
        String json = """
                {"data": "survey.csv", "decisions": [
                  {"name": "o", "kind": "outcome", "alternatives": [{"label": "y", "column": "%s"}]},
                  {"name": "k", "kind": "predictor", "alternatives": [{"label": "x", "column": "%s"}]},
                  {"name": "c", "kind": "controls", "required": [%s]},
                  {"name": "m", "kind": "model", "alternatives": ["%s"]}]}
                """.formatted(outcome, key, controls, model);
        Table table = survey();
        Plan plan = new PlanReader(false).read(json, Path.of("."));
        PlanChecker.check(plan, table);
        SpecificationModels models = new SpecificationModels(plan, table);
        long[] choices = new long[models.space().decisionCount()];
        models.space().decode(0, choices);
        DataVariant variant = models.variant(models.variantKey(models.variantOrdinal(choices)));
        return estimator.fit(models.model(choices), new ObservedRows().of(variant));
    }

    @Test
    void aFitGivenUpBeforeItConvergesHasThatStatusAndNoNumbers() {
        KeyFit converged = fit(new GeneralizedLinear(), "caught", "logit", "temperature", "\"current\"");
        assertTrue(converged.ok(), converged.statusText());
        KeyFit givenUp = fit(new GeneralizedLinear(1), "caught", "logit", "temperature", "\"current\"");
        assertEquals(FitStatus.NOT_CONVERGED, givenUp.status());
        assertEquals("not converged after 1 iterations", givenUp.statusText());
        assertTrue(Double.isNaN(givenUp.estimate()) && Double.isNaN(givenUp.stdError()) && Double.isNaN(givenUp.effect()));
    }

    @Test
    void aKeyPredictorThatCopiesAControlIsCollinear() {
        KeyFit fit = fit(new GeneralizedLinear(), "fish", "poisson", "current_copy", "\"temperature\", \"current\"");
        assertEquals(FitStatus.KEY_IN_CONTROLS, fit.status());
        assertEquals("collinear: the key predictor current_copy is a linear combination of the controls",
                fit.statusText());
    }

    @Test
    void countsThatAControlPredictsToBeZeroAreSeparated() {
        KeyFit without = fit(new GeneralizedLinear(), "fish", "poisson", "temperature", "\"current\"");
        assertTrue(without.ok(), without.statusText());
        KeyFit with = fit(new GeneralizedLinear(), "fish", "poisson", "temperature", "\"current\", \"closed\"");
        assertEquals(FitStatus.SEPARATION, with.status());
        assertTrue(with.statusText().startsWith("separation: the fitted means of "), with.statusText());
        assertTrue(Double.isNaN(with.estimate()));
    }
}
