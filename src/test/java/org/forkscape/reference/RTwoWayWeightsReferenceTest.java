package org.forkscape.reference;

import static org.forkscape.reference.ReferenceChecks.bits;
import static org.forkscape.reference.ReferenceChecks.check;
import static org.forkscape.reference.ReferenceChecks.lmRow;
import static org.forkscape.reference.ReferenceChecks.compareCoefficients;
import static org.forkscape.reference.ReferenceChecks.coefficientsBySpec;
import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import java.io.UncheckedIOException;
import java.nio.file.Files;
import java.nio.file.Path;
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
import org.forkscape.plan.PlanReader;
import org.forkscape.run.MultiverseRunner;
import org.forkscape.run.ResultTable;
import org.forkscape.run.RunProgress;
import org.forkscape.run.RunResult;
import org.junit.jupiter.api.Test;
import tools.jackson.databind.JsonNode;
import tools.jackson.databind.json.JsonMapper;
import tools.jackson.databind.node.ArrayNode;
import tools.jackson.databind.node.ObjectNode;

/**
 * Analytic weights together with two crossed absorbed columns (pupil and term) against R's {@code lm(weights =
 * w)} with explicit factor() dummies for every absorbed column, {@code vcov}, sandwich's vcovHC (HC0, HC1) and
 * vcovCL (one-way, and two-way with {@code type = "HC1", cadjust = TRUE, multi0 = FALSE}) on that weighted fit:
 * every specification of {@code school-panel-weighted-plan.json} (estimate, standard error, df, rows, K,
 * R-squared, adjusted R-squared, the model F test's p-value, the standardized coefficient), values in
 * {@code school-panel-weighted-expected.csv} and every coefficient of the weighted two-way specifications in
 * {@code school-panel-weighted-coefficients.csv}, produced by {@code src/test/r/two-way-weights-reference.R}
 * with the versions in {@code two-way-weights-versions.txt} (R 4.2.2, sandwich 3.0.2). The data are the
 * invented school panel of {@link RTwoWayEffectsReferenceTest} (two connected components, a singleton pupil,
 * controls constant within pupils and within terms, a control with missing cells) with weights that hold
 * zeros, a pupil whose weights are all zero (not among the levels present), a pupil left with one
 * positive-weight row, zeros that cut school B's terms apart (the weighted pupil-term graph has four connected
 * components where the unweighted one has two, so the weighted dummies' rank is 49 + 10 - 4 = 55 where the
 * unweighted one is 51 + 10 - 2 = 59), and missing weights. R fits each
 * specification on its positive-weight rows (README, "Plan file", weights). The plan also absorbs no column
 * and one column, and holds every unweighted specification beside its weighted one.
 *
 * <p>Tolerances as {@link RLmSandwichReferenceTest}'s and for the same reasons: estimate, standard error and
 * R-squared {@value #RELATIVE} relative; df, rows and coefficients exact. The largest errors measured are
 * written to {@code target/reference-reports/r-reference-school-panel-weighted-*.txt}.
 */
class RTwoWayWeightsReferenceTest {
    static final double RELATIVE = RLmSandwichReferenceTest.RELATIVE;
    private static final String PLAN = "school-panel-weighted-plan.json";
    private static final String EXPECTED = "school-panel-weighted-expected.csv";
    private static final String SOURCE = "R lm(weights = ) with factor() dummies, vcov, sandwich::vcovHC and "
            + "vcovCL, " + EXPECTED;
    private static final String BOTH = "pupil and term";
    private static final String WEIGHTED = "survey";

    private final Plan plan = ReferenceFiles.plan(PLAN);
    private final Table table = ReferenceFiles.table(plan);

    private RunResult run(Plan p, MultiverseRunner runner) {
        return runner.run(p, table, RunProgress.SILENT, new AtomicBoolean());
    }

    /** The engine's own choice of routes. */
    @Test
    void everySpecificationAgreesWithRByTheEnginesRoutes() {
        RunResult run = run(plan, new MultiverseRunner(2));
        assertTrue(run.refitByQr() > 0, "the controls constant within pupils or terms should send some "
                + "specifications to the QR refit");
        agree(run, "engine-routes");
    }

