package org.forkscape.reference;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.List;
import java.util.Map;
import org.junit.jupiter.api.Test;

/**
 * An outcome that one control separates completely has no maximum-likelihood estimate (Albert & Anderson
 * 1984, "On the existence of maximum likelihood estimates in logistic regression models", Biometrika 71(1)):
 * the invented school data of {@code glm/school.csv} (written by {@code src/test/r/glm-reference.R} with a
 * fixed seed) pass the exam exactly when the practice score is above 55. Every specification of
 * glm/school-plan.json with the practice score among its controls must be reported as separated, with no
 * numbers; every other one is fitted. R's glm on the same specifications warns that fitted probabilities
 * reached 0 or 1 and drives the deviance to 0 exactly for the former (the script stops otherwise), and
 * {@link RGlmReferenceTest} compares the fitted ones with it.
 */
class CompleteSeparationTest {
    private static final List<String> NUMBERS = List.of("estimate", "std_error", "statistic", "p_value", "ci_low",
            "ci_high", "effect", "effect_std_error", "r2", "model_p_value", "deviance");

    @Test
    void everySpecificationWithTheSeparatingControlIsReportedAndTheOthersFit() {
        Map<String, Map<String, String>> rows = WrittenSpecifications.of("school").rows();
        assertEquals(16, rows.size(), "2 models x 4 control sets x 2 error types");
        for (Map<String, String> row : rows.values()) {
            String where = "spec " + row.get("spec") + " (" + row.get("model") + ", " + row.get("controls") + ", "
                    + row.get("errors") + ")";
            NUMBERS.forEach(column -> assertTrue(row.containsKey(column), "specifications.csv has no column " + column));
            boolean separated = row.get("controls").contains("practice_score");
            if (separated) {
                assertTrue(row.get("status").startsWith("separation"), where + ": status \"" + row.get("status")
                        + "\"; the practice score separates the outcome");
                for (String column : NUMBERS) {
                    assertEquals("", row.get(column), where + ": " + column + " of a separated specification");
                }
            } else {
                assertEquals("ok", row.get("status"), where);
                for (String column : NUMBERS) {
                    assertFalse(row.get(column).isEmpty(), where + ": " + column + " of a fitted specification");
                }
            }
        }
    }
}
