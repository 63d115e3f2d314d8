package org.forkscape.reference;

import static org.forkscape.reference.ReferenceChecks.bits;
import static org.forkscape.reference.ReferenceChecks.check;
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
 * Analytic weights: every specification of {@code water-survey-plan.json} against R's {@code lm(weights = w)}
 * with {@code vcov}, {@code sandwich::vcovHC} (HC0-HC3) and {@code vcovCL} (one-way and two-way, HC1 with
 * cadjust), values in {@code water-survey-expected.csv} from {@code src/test/r/weights-reference.R} (versions
 * in {@code weights-versions.txt}: R 4.2.2, sandwich 3.0.2), on the invented survey that script generates with
 * a fixed seed. The data hold zero weights (a district whose weights are all zero among them), missing
 * weights, a control with missing cells and a control constant within districts (the QR refit beside the
 * absorbed district effects). R fits each specification on its positive-weight rows (README, "Plan file",
 * weights); {@link #sandwichWithZeroWeightRowsShrinksByThePositiveShare} checks the documented relation to
 * sandwich's value when zero-weight rows are left in the fit.
 *
 * <p>Tolerances as {@link RLmSandwichReferenceTest}'s and for the same reasons: estimate, standard error and
 * R-squared {@value #RELATIVE} relative; df, rows and coefficients exact. The largest errors measured are
 * written to {@code target/reference-reports/r-reference-water-survey-*.txt}.
 */
class RWeightsReferenceTest {
    static final double RELATIVE = RLmSandwichReferenceTest.RELATIVE;
    private static final String SOURCE = "R lm(weights = ) with vcov, sandwich::vcovHC and vcovCL, "
            + "water-survey-expected.csv";

    private final Plan plan = ReferenceFiles.plan("water-survey-plan.json");
    private final Table table = ReferenceFiles.table(plan);

    private RunResult run(MultiverseRunner runner) {
        return runner.run(plan, table, RunProgress.SILENT, new AtomicBoolean());
    }

    /**
     * The engine's own choice of routes (weighted specifications decline the fourth moments and take the
     * weighted per-cluster cells: {@code fit.AnalyticWeightsTest}).
     */
    @Test
    void everySpecificationAgreesWithRByTheEnginesRoutes() {
        RunResult run = run(new MultiverseRunner(2));
        assertTrue(run.refitByQr() > 0, "the urban control beside district effects should send some to the QR refit");
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
        ResultTable two = run(new MultiverseRunner(2)).results();
        assertArrayEquals(bits(one), bits(two));
    }

    /** The explorer's full fit of each specification (every coefficient from its weighted rows) gives R's key numbers. */
    @Test
    void theFullFitsKeyCoefficientAgreesWithR() {
        SpecificationModels models = new SpecificationModels(plan, table);
        FullFitter fitter = new FullFitter();
        List<String> failures = new ArrayList<>();
        Map<String, Double> worst = new TreeMap<>();
        int compared = 0;
        for (Map<String, String> row : ReferenceFiles.rows("water-survey-expected.csv")) {
            String where = "spec " + row.get("spec") + " (" + row.get("weights") + ", " + row.get("errors") + ")";
            FullFit fit = fitter.fit(plan, models, Long.parseLong(row.get("spec")) - 1);
            String status = row.get("status");
            if (!status.equals("ok")) {
                if (fit.ok() || !fit.status().startsWith(status)) {
                    failures.add(where + ": full fit status \"" + fit.status() + "\", R gives \"" + status + "\"");
                }
                continue;
            }
            compared++;
            check(failures, worst, where, "estimate", fit.key().estimate(), row, "R lm() coefficient", RELATIVE);
            check(failures, worst, where, "std_error", fit.key().stdError(), row, "vcov(), vcovHC or vcovCL", RELATIVE);
            check(failures, worst, where, "df", fit.df(), row, "R df.residual or min(G) - 1", 0);
            check(failures, worst, where, "r2", fit.r2(), row, "R summary.lm r.squared", RELATIVE);
            check(failures, worst, where, "n_obs", fit.nObs(), row, "R nobs()", 0);
        }
        AgreementReport.write("r-reference-water-survey-full-fit.txt", SOURCE, worst);
        assertTrue(compared > 800, compared + " specifications compared");
        assertTrue(failures.isEmpty(), failures.size() + " disagreements with " + SOURCE + ":\n"
                + String.join("\n", failures.subList(0, Math.min(20, failures.size()))));
    }

    /**
     * sandwich 3.0.2 on a weighted lm that keeps its zero-weight rows divides its meat by all n rows while
     * its bread counts the n+ positive-weight rows, so its HC0 standard error is ours times n+ / n (the
     * script's {@code with_zero_rows} column): the reason README gives for fitting the positive-weight rows.
     */
    @Test
    void sandwichWithZeroWeightRowsShrinksByThePositiveShare() {
        ResultTable r = run(new MultiverseRunner(1)).results();
        List<String> failures = new ArrayList<>();
        int compared = 0;
        for (Map<String, String> row : ReferenceFiles.rows("water-survey-expected.csv")) {
            if (!row.get("errors").equals("HC0") || row.get("with_zero_rows").isEmpty()) {
                continue;
            }
            int slot = slotOf(r, Integer.parseInt(row.get("spec")) - 1);
            int positive = r.nObs(slot);
            double all = positive + Double.parseDouble(row.get("zero_rows"));
            double expected = ReferenceFiles.number(row.get("with_zero_rows"));
            double err = Agreement.relativeError(r.stdError(slot) * positive / all, expected);
            compared++;
            if (!(err <= RELATIVE)) {
                failures.add("spec " + row.get("spec") + ": " + r.stdError(slot) + " x " + positive + "/" + all
                        + " against sandwich's " + expected);
            }
        }
        assertTrue(compared > 20, compared + " compared");
        assertTrue(failures.isEmpty(), String.join("\n", failures));
    }

    private static int slotOf(ResultTable r, long spec) {
        for (int slot = 0; slot < r.size(); slot++) {
            if (r.specIndex(slot) == spec) {
                return slot;
            }
        }
        throw new AssertionError("no slot for spec " + spec);
    }

    private void agree(RunResult run, String report) {
        ResultTable r = run.results();
        List<Map<String, String>> expected = ReferenceFiles.rows("water-survey-expected.csv");
        String source = SOURCE + " (" + ReferenceFiles.versions("weights-versions.txt") + ")";
        assertEquals(expected.size(), r.size(), "specification count against " + source);
        List<String> failures = new ArrayList<>();
        Map<String, Double> worst = new TreeMap<>();
        int weighted = 0;
        for (ReferenceRows.Match match : ReferenceRows.match(run, plan, expected, failures)) {
            Map<String, String> row = match.row();
            int slot = match.slot();
            String where = match.where();
            String status = row.get("status");
            check(failures, worst, where, "n_obs", r.nObs(slot), row, "R nobs()", 0);
            check(failures, worst, where, "estimate", r.estimate(slot), row, "R lm() coefficient", RELATIVE);
            check(failures, worst, where, "r2", r.r2(slot), row, "R summary.lm r.squared", RELATIVE);
            check(failures, worst, where, "n_params", r.nParams(slot), row, "R lm() rank", 0);
            if (status.equals("ok")) {
                if (row.get("weights").equals("survey")) {
                    weighted++;
                }
                check(failures, worst, where, "std_error", r.stdError(slot), row, row.get("errors").equals("classical")
                        ? "R vcov() of lm" : "sandwich::vcovHC or vcovCL", RELATIVE);
                check(failures, worst, where, "df", r.df(slot), row, "R df.residual or min(G) - 1", 0);
            } else if (!Double.isNaN(r.stdError(slot))) {
                failures.add(where + ": standard error " + r.stdError(slot) + " where R gives none (" + status + ")");
            }
        }
        AgreementReport.write("r-reference-water-survey-" + report + ".txt", source, worst);
        assertTrue(weighted > 400, weighted + " weighted specifications compared");
        assertTrue(failures.isEmpty(), failures.size() + " disagreements with " + source + ":\n"
                + String.join("\n", failures.subList(0, Math.min(20, failures.size()))));
    }
}
