package org.forkscape.reference;

import static org.forkscape.reference.ReferenceChecks.bits;
import static org.forkscape.reference.ReferenceChecks.check;
import static org.forkscape.reference.ReferenceChecks.compareCoefficients;
import static org.forkscape.reference.ReferenceChecks.coefficientsBySpec;
import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import java.util.Set;
import java.util.TreeMap;
import java.util.concurrent.atomic.AtomicBoolean;
import org.forkscape.data.Table;
import org.forkscape.fit.FullFit;
import org.forkscape.fit.FullFitter;
import org.forkscape.fit.SpecificationModels;
import org.forkscape.fit.VarianceRoute;
import org.forkscape.plan.Plan;
import org.forkscape.run.MultiverseRunner;
import org.forkscape.run.ResultTable;
import org.forkscape.run.RunProgress;
import org.forkscape.run.RunResult;
import org.junit.jupiter.api.Test;

/**
 * HC2 and HC3 standard errors beside two crossed absorbed columns (pupil and term) against R's {@code lm} with
 * explicit factor() dummies for both columns, unweighted and {@code lm(weights = w)}, and sandwich's
 * {@code vcovHC(type = "HC2")} and {@code vcovHC(type = "HC3")}, whose leverages are {@code hatvalues} of that
 * fit: every specification of {@code school-panel-leverage-plan.json} (estimate, standard error, df, rows, K,
 * R-squared, status), values in {@code school-panel-leverage-expected.csv} and every coefficient of the
 * two-way specifications in {@code school-panel-leverage-coefficients.csv}, produced by
 * {@code src/test/r/two-way-leverage-reference.R} with the versions in {@code two-way-leverage-versions.txt}
 * (R 4.2.2, sandwich 3.0.2). The data are the invented school panel of {@link RTwoWayWeightsReferenceTest}
 * (two connected components of the pupil-term graph, singleton pupils, controls constant within pupils and
 * within terms, a control with missing cells, survey weights with zeros and missing cells) with positive design
 * weights. With every pupil a singleton's leverage is 1 and R's HC2 and HC3 are 0/0 (NaN): the status is
 * {@code undefined: leverage 1}; with only the pupils seen twice or more in every specification the values are
 * compared, over both components, and also beside one absorbed column.
 *
 * <p>Tolerances as {@link RLmSandwichReferenceTest}'s and for the same reasons: estimate, standard error and
 * R-squared {@value #RELATIVE} relative; df, rows and coefficients exact. The largest errors measured are
 * written to {@code target/reference-reports/r-reference-school-panel-leverage-*.txt}.
 */
class RTwoWayLeverageReferenceTest {
    static final double RELATIVE = RLmSandwichReferenceTest.RELATIVE;
    private static final String PLAN = "school-panel-leverage-plan.json";
    private static final String EXPECTED = "school-panel-leverage-expected.csv";
    private static final String SOURCE = "R lm() and lm(weights = ) with factor() dummies, hatvalues, "
            + "sandwich::vcovHC HC2 and HC3, " + EXPECTED;
    private static final String BOTH = "pupil and term";

    private final Plan plan = ReferenceFiles.plan(PLAN);
    private final Table table = ReferenceFiles.table(plan);

    private RunResult run(MultiverseRunner runner) {
        return runner.run(plan, table, RunProgress.SILENT, new AtomicBoolean());
    }

    /** The engine's own choice of routes: HC2 and HC3 take the row pass, the collinear controls the QR refit. */
    @Test
    void everySpecificationAgreesWithRByTheEnginesRoutes() {
        RunResult run = run(new MultiverseRunner(2));
        assertTrue(run.refitByQr() > 0, "the controls constant within pupils or terms should send some "
                + "specifications to the QR refit, whose rows the leverages then read");
        assertEquals(Set.of(VarianceRoute.ROW_PASS), run.routes().keySet(), "HC2 and HC3 need the rows");
        agree(run, "engine-routes");
    }

    /** The same by the row pass alone. */
    @Test
    void everySpecificationAgreesWithRByTheRowPass() {
        agree(run(new MultiverseRunner(1, false)), "row-pass");
    }

    /** Results do not depend on the number of threads. */
    @Test
    void resultsAreBitIdenticalWhateverTheThreadCount() {
        ResultTable one = run(new MultiverseRunner(1)).results();
        ResultTable three = run(new MultiverseRunner(3)).results();
        assertArrayEquals(bits(one), bits(three));
    }

