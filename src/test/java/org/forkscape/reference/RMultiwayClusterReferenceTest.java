package org.forkscape.reference;

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
import org.forkscape.fit.VarianceRoute;
import org.forkscape.plan.Plan;
import org.forkscape.run.MultiverseRunner;
import org.forkscape.run.ResultTable;
import org.forkscape.run.RunProgress;
import org.forkscape.run.RunResult;
import org.junit.jupiter.api.Test;

/**
 * Two-way and three-way cluster-robust standard errors of every specification of
 * {@code plot-panel-plan.json} against R's lm() with {@code sandwich::vcovCL(fit, cluster = ~ a + b [+ c],
 * type = "HC1", cadjust = TRUE, multi0 = FALSE)}: values in {@code plot-panel-expected.csv}, produced by
 * {@code src/test/r/multiway-cluster-reference.R} with the versions in {@code multiway-versions.txt} (R 4.2.2,
 * sandwich 3.0.2), on the invented, unbalanced panel that script generates with a fixed seed. The plan has
 * plot fixed effects absorbed or not (R: explicit factor dummies), a control that the plot effects make
 * redundant (the QR refit), a control with missing cells, and a block of four rows where the two-way variance
 * is negative; in the full panel some three-way variances are negative too. Forkscape must then say so in
 * the status (R's value is not positive), and report one cluster where R would divide by G - 1 = 0.
 *
 * <p>Tolerances as {@link RLmSandwichReferenceTest}'s and for the same reasons: estimate and standard error
 * {@value #RELATIVE} relative; df, rows and coefficients exact. The largest errors measured are written to
 * {@code target/reference-reports/r-reference-plot-panel-*.txt}.
 */
class RMultiwayClusterReferenceTest {
    static final double RELATIVE = RLmSandwichReferenceTest.RELATIVE;
    private static final String SOURCE = "R lm() and sandwich::vcovCL(type = \"HC1\", cadjust = TRUE, multi0 = FALSE), "
            + "plot-panel-expected.csv";

    private final Plan plan = ReferenceFiles.plan("plot-panel-plan.json");
    private final Table table = ReferenceFiles.table(plan);

    private RunResult run(MultiverseRunner runner) {
        return runner.run(plan, table, RunProgress.SILENT, new AtomicBoolean());
    }

    /** The engine's own choice of routes: the per-cluster cells for some components, the row pass for others. */
    @Test
    void everySpecificationAgreesWithVcovClByTheEnginesRoutes() {
        RunResult run = run(new MultiverseRunner(2));
        // only classical and multi-way types are in the plan, so every cell-route count is a multi-way one
        long cells = run.routes().getOrDefault(VarianceRoute.CLUSTER_CELLS, 0L);
        long rowPass = run.routes().getOrDefault(VarianceRoute.ROW_PASS, 0L);
        assertTrue(cells > 0 && rowPass > 0, "routes " + run.routes() + ": expected both the per-cluster cells "
                + "(every component of season+observer) and the row pass (plot+season's one-row intersections)");
        assertTrue(run.refitByQr() > 0, "the area control beside plot effects should send some to the QR refit");
        agree(run, "engine-routes");
    }

    /** Every multi-way standard error by the row pass alone agrees as well. */
    @Test
    void everySpecificationAgreesWithVcovClByTheRowPass() {
        RunResult run = run(new MultiverseRunner(1, false));
        assertEquals(0L, run.routes().getOrDefault(VarianceRoute.CLUSTER_CELLS, 0L), "routes " + run.routes());
        agree(run, "row-pass");
    }

    /** Results do not depend on the number of threads (the components are added in one fixed order). */
    @Test
    void resultsAreBitIdenticalWhateverTheThreadCount() {
        ResultTable one = run(new MultiverseRunner(1)).results();
        ResultTable two = run(new MultiverseRunner(2)).results();
        assertArrayEquals(bits(one), bits(two));
    }

    /** The explorer's full fit of each specification (every coefficient from its rows) gives R's key error too. */
    @Test
    void theFullFitsKeyCoefficientAgreesWithVcovCl() {
        SpecificationModels models = new SpecificationModels(plan, table);
        FullFitter fitter = new FullFitter();
        List<String> failures = new ArrayList<>();
        Map<String, Double> worst = new TreeMap<>();
        int compared = 0;
        for (Map<String, String> row : ReferenceFiles.rows("plot-panel-expected.csv")) {
            String where = "spec " + row.get("spec") + " (" + row.get("errors") + ")";
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
            check(failures, worst, where, "std_error", fit.key().stdError(), row, "sandwich::vcovCL or vcov()", RELATIVE);
            check(failures, worst, where, "df", fit.df(), row, "R df.residual or min(G) - 1", 0);
        }
        AgreementReport.write("r-reference-plot-panel-full-fit.txt", SOURCE, worst);
        assertTrue(compared > 200, compared + " specifications compared");
        assertTrue(failures.isEmpty(), failures.size() + " disagreements with " + SOURCE + ":\n"
                + String.join("\n", failures.subList(0, Math.min(20, failures.size()))));
    }

    private static long[] bits(ResultTable r) {
        long[] out = new long[2 * r.size()];
        for (int slot = 0; slot < r.size(); slot++) {
            out[2 * (int) r.specIndex(slot)] = Double.doubleToRawLongBits(r.estimate(slot));
            out[2 * (int) r.specIndex(slot) + 1] = Double.doubleToRawLongBits(r.stdError(slot));
        }
        return out;
    }

    private void agree(RunResult run, String report) {
        ResultTable r = run.results();
        List<Map<String, String>> expected = ReferenceFiles.rows("plot-panel-expected.csv");
        String source = SOURCE + " (" + ReferenceFiles.versions("multiway-versions.txt") + ")";
        assertEquals(expected.size(), r.size(), "specification count against " + source);
        List<String> failures = new ArrayList<>();
        Map<String, Double> worst = new TreeMap<>();
        int notPositive = 0;
        for (ReferenceRows.Match match : ReferenceRows.match(run, plan, expected, failures)) {
            Map<String, String> row = match.row();
            int slot = match.slot();
            String where = match.where();
            String status = row.get("status");
            if (status.startsWith("undefined")) {
                notPositive++;
            }
            check(failures, worst, where, "n_obs", r.nObs(slot), row, "R nobs()", 0);
            if (!row.get("estimate").isEmpty()) {
                check(failures, worst, where, "estimate", r.estimate(slot), row, "R lm() coefficient", RELATIVE);
            }
            if (status.equals("ok")) {
                check(failures, worst, where, "n_params", r.nParams(slot), row, "R lm() rank", 0);
                check(failures, worst, where, "std_error", r.stdError(slot), row, row.get("errors").equals("classical")
                        ? "R vcov() of lm" : "sandwich::vcovCL", RELATIVE);
                check(failures, worst, where, "df", r.df(slot), row, "R df.residual or min(G) - 1", 0);
            } else if (!Double.isNaN(r.stdError(slot))) {
                failures.add(where + ": standard error " + r.stdError(slot) + " where R gives none (" + status + ")");
            }
        }
        AgreementReport.write("r-reference-plot-panel-" + report + ".txt", source, worst);
        assertTrue(notPositive >= 2, "expected two-way and three-way variances that are not positive, found "
                + notPositive);
        assertTrue(failures.isEmpty(), failures.size() + " disagreements with " + source + ":\n"
                + String.join("\n", failures.subList(0, Math.min(20, failures.size()))));
    }
}
