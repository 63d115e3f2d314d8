package org.forkscape.fit;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.net.URISyntaxException;
import java.nio.file.Path;
import org.forkscape.data.CsvTableReader;
import org.forkscape.plan.Plan;
import org.forkscape.plan.PlanReader;
import org.junit.jupiter.api.Test;

/**
 * The route of a logit beside two and three absorbed columns: the estimator fits it by
 * {@link SeveralEffectsGlm} (scoring with weighted alternating projections), and its K is the dummies' rank
 * over the rows plus its columns, as R's {@code fit$rank} (reading-logit-expected.csv, spec 1 and 41, from
 * src/test/r/panel-glm-reference.R: 16 classrooms + 10 terms - 2 components = 24, plus the key = 25;
 * with the tutors 24 + 8 - 2 = 30, plus the key = 31; values of R 4.2.2).
 */
class SeveralEffectsGlmRouteTest {
    private final SpecificationModels models;

    SeveralEffectsGlmRouteTest() throws URISyntaxException {
        Path path = Path.of(SeveralEffectsGlmRouteTest.class.getResource("/reference/reading-logit-plan.json").toURI());
        Plan plan = new PlanReader(false).read(path);
        models = new SpecificationModels(plan, new CsvTableReader().read(plan.dataFile()));
    }

    @Test
    void aLogitBesideTwoOrThreeAbsorbedColumnsTakesTheSeveralEffectsRoute() {
        ModelDispatch estimator = new ModelDispatch(true);
        for (int absorb = 0; absorb < 2; absorb++) {
            DataVariant variant = models.variant(new VariantKey(new int[0], absorb, 0));
            assertTrue(variant.absorbsSeveral);
            KeyFit fit = estimator.fit(models.model(new long[] {0, 0, 0, absorb, 0, 0, 0}),
                    new ObservedRows().of(variant));
            assertTrue(fit.ok(), fit.statusText());
            assertEquals(absorb + 1, estimator.severalEffectsFits());
            assertEquals(absorb == 0 ? 25 : 31, fit.nParams(), "K = fit$rank");
        }
    }
}
