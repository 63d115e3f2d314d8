package org.forkscape.reference;

import static org.forkscape.reference.ReferenceChecks.bits;
import static org.forkscape.reference.ReferenceChecks.check;
import static org.forkscape.reference.ReferenceChecks.lmRow;
import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import java.util.TreeMap;
import java.util.concurrent.atomic.AtomicBoolean;
import org.forkscape.data.Table;
import org.forkscape.fit.FullFit;
import org.forkscape.fit.FullFitter;
import org.forkscape.fit.SpecificationModels;
import org.forkscape.plan.Plan;
import org.forkscape.run.MultiverseRunner;
import org.forkscape.run.ResultTable;
import org.forkscape.run.RunProgress;
import org.forkscape.run.RunResult;
import org.junit.jupiter.api.Test;

/**
 * Two crossed absorbed fixed-effect columns (pupil and term) against R's lm() with explicit factor() dummies for
 * every absorbed column and sandwich's vcovHC (HC0, HC1) and vcovCL (one-way, and two-way with {@code type =
 * "HC1", cadjust = TRUE, multi0 = FALSE}), every specification of {@code school-panel-plan.json}: values in
 * {@code school-panel-expected.csv}, produced by {@code src/test/r/two-way-effects-reference.R} with the versions
 * in {@code two-way-versions.txt} (R 4.2.2, sandwich 3.0.2), on the invented, unbalanced panel that script
 * generates with a fixed seed. The panel's two schools share no pupils and no terms, so the pupil-term graph
 * has two connected components and the dummies lose two levels, not one (K = lm's rank, exact); it has a pupil
 * seen once (a singleton, kept by lm and here); controls constant within pupils and within terms, which the
 * effects make redundant (the QR refit drops them as lm does); and a control with missing cells, so the
 * specifications of one variant use several row sets, each demeaned on its own. The same plan absorbs no
 * column and one column (the cell-sum route) beside the two.
 *
 * <p>Tolerances as {@link RLmSandwichReferenceTest}'s and for the same reasons: estimate, standard error and
 * R-squared {@value #RELATIVE} relative; df, rows and coefficients exact. The largest errors measured are
 * written to {@code target/reference-reports/r-reference-school-panel-*.txt}.
 */
class RTwoWayEffectsReferenceTest {
    static final double RELATIVE = RLmSandwichReferenceTest.RELATIVE;
    private static final String SOURCE = "R lm() with factor() dummies, sandwich::vcovHC and vcovCL, "
            + "school-panel-expected.csv";

    private final Plan plan = ReferenceFiles.plan("school-panel-plan.json");
    private final Table table = ReferenceFiles.table(plan);

    private RunResult run(MultiverseRunner runner) {
        return runner.run(plan, table, RunProgress.SILENT, new AtomicBoolean());
    }

    @Test
    void everySpecificationAgreesWithLmAndSandwich() {
        RunResult run = run(new MultiverseRunner(2));
        assertTrue(run.refitByQr() > 0, "the controls constant within pupils or terms should send some "
                + "specifications to the QR refit");
        agree(run, "engine");
    }

    /** Results do not depend on the number of threads (each row set is demeaned in one fixed order). */
    @Test
    void resultsAreBitIdenticalWhateverTheThreadCount() {
        ResultTable one = run(new MultiverseRunner(1)).results();
        ResultTable three = run(new MultiverseRunner(3)).results();
        assertArrayEquals(bits(one), bits(three));
    }

    /** The explorer's full fit of each specification (every coefficient from its demeaned rows) agrees too. */
    @Test
    void theFullFitsKeyCoefficientAgreesWithLmAndSandwich() {
        SpecificationModels models = new SpecificationModels(plan, table);
        FullFitter fitter = new FullFitter();
        List<String> failures = new ArrayList<>();
        Map<String, Double> worst = new TreeMap<>();
        int compared = 0;
        for (Map<String, String> row : ReferenceFiles.rows("school-panel-expected.csv")) {
            if (!row.get("effects").equals("pupil and term")) {
                continue;
            }
            String where = "spec " + row.get("spec") + " (" + row.get("errors") + ")";
            FullFit fit = fitter.fit(plan, models, Long.parseLong(row.get("spec")) - 1);
            compared++;
            check(failures, worst, where, "estimate", fit.key().estimate(), row, "R lm() coefficient", RELATIVE);
            check(failures, worst, where, "std_error", fit.key().stdError(), row, "sandwich or vcov()", RELATIVE);
            check(failures, worst, where, "df", fit.df(), row, "R df.residual or min(G) - 1", 0);
            check(failures, worst, where, "n_params", fit.nParams(), row, "R lm() rank", 0);
            check(failures, worst, where, "effects_rank", fit.absorbedLevels(), row,
                    "rank of R's model.matrix of the factors", 0);
            check(failures, worst, where, "r2", fit.r2(), row, "R summary.lm r.squared", RELATIVE);
        }
        AgreementReport.write("r-reference-school-panel-full-fit.txt", SOURCE, worst);
        assertEquals(160, compared, "specifications with both effects absorbed");
        assertTrue(failures.isEmpty(), failures.size() + " disagreements with " + SOURCE + ":\n"
                + String.join("\n", failures.subList(0, Math.min(20, failures.size()))));
    }

    private void agree(RunResult run, String report) {
        ResultTable r = run.results();
        List<Map<String, String>> expected = ReferenceFiles.rows("school-panel-expected.csv");
        String source = SOURCE + " (" + ReferenceFiles.versions("two-way-versions.txt") + ")";
        assertEquals(expected.size(), r.size(), "specification count against " + source);
        List<String> failures = new ArrayList<>();
        Map<String, Double> worst = new TreeMap<>();
        int twoComponents = 0;
        int droppedBesideBoth = 0;
        for (ReferenceRows.Match match : ReferenceRows.match(run, plan, expected, failures)) {
            Map<String, String> row = match.row();
            int slot = match.slot();
            String where = match.where();
            if (!lmRow(failures, worst, where, r, slot, row, RELATIVE)) {
                continue;
            }
            if (row.get("effects").equals("pupil and term") && r.status(slot).contains("collinear with the fixed effects")) {
                // the QR refit over the demeaned rows dropped a control the two sets of effects explain
                droppedBesideBoth++;
            }
            if (row.get("effects").equals("pupil and term") && row.get("rows").equals("both schools")) {
                // 51 pupils and 10 terms in two components: rank 59, as the rank of R's model matrix says
                check(failures, worst, where, "effects_rank", 59, row, "rank of R's model.matrix of the factors", 0);
                twoComponents++;
            }
        }
        AgreementReport.write("r-reference-school-panel-" + report + ".txt", source, worst);
        assertEquals(80, twoComponents, "specifications on the two-component panel");
        // class_size or home_support in 6 of the 8 control subsets, 2 outcomes, 2 samples, 5 error types
        assertEquals(6 * 2 * 2 * 5, droppedBesideBoth, "specifications refitted by QR beside both effects");
        assertTrue(failures.isEmpty(), failures.size() + " disagreements with " + source + ":\n"
                + String.join("\n", failures.subList(0, Math.min(20, failures.size()))));
    }
}
