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
 * Three and four crossed absorbed fixed-effect columns (pupil, term, teacher, region) against R's lm() and
 * lm(weights = ) with explicit factor() dummies for every absorbed column, its hatvalues (a leverage above
 * 1 - 1e-10 gives the status {@code undefined: leverage 1}, as the singleton pupils do), sandwich's vcovHC (HC0 to
 * HC3) and
 * vcovCL (one-way, and two-way with {@code type = "HC1", cadjust = TRUE, multi0 = FALSE}), every specification of
 * {@code three-way-panel-plan.json}: values in {@code three-way-panel-expected.csv}, produced by
 * {@code src/test/r/three-way-effects-reference.R} with the versions in {@code three-way-versions.txt} (R 4.2.2,
 * sandwich 3.0.2), on the invented, unbalanced panel that script generates with a fixed seed. Its dummies' rank
 * is not the naive count: two schools that share no pupil, term or teacher; a teacher who keeps one class every
 * term and teachers who take whole terms (each dummy a sum of other columns' dummies); a region nested in the
 * pupil. K is lm's fit$rank and the dummies' rank that of qr() on their model matrix, both exact; here they can
 * only come from the exact rank ({@code fit.ModularDummyRank}), since the levels less one per connected
 * component of the level graph would give 4 more. The plan absorbs no column and two columns (connected
 * components) beside three and four, unweighted and with survey weights.
 *
 * <p>Tolerances as {@link RLmSandwichReferenceTest}'s and for the same reasons: estimate, standard error and
 * R-squared {@value #RELATIVE} relative; df, rows and coefficients exact. The largest errors measured are
 * written to {@code target/reference-reports/r-reference-three-way-panel-*.txt}.
 */
class RThreeWayEffectsReferenceTest {
    static final double RELATIVE = RLmSandwichReferenceTest.RELATIVE;
    private static final String SOURCE = "R lm() with factor() dummies, sandwich::vcovHC and vcovCL, "
            + "three-way-panel-expected.csv";

    private final Plan plan = ReferenceFiles.plan("three-way-panel-plan.json");
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

    /** Results do not depend on the number of threads (each row set is demeaned and ranked in one fixed order). */
    @Test
    void resultsAreBitIdenticalWhateverTheThreadCount() {
        ResultTable one = run(new MultiverseRunner(1)).results();
        ResultTable three = run(new MultiverseRunner(3)).results();
        assertArrayEquals(bits(one), bits(three));
    }

    /** The explorer's full fit of each specification with three or four columns agrees too. */
    @Test
    void theFullFitsKeyCoefficientAgreesWithLmAndSandwich() {
        SpecificationModels models = new SpecificationModels(plan, table);
        FullFitter fitter = new FullFitter();
        List<String> failures = new ArrayList<>();
        Map<String, Double> worst = new TreeMap<>();
        int compared = 0;
        for (Map<String, String> row : ReferenceFiles.rows("three-way-panel-expected.csv")) {
            String effects = row.get("effects");
            if (!effects.equals("pupil, term and teacher") && !effects.equals("all four")
                    || !row.get("status").equals("ok")) {
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
        AgreementReport.write("r-reference-three-way-panel-full-fit.txt", SOURCE, worst);
        // 8 control subsets, 3 samples, 2 absorb alternatives, 2 weightings, 5 error types besides HC2 and HC3, and
        // the 32 HC2 and HC3 specifications on the steady pupils whose rows hold no singleton
        assertEquals(8 * 3 * 2 * 2 * 5 + 32, compared, "fitted specifications with three or four columns absorbed");
        assertTrue(failures.isEmpty(), failures.size() + " disagreements with " + SOURCE + ":\n"
                + String.join("\n", failures.subList(0, Math.min(20, failures.size()))));
    }

    private void agree(RunResult run, String report) {
        ResultTable r = run.results();
        List<Map<String, String>> expected = ReferenceFiles.rows("three-way-panel-expected.csv");
        String source = SOURCE + " (" + ReferenceFiles.versions("three-way-versions.txt") + ")";
        assertEquals(expected.size(), r.size(), "specification count against " + source);
        List<String> failures = new ArrayList<>();
        Map<String, Double> worst = new TreeMap<>();
        int notNaive = 0;
        int droppedBesideThree = 0;
        int several = 0;
        int leverages = 0;
        for (ReferenceRows.Match match : ReferenceRows.match(run, plan, expected, failures)) {
            Map<String, String> row = match.row();
            int slot = match.slot();
            String where = match.where();
            if (!lmRow(failures, worst, where, r, slot, row, RELATIVE)) {
                continue;
            }
            String effects = row.get("effects");
            boolean threeOrMore = effects.equals("pupil, term and teacher") || effects.equals("term, teacher and region")
                    || effects.equals("all four");
            several += threeOrMore ? 1 : 0;
            leverages += threeOrMore && row.get("errors").startsWith("HC2") || threeOrMore
                    && row.get("errors").startsWith("HC3") ? 1 : 0;
            if (threeOrMore && r.status(slot).contains("collinear with the fixed effects")) {
                droppedBesideThree++;
            }
            if ((effects.equals("pupil, term and teacher") || effects.equals("all four"))
                    && row.get("rows").equals("both schools")) {
                // 62 pupils, 10 terms, 6 teachers (and 5 regions) in two groups: the levels less one per connected
                // component would be 76 (81); R's rank is 72, which only the exact rank gives
                check(failures, worst, where, "effects_rank", 72, row, "rank of R's model.matrix of the factors", 0);
                notNaive++;
            }
        }
        AgreementReport.write("r-reference-three-way-panel-" + report + ".txt", source, worst);
        assertEquals(8 * 3 * 3 * 2 * 5 + 128, several, "fitted specifications with three or four columns");
        // term, teacher and region in every sample (96), and the 32 on the steady pupils beside pupil effects
        assertEquals(128, leverages, "HC2 and HC3 specifications with three or four columns, R's hatvalues below 1");
        assertEquals(8 * 2 * 2 * 5, notNaive, "specifications whose rank is not the component count");
        // class_size (constant within terms) or home_support (within pupils, beside pupil effects) in some subsets
        assertTrue(droppedBesideThree > 0, "specifications refitted by QR beside three or more columns");
        assertTrue(failures.isEmpty(), failures.size() + " disagreements with " + source + ":\n"
                + String.join("\n", failures.subList(0, Math.min(20, failures.size()))));
    }
}
