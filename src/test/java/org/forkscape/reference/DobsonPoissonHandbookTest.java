package org.forkscape.reference;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.Map;
import org.apache.commons.math3.distribution.ChiSquaredDistribution;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;

/**
 * The Poisson example of Dobson (1990), "An Introduction to Generalized Linear Models", Chapman & Hall,
 * p. 93: counts 18, 17, 15, 20, 10, 20, 25, 13, 12 of three outcomes under three treatments, fitted as
 * counts ~ outcome + treatment. The figures typed below are those R's {@code ?glm} example prints for that
 * fit ({@code glm.D93}; run as {@code example(glm)} in R 4.2.2): the analysis-of-deviance table (null deviance
 * 10.5814 on 8 degrees of freedom, residual deviance 5.1291 on 4) and {@code logLik(glm.D93)} = -23.38066
 * (df = 5). They are R's printed figures for the book's data; the book's own page was not consulted. Each figure is checked to half a unit in its last printed digit, the only accuracy a printed
 * figure has; the 17-digit values of the same fit are {@link RGlmReferenceTest}'s.
 *
 * <p>The plan (glm/dobson-plan.json) makes outcome level 2's 0/1 column the key predictor and level 3's column
 * and the treatment (text levels) the controls, which spans the same model as R's two factors.
 */
class DobsonPoissonHandbookTest {
    /** R ?glm example, anova(glm.D93): residual deviance of counts ~ outcome + treatment, printed to 4 decimals. */
    private static final double RESIDUAL_DEVIANCE = 5.1291;
    /** R ?glm example, anova(glm.D93): the NULL row's residual deviance. */
    private static final double NULL_DEVIANCE = 10.5814;
    /** R ?glm example: logLik(glm.D93), printed to 5 decimals. */
    private static final double LOG_LIKELIHOOD = -23.38066;
    private static final double HALF_UNIT_4 = 0.5e-4;
    private static final double HALF_UNIT_5 = 0.5e-5;

    private static Map<String, String> classical;

    @BeforeAll
    static void run() {
        WrittenSpecifications run = WrittenSpecifications.of("dobson");
        classical = run.rows().values().stream().filter(r -> "classical".equals(r.get("errors"))).findFirst()
                .orElse(null);
    }

    @Test
    void residualDevianceAndDegreesOfFreedomAsPrinted() {
        assertNotNull(classical, "the classical specification of glm/dobson-plan.json");
        assertEquals("ok", classical.get("status"));
        // 4 residual and 8 null degrees of freedom (R ?glm example, anova(glm.D93)): 9 counts, 5 coefficients
        assertEquals(9, Integer.parseInt(classical.get("n_obs")), "n_obs: 8 null degrees of freedom + 1");
        assertEquals(5, Integer.parseInt(classical.get("n_params")), "n_params: 9 counts - 4 residual degrees of "
                + "freedom");
        assertEquals(RESIDUAL_DEVIANCE, number("deviance"), HALF_UNIT_4, "residual deviance, R ?glm example "
                + "(Dobson 1990, p. 93)");
    }

    /**
     * The likelihood-ratio statistic against the intercept-only model is the drop in deviance, 10.5814 -
     * 5.1291 = 5.4523 (to 1e-4: the difference of two figures each rounded to 4 decimals), on 5 - 1 = 4
     * degrees of freedom; its upper chi-square tail (Commons Math) at the ends of that range bounds the
     * p-value. The tail falls as the statistic grows.
     */
    @Test
    void likelihoodRatioTestFromThePrintedDeviances() {
        ChiSquaredDistribution chi2 = new ChiSquaredDistribution(null, 4);
        double drop = NULL_DEVIANCE - RESIDUAL_DEVIANCE;
        double low = 1 - chi2.cumulativeProbability(drop + 2 * HALF_UNIT_4);
        double high = 1 - chi2.cumulativeProbability(drop - 2 * HALF_UNIT_4);
        double p = number("model_p_value");
        assertTrue(p >= low && p <= high, "model_p_value " + p + " outside [" + low + ", " + high + "], the chi-square "
                + "tail of the deviance drop printed by R's ?glm example (Dobson 1990, p. 93)");
    }

    /**
     * McFadden's R-squared from the printed figures: logLik -23.38066 (to 5e-6) and the null model's
     * log-likelihood, lower by half the deviance drop; the corners of the two rounding ranges bound it
     * (1 - ll / ll0 is monotone in each).
     */
    @Test
    void mcFaddenRSquaredFromThePrintedLogLikelihood() {
        double drop = NULL_DEVIANCE - RESIDUAL_DEVIANCE;
        double low = Double.POSITIVE_INFINITY;
        double high = Double.NEGATIVE_INFINITY;
        for (double ll : new double[] {LOG_LIKELIHOOD - HALF_UNIT_5, LOG_LIKELIHOOD + HALF_UNIT_5}) {
            for (double d : new double[] {drop - 2 * HALF_UNIT_4, drop + 2 * HALF_UNIT_4}) {
                double r2 = 1 - ll / (ll - d / 2);
                low = Math.min(low, r2);
                high = Math.max(high, r2);
            }
        }
        double r2 = number("r2");
        assertTrue(r2 >= low && r2 <= high, "r2 " + r2 + " outside [" + low + ", " + high + "], McFadden's R-squared "
                + "from logLik and the deviances printed by R's ?glm example (Dobson 1990, p. 93)");
    }

    private static double number(String column) {
        assertNotNull(classical, "the classical specification of glm/dobson-plan.json");
        assertTrue(classical.containsKey(column), "specifications.csv has no column " + column);
        return ReferenceFiles.number(classical.get(column));
    }
}