    /** The same by the row pass alone. */
    @Test
    void everySpecificationAgreesWithRByTheRowPass() {
        agree(run(plan, new MultiverseRunner(1, false)), "row-pass");
    }

    /**
     * The weighted two-way specifications alone (the plan cut to its "pupil and term" and "survey"
     * alternatives): classical errors from the solve, HC0 and HC1 from the fourth moments of the sets'
     * sqrt(w)-scaled demeaned rows, cluster:pupil from their per-cluster cells, and cluster:pupil+term from the
     * pupil and term cells and, for the pupil-term intersection, whose positive-weight rows are one per cell,
     * the fourth moments (a multi-way error is recorded as cluster cells when no component took the row pass;
     * see {@code fit.SandwichRoute}); the values of every route agree with R in the tests above.
     */
    @Test
    void weightedTwoWaySpecificationsTakeTheRowFreeRoutes() {
        RunResult run = run(weightedTwoWayOnly(), new MultiverseRunner(2));
        // 8 control subsets, 1 classical and 4 robust error types, every specification fitted
        assertEquals(Map.of(VarianceRoute.CLASSICAL, 8L, VarianceRoute.FOURTH_MOMENTS, 16L,
                VarianceRoute.CLUSTER_CELLS, 16L), run.routes(),
                "routes of the weighted two-way specifications");
        assertEquals(40, run.results().size());
    }

    /** Results do not depend on the number of threads. */
    @Test
    void resultsAreBitIdenticalWhateverTheThreadCount() {
        ResultTable one = run(plan, new MultiverseRunner(1)).results();
        ResultTable three = run(plan, new MultiverseRunner(3)).results();
        assertArrayEquals(bits(one), bits(three));
    }

    /**
     * The explorer's full fit of each weighted specification with both effects absorbed: every coefficient
     * (the controls lm keeps with the dummies entered first, and the key) with its standard error of the
     * specification's type, and the fit's df, K, rank of the dummies, rows, R-squared, adjusted R-squared and
 * model F statistic.
     */
    @Test
    void theFullFitsEveryCoefficientAgreesWithR() {
        SpecificationModels models = new SpecificationModels(plan, table);
        FullFitter fitter = new FullFitter();
        Map<String, Map<String, Map<String, String>>> coefficientsBySpec = coefficientsBySpec("school-panel-weighted-coefficients.csv");
        List<String> failures = new ArrayList<>();
        Map<String, Double> worst = new TreeMap<>();
        int compared = 0;
        int coefficients = 0;
        for (Map<String, String> row : ReferenceFiles.rows(EXPECTED)) {
            if (!row.get("effects").equals(BOTH) || !row.get("weights").equals(WEIGHTED)) {
                continue;
            }
            String where = "spec " + row.get("spec") + " (" + row.get("controls") + ", " + row.get("errors") + ")";
            FullFit fit = fitter.fit(plan, models, Long.parseLong(row.get("spec")) - 1);
            if (!fit.ok()) {
                failures.add(where + ": full fit status \"" + fit.status() + "\", R gives \"" + row.get("status") + "\"");
                continue;
            }
            compared++;
            check(failures, worst, where, "estimate", fit.key().estimate(), row, "R lm() coefficient", RELATIVE);
            check(failures, worst, where, "std_error", fit.key().stdError(), row, "vcov(), vcovHC or vcovCL", RELATIVE);
            check(failures, worst, where, "df", fit.df(), row, "R df.residual or min(G) - 1", 0);
            check(failures, worst, where, "n_obs", fit.nObs(), row, "R nobs()", 0);
            check(failures, worst, where, "n_params", fit.nParams(), row, "R lm() rank", 0);
            check(failures, worst, where, "effects_rank", fit.absorbedLevels(), row,
                    "rank of R's model.matrix of the factors", 0);
            check(failures, worst, where, "r2", fit.r2(), row, "R summary.lm r.squared", RELATIVE);
            check(failures, worst, where, "adj_r2", fit.adjustedR2(), row, "R summary.lm adj.r.squared", RELATIVE);
            check(failures, worst, where, "model_f", fit.modelF(), row, "R summary.lm fstatistic", RELATIVE);
            coefficients += compareCoefficients(fit, coefficientsBySpec.getOrDefault(row.get("spec"), Map.of()), where,
                    "vcov(), vcovHC or vcovCL", RELATIVE, failures, worst);
        }
        AgreementReport.write("r-reference-school-panel-weighted-full-fit.txt", SOURCE, worst);
        assertEquals(40, compared, "weighted specifications with both effects absorbed");
        assertEquals(60, coefficients, "coefficients of those specifications in the reference file");
        assertTrue(failures.isEmpty(), failures.size() + " disagreements with " + SOURCE + ":\n"
                + String.join("\n", failures.subList(0, Math.min(20, failures.size()))));
    }

