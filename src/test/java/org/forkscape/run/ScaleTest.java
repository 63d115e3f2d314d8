package org.forkscape.run;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.apache.commons.math3.distribution.NormalDistribution;
import org.apache.commons.math3.distribution.TDistribution;
import org.forkscape.plan.ModelFamily;
import org.junit.jupiter.api.Test;

/**
 * The average-marginal-effect scale and the groups of the scales with units, on the run of
 * {@link SummaryScalesTest#GLM_PLAN} (a 0/1 outcome by least squares and by a logit). Critical values from
 * Commons Math 3.6.1's {@link NormalDistribution} and {@link TDistribution} with a root-search accuracy of
 * {@value #ACCURACY}; 1e-12 relative, well above what that search leaves.
 */
class ScaleTest {
    static final double ACCURACY = 1e-15;

    @Test
    void theEffectIntervalUsesEachSpecificationsOwnReferenceAndIsTheCoefficientsForLeastSquares() {
        RunResult run = SummaryScalesTest.run(SummaryScalesTest.GLM_PLAN);
        ResultTable r = run.results();
        double confidence = run.plan().confidence();
        Scale effect = Scale.AVERAGE_MARGINAL_EFFECT;
        int checked = 0;
        for (int slot = 0; slot < r.size(); slot++) {
            double value = effect.value(r, slot);
            double low = effect.low(r, slot, confidence);
            double high = effect.high(r, slot, confidence);
            double critical;
            if (r.family(slot) == ModelFamily.OLS) {
                assertEquals(Scale.AS_FITTED.value(r, slot), value, 0, "for least squares the effect is the coefficient");
                assertEquals(Scale.AS_FITTED.low(r, slot, confidence), low, 0);
                assertEquals(Scale.AS_FITTED.high(r, slot, confidence), high, 0);
                critical = new TDistribution(null, r.df(slot), ACCURACY).inverseCumulativeProbability(1 - (1 - confidence) / 2);
            } else {
                assertTrue(Double.isInfinite(r.df(slot)));
                assertTrue(Math.abs(value - r.estimate(slot)) > 1e-6, "a logit effect is not its log-odds coefficient");
                critical = new NormalDistribution(null, 0, 1, ACCURACY).inverseCumulativeProbability(1 - (1 - confidence) / 2);
                checked++;
            }
            double half = critical * r.effectStdError(slot);
            assertEquals(value - half, low, 1e-12 * Math.abs(half) + 1e-15);
            assertEquals(value + half, high, 1e-12 * Math.abs(half) + 1e-15);
        }
        assertEquals(8, checked);
    }

    @Test
    void thePartialCorrelationIsUndefinedOnTheNormalReference() {
        assertTrue(Double.isNaN(Scale.partialCorrelation(2.5, Double.POSITIVE_INFINITY)),
                "t / sqrt(t^2 + df) would read as 0 with df infinite");
        assertEquals(2 / Math.sqrt(14), Scale.partialCorrelation(2, 10), 1e-15, "from the formula by hand");
    }

    @Test
    void theModelSplitsTheGroupsAsFittedButNotTheEffects() {
        RunResult run = SummaryScalesTest.run(SummaryScalesTest.GLM_PLAN);
        UnitGroups fitted = UnitGroups.of(run);
        assertEquals(2, fitted.groups().size());
        assertEquals("passed on hours, logit", fitted.groups().get(1).title());
        assertTrue(fitted.unitsDiffer());
        UnitGroups effects = UnitGroups.of(run, Scale.AVERAGE_MARGINAL_EFFECT);
        assertEquals(1, effects.groups().size());
        assertEquals(16, effects.groups().get(0).fitted());
        assertFalse(effects.unitsDiffer());
        assertEquals("passed on hours", effects.groups().get(0).title());
        assertEquals(Scale.AVERAGE_MARGINAL_EFFECT, Scale.named("effect"));
        assertThrows(IllegalArgumentException.class, () -> UnitGroups.of(run, Scale.STANDARDIZED));
    }

    @Test
    void eachModelsCoefficientIsNamedOnItsLinkScale() {
        // a 0/1 outcome is also a non-negative one, so every model can fit it
        RunResult run = SummaryScalesTest.run(SummaryScalesTest.GLM_PLAN.replace("[\"ols\", \"logit\"]",
                "[\"ols\", \"logit\", \"probit\", \"poisson\"]"));
        UnitGroups fitted = UnitGroups.of(run);
        assertEquals(java.util.List.of("passed per unit of tutoring (hours)",
                "log-odds of passed per unit of tutoring (hours)",
                "probit index (normal quantile of the probability) of passed per unit of tutoring (hours)",
                "log of the expected passed per unit of tutoring (hours)"),
                fitted.groups().stream().map(g -> fitted.unit(Scale.AS_FITTED, g)).toList());
        fitted.groups().forEach(g -> assertEquals(8, g.fitted(), g.title()));
        UnitGroups effects = UnitGroups.of(run, Scale.AVERAGE_MARGINAL_EFFECT);
        assertEquals(32, effects.groups().get(0).fitted());
        assertEquals("t or z statistic of tutoring (estimate / standard error; z for logit, probit and Poisson)",
                fitted.unit(Scale.T_STATISTIC, null));
    }
}
