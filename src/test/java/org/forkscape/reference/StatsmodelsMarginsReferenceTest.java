package org.forkscape.reference;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import java.util.TreeMap;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.CsvSource;

/**
 * The key coefficient, its standard error and the average marginal effect of a 0/1 key predictor with its
 * delta-method error, against statsmodels (a second implementation beside R): values in
 * {@code src/test/resources/reference/glm/statsmodels-margins.csv}, produced by
 * {@code src/test/python/glm-margins-reference.py} with the versions in {@code glm/statsmodels-versions.txt}
 * (statsmodels 0.13.5, Debian's python3-statsmodels). Logit, Probit and Poisson fitted by Newton's method,
 * {@code get_margeff(at="overall", dummy=True)}: the mean over rows of F(x_i with the key at 1) - F(x_i with
 * the key at 0) and its analytic gradient; errors classical, HC0 and cluster by age (statsmodels' cluster
 * sandwich without its own correction, both errors times sqrt(G/(G-1)): sandwich::vcovCL's default for a glm). Probit standard errors are absent from the file: statsmodels builds them
 * on the observed information, Forkscape on the expected information. Rows are matched by spec number, and
 * the labels the script wrote must be the run's.
 *
 * <p>Tolerances: {@link GlmTolerance#GLM}, 1e-7 relative, for the reason given there: Forkscape stops by its
 * deviance and Newton-decrement rule, while statsmodels went to a Newton step below 1e-12 (it agrees with R's
 * glm to 3e-14 on these rows).
 */
class StatsmodelsMarginsReferenceTest {
    private static final List<String> LABELS = List.of("model", "controls", "fixed effects", "errors");

    @ParameterizedTest(name = "{0}")
    @CsvSource({"birthwt-smoking, 192", "quine, 16"})
    void marginalEffectsAgreeWithStatsmodels(String name, int rows) {
        WrittenSpecifications run = WrittenSpecifications.of(name);
        Map<String, Map<String, String>> bySpec = new TreeMap<>();
        run.rows().values().forEach(r -> bySpec.put(r.get("spec"), r));
        List<Map<String, String>> expected = ReferenceFiles.rows("glm/statsmodels-margins.csv").stream()
                .filter(r -> r.get("plan").equals(name)).toList();
        String source = "statsmodels get_margeff, glm/statsmodels-margins.csv ("
                + ReferenceFiles.versions("glm/statsmodels-versions.txt") + ")";
        assertEquals(rows, expected.size(), "rows of " + name + " in " + source);
        List<String> failures = new ArrayList<>();
        Map<String, Double> worst = new TreeMap<>();
        for (Map<String, String> row : expected) {
            String where = name + " spec " + row.get("spec");
            Map<String, String> written = bySpec.get(row.get("spec"));
            if (written == null) {
                failures.add(where + ": no such specification in Forkscape's run");
                continue;
            }
            ColumnComparison c = new ColumnComparison(written, row, where, source, failures, worst);
            LABELS.forEach(c::exact);
            GlmTolerance t = GlmTolerance.of(row.get("model"));
            c.relative("estimate", t.relative);
            c.relative("effect", t.relative);
            if (!row.get("std_error").isEmpty()) {
                c.relative("std_error", t.relative);
                c.relative("effect_std_error", t.relative);
            }
        }
        AgreementReport.write("statsmodels-margins-" + name + ".txt", source, worst);
        assertTrue(failures.isEmpty(), failures.size() + " disagreements with " + source + ":\n"
                + String.join("\n", failures.subList(0, Math.min(20, failures.size()))));
    }
}
