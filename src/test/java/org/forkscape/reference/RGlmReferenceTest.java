package org.forkscape.reference;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import java.util.TreeMap;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.ValueSource;

/**
 * Every specification of five committed GLM plans against R's glm with the sandwich package: reference
 * values in {@code src/test/resources/reference/glm/*-expected.csv}, produced by
 * {@code src/test/r/glm-reference.R} with the versions in {@code glm/versions.txt} (R 4.2.2, sandwich 3.0.2,
 * MASS 7.3-58.2). The script enumerates the specifications with its own loops and fits each from its rows:
 * glm(family = binomial("logit"), binomial("probit") or poisson("log"), epsilon 1e-14, restarted at the
 * estimate until its covariance is the information there), fixed effects as factor dummies, least squares
 * through lm. Here the engine runs the same plan file and its specifications.csv is read back; rows are joined
 * by the decision labels, and the spec numbers must agree too.
 *
 * <p>What each column is compared with (the R expression that produced it):
 * <ul>
 * <li>estimate: coef(glm)[key]; std_error: sqrt of vcov(glm) (dispersion 1), sandwich::vcovHC(type = HC0..HC3)
 * or sandwich::vcovCL(cluster) with its default for a glm (type HC0: the cluster sandwich times G/(G-1));
 * for least squares as in {@link RLmSandwichReferenceTest} (CR1, G/(G-1) (N-1)/(N-K)).</li>
 * <li>statistic, p_value, ci_low, ci_high: estimate / se, 2 pnorm(-|z|), estimate -/+ qnorm() se (t and qt
 * for least squares).</li>
 * <li>effect, effect_std_error: the average marginal effect, mean mu'(eta_i) b for a continuous key and the
 * mean of mu(eta_i1) - mu(eta_i0) for a 0/1 key, with the delta method's g' V g under the specification's
 * own V, written out in the script beside its formulas.</li>
 * <li>r2: McFadden's 1 - logLik / logLik of the null (intercept only, or the fixed effects alone);
 * model_p_value: pchisq of the likelihood-ratio statistic on K - K0 degrees of freedom; deviance:
 * deviance(glm). For least squares R-squared, pf of the F statistic and deviance(lm), the residual sum of
 * squares.</li>
 * <li>df, adj_r2: empty for a GLM; n_obs, n_params: nobs() and the rank, exact.</li>
 * <li>status: "ok", or the start of Forkscape's status ("separation" where R's glm warns of fitted
 * probabilities of 0 or 1 and its deviance goes to 0); then every number R leaves empty must be empty.</li>
 * </ul>
 *
 * <p>Tolerances: {@link GlmTolerance} by model (1e-7 relative for logit, probit and Poisson, 1e-9 for
 * least squares) for the estimate, its error, the statistic, the interval and the marginal effect and its
 * error; {@link GlmTolerance#pValue} for p_value; {@link GlmTolerance#LIKELIHOOD} for r2 and deviance;
 * {@link GlmTolerance#MODEL_P} for model_p_value. The largest errors measured are written to
 * {@code target/reference-reports/r-glm-*.txt}.
 */
class RGlmReferenceTest {
    private static final List<String> DEFINED_ONLY_WHEN_FITTED = List.of("estimate", "std_error", "statistic", "df",
            "p_value", "ci_low", "ci_high", "effect", "effect_std_error", "r2", "adj_r2", "model_p_value",
            "deviance");

    @ParameterizedTest(name = "{0}")
    @ValueSource(strings = {"birthwt-smoking", "birthwt-weight", "quine", "dobson", "school"})
    void everySpecificationAgreesWithGlmAndSandwich(String name) {
        WrittenSpecifications run = WrittenSpecifications.of(name);
        List<Map<String, String>> expected = ReferenceFiles.rows("glm/" + name + "-expected.csv");
        String source = "R glm() and sandwich, glm/" + name + "-expected.csv (" + ReferenceFiles.versions("glm/versions.txt")
                + ")";
        assertEquals(expected.size(), run.rows().size(), "specification count of glm/" + name + "-plan.json against "
                + source);
        List<String> failures = new ArrayList<>();
        Map<String, Double> worst = new TreeMap<>();
        for (Map<String, String> row : expected) {
            String where = name + " spec " + row.get("spec") + " (" + run.key(row) + ")";
            Map<String, String> written = run.rowLike(row);
            if (written == null) {
                failures.add(where + ": no such specification in Forkscape's run");
                continue;
            }
            compare(new ColumnComparison(written, row, where, source, failures, worst), row);
        }
        AgreementReport.write("r-glm-" + name + ".txt", source, worst);
        assertTrue(failures.isEmpty(), failures.size() + " disagreements with " + source + ":\n"
                + String.join("\n", failures.subList(0, Math.min(20, failures.size()))));
    }

    private static void compare(ColumnComparison c, Map<String, String> row) {
        c.exact("spec");
        String status = row.get("status");
        if (!c.has("status")) {
            return;
        }
        if (!status.equals("ok")) {
            if (!c.actual().get("status").startsWith(status)) {
                c.failures().add(c.where() + ": status \"" + c.actual().get("status") + "\", R gives \"" + status
                        + "\"");
            }
            DEFINED_ONLY_WHEN_FITTED.stream().filter(column -> row.get(column).isEmpty()).forEach(c::empty);
            return;
        }
        c.exact("status");
        GlmTolerance t = GlmTolerance.of(row.get("model"));
        c.relative("estimate", t.relative);
        c.relative("std_error", t.relative);
        c.relative("statistic", t.relative);
        c.relative("p_value", t.pValue(ReferenceFiles.number(row.get("statistic"))));
        c.bound("ci_low", t.relative);
        c.bound("ci_high", t.relative);
        c.relative("effect", t.relative);
        c.relative("effect_std_error", t.relative);
        c.exact("df");
        c.exact("n_obs");
        c.exact("n_params");
        boolean ols = t == GlmTolerance.OLS;
        c.relative("r2", ols ? t.relative : GlmTolerance.LIKELIHOOD);
        c.absolute("adj_r2", t.relative);
        c.relative("model_p_value", ols ? t.relative : GlmTolerance.MODEL_P);
        c.relative("deviance", ols ? t.relative : GlmTolerance.LIKELIHOOD);
    }
}