    /** The plan with its absorb decision cut to both columns and its weights decision to the weighted alternative. */
    private static Plan weightedTwoWayOnly() {
        Path file = ReferenceFiles.path(PLAN);
        JsonMapper mapper = JsonMapper.builder().build();
        ObjectNode root;
        try {
            root = (ObjectNode) mapper.readTree(Files.readString(file));
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
        for (JsonNode decision : root.get("decisions")) {
            String keep = switch (decision.get("kind").asString()) {
                case "absorb" -> BOTH;
                case "weights" -> WEIGHTED;
                default -> null;
            };
            if (keep == null) {
                continue;
            }
            ArrayNode alternatives = (ArrayNode) decision.get("alternatives");
            for (int i = alternatives.size() - 1; i >= 0; i--) {
                if (!alternatives.get(i).get("label").asString().equals(keep)) {
                    alternatives.remove(i);
                }
            }
            assertEquals(1, alternatives.size(), "the plan's " + decision.get("kind").asString() + " decision holds " + keep);
        }
        return new PlanReader(false).read(mapper.writeValueAsString(root), file.getParent());
    }

    private void agree(RunResult run, String report) {
        ResultTable r = run.results();
        List<Map<String, String>> expected = ReferenceFiles.rows(EXPECTED);
        String source = SOURCE + " (" + ReferenceFiles.versions("two-way-weights-versions.txt") + ")";
        assertEquals(expected.size(), r.size(), "specification count against " + source);
        List<String> failures = new ArrayList<>();
        Map<String, Double> worst = new TreeMap<>();
        int weightedBoth = 0;
        for (ReferenceRows.Match match : ReferenceRows.match(run, plan, expected, failures)) {
            Map<String, String> row = match.row();
            int slot = match.slot();
            String where = match.where();
            if (!lmRow(failures, worst, where, r, slot, row, RELATIVE)) {
                continue;
            }
            check(failures, worst, where, "adj_r2", r.adjustedR2(slot), row, "R summary.lm adj.r.squared", RELATIVE);
            check(failures, worst, where, "model_p_value", r.modelPValue(slot), row,
                    "R pf() of summary.lm fstatistic", RLmSandwichReferenceTest.P_RELATIVE);
            check(failures, worst, where, "std_estimate", r.standardizedEstimate(slot), row,
                    "R coefficient times the ratio of the weighted standard deviations", RELATIVE);
            if (row.get("effects").equals(BOTH) && !row.get("controls").contains("attendance")) {
                // unweighted 51 pupils and 10 terms in two components; weighted 49 pupils and 10 terms in four
                int rank = row.get("weights").equals(WEIGHTED) ? 49 + 10 - 4 : 51 + 10 - 2;
                check(failures, worst, where, "effects_rank", rank, row, "rank of R's model.matrix of the factors", 0);
            }
            if (row.get("effects").equals(BOTH) && row.get("weights").equals(WEIGHTED)) {
                weightedBoth++;
            }
        }
        AgreementReport.write("r-reference-school-panel-weighted-" + report + ".txt", source, worst);
        assertEquals(40, weightedBoth, "weighted specifications with both effects absorbed");
        assertTrue(failures.isEmpty(), failures.size() + " disagreements with " + source + ":\n"
                + String.join("\n", failures.subList(0, Math.min(20, failures.size()))));
    }
}