    /**
     * The explorer's full fit of each two-way specification R fits: every coefficient (the controls lm keeps with
     * the dummies entered first, and the key) with its HC2 or HC3 standard error, and the fit's df, K and rows;
     * the others have the status of their key fit.
     */
    @Test
    void theFullFitsEveryCoefficientAgreesWithR() {
        SpecificationModels models = new SpecificationModels(plan, table);
        FullFitter fitter = new FullFitter();
        Map<String, Map<String, Map<String, String>>> coefficientsBySpec = coefficientsBySpec("school-panel-leverage-coefficients.csv");
        List<String> failures = new ArrayList<>();
        Map<String, Double> worst = new TreeMap<>();
        int compared = 0;
        int undefined = 0;
        int coefficients = 0;
        for (Map<String, String> row : ReferenceFiles.rows(EXPECTED)) {
            if (!row.get("effects").equals(BOTH)) {
                continue;
            }
            String where = "spec " + row.get("spec") + " (" + row.get("controls") + ", " + row.get("rows") + ", "
                    + row.get("weights") + ", " + row.get("errors") + ")";
            FullFit fit = fitter.fit(plan, models, Long.parseLong(row.get("spec")) - 1);
            if (!row.get("status").equals("ok")) {
                if (fit.ok() || !fit.status().startsWith(row.get("status"))) {
                    failures.add(where + ": full fit status \"" + fit.status() + "\", R gives \"" + row.get("status")
                            + "\"");
                }
                undefined++;
                continue;
            }
            if (!fit.ok()) {
                failures.add(where + ": full fit status \"" + fit.status() + "\", R gives ok");
                continue;
            }
            compared++;
            check(failures, worst, where, "estimate", fit.key().estimate(), row, "R lm() coefficient", RELATIVE);
            check(failures, worst, where, "std_error", fit.key().stdError(), row, "sandwich::vcovHC", RELATIVE);
            check(failures, worst, where, "df", fit.df(), row, "R df.residual", 0);
            check(failures, worst, where, "n_obs", fit.nObs(), row, "R nobs()", 0);
            check(failures, worst, where, "n_params", fit.nParams(), row, "R lm() rank", 0);
            check(failures, worst, where, "r2", fit.r2(), row, "R summary.lm r.squared", RELATIVE);
            coefficients += compareCoefficients(fit, coefficientsBySpec.getOrDefault(row.get("spec"), Map.of()), where,
                    "sandwich::vcovHC", RELATIVE, failures, worst);
        }
        AgreementReport.write("r-reference-school-panel-leverage-full-fit.txt", SOURCE, worst);
        // 8 control subsets x 3 weightings x 2 error types with the pupils seen twice or more; every pupil: leverage 1
        assertEquals(48, compared, "two-way specifications R fits");
        assertEquals(48, undefined, "two-way specifications with a leverage of 1");
        assertEquals(72, coefficients, "coefficients of those specifications in the reference file");
        assertTrue(failures.isEmpty(), failures.size() + " disagreements with " + SOURCE + ":\n"
                + String.join("\n", failures.subList(0, Math.min(20, failures.size()))));
    }

    private void agree(RunResult run, String report) {
        ResultTable r = run.results();
        List<Map<String, String>> expected = ReferenceFiles.rows(EXPECTED);
        String source = SOURCE + " (" + ReferenceFiles.versions("two-way-leverage-versions.txt") + ")";
        assertEquals(expected.size(), r.size(), "specification count against " + source);
        List<String> failures = new ArrayList<>();
        Map<String, Double> worst = new TreeMap<>();
        int twoWay = 0;
        int twoWayUndefined = 0;
        for (ReferenceRows.Match match : ReferenceRows.match(run, plan, expected, failures)) {
            Map<String, String> row = match.row();
            int slot = match.slot();
            String where = match.where();
            check(failures, worst, where, "n_obs", r.nObs(slot), row, "R nobs()", 0);
            check(failures, worst, where, "estimate", r.estimate(slot), row, "R lm() coefficient", RELATIVE);
            check(failures, worst, where, "n_params", r.nParams(slot), row, "R lm() rank", 0);
            if (!row.get("status").equals("ok")) {
                twoWayUndefined += row.get("effects").equals(BOTH) ? 1 : 0;
                continue;
            }
            check(failures, worst, where, "std_error", r.stdError(slot), row, "sandwich::vcovHC", RELATIVE);
            check(failures, worst, where, "df", r.df(slot), row, "R df.residual", 0);
            check(failures, worst, where, "r2", r.r2(slot), row, "R summary.lm r.squared", RELATIVE);
            twoWay += row.get("effects").equals(BOTH) ? 1 : 0;
        }
        AgreementReport.write("r-reference-school-panel-leverage-" + report + ".txt", source, worst);
        assertEquals(48, twoWay, "two-way specifications with HC2 or HC3 compared");
        assertEquals(48, twoWayUndefined, "two-way specifications with a leverage of 1");
        assertTrue(failures.isEmpty(), failures.size() + " disagreements with " + source + ":\n"
                + String.join("\n", failures.subList(0, Math.min(20, failures.size()))));
    }
}
