package org.forkscape.fit;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.TreeMap;
import java.util.concurrent.atomic.AtomicBoolean;
import org.forkscape.data.CategoricalColumn;
import org.forkscape.data.Column;
import org.forkscape.data.NumericColumn;
import org.forkscape.data.Table;
import org.forkscape.infer.RunVariants;
import org.forkscape.plan.Plan;
import org.forkscape.plan.PlanReader;
import org.forkscape.run.MultiverseRunner;
import org.forkscape.run.RunProgress;
import org.forkscape.run.RunResult;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.ValueSource;

/**
 * Poisson bootstrap draws of logit, probit and Poisson specifications by parts (what the Spark runner computes
 * on its partitions, here on slices of an invented table in memory): in each draw every specification is refit
 * by the single-machine estimator, each of its passes summed over the draw's parts (each row repeated by its
 * count, each drawn copy of a resampled school a new school, and its classes new classes), started from the
 * observed fit as one machine's draws start. Each fit is held to two fits of the same counts on one machine:
 * {@link ResampledVariant} (the null draws' own refit, rows repeated by their counts) and the engine's observed
 * run on the table with each row written out as often as it was drawn and each drawn copy of a school (and of
 * its classes) given a name of its own, so that every sum of the passes (deviance, information, score,
 * saturated log-likelihood, meat, cluster scores, N and G) is checked against the repeated table's. Against
 * {@link ResampledVariant}, which starts from the same observed fit and takes the same steps, within
 * {@value #RELATIVE} relative (common practice for two exact routes in double precision: the parts sum the
 * same terms in another order). Against the repeated table's own run, which starts from its own start tree
 * (the fit without the last control) and so stops at another point of the engine's convergence rule (relative
 * change of the deviance below 1e-10, {@link Irls#TOLERANCE}), within {@value #CONVERGED} (about that rule's
 * reach on the coefficients: common practice) relative to the larger of the estimate and its standard error,
 * the standard error within {@value #CONVERGED} relative, n_obs exactly. The largest differences go to
 * {@code target/parts-reports/glm-draws-*.txt}.
 */
class GlmDrawsByPartsTest {
    static final double RELATIVE = 1e-10;
    static final double CONVERGED = 1e-8;
    static final int DRAWS = 5;

    /** Logit and probit of a 0/1 outcome, the district absorbed or not, classical, HC1 and school clusters. */
    static final String BINARY_PLAN = """
            {"data": "schools.csv",
             "decisions": [
               {"name": "outcome", "kind": "outcome", "alternatives": [{"label": "passed", "column": "passed"}]},
               {"name": "key", "kind": "predictor", "alternatives": [{"label": "x", "column": "x"}]},
               {"name": "controls", "kind": "controls", "optional": ["a", "b"]},
               {"name": "model", "kind": "model", "alternatives": ["logit", "probit"]},
               {"name": "effects", "kind": "absorb", "alternatives": [
                  {"label": "none", "columns": []}, {"label": "district", "columns": ["district"]}]},
               {"name": "errors", "kind": "errors", "alternatives": ["classical", "HC1", "cluster:school"]}
             ]}
            """;

    /** Poisson of a count, the district absorbed or not, HC3, school and class clusters. */
    static final String COUNT_PLAN = """
            {"data": "schools.csv",
             "decisions": [
               {"name": "outcome", "kind": "outcome", "alternatives": [{"label": "visits", "column": "visits"}]},
               {"name": "key", "kind": "predictor", "alternatives": [{"label": "x", "column": "x"}]},
               {"name": "controls", "kind": "controls", "optional": ["a", "b"]},
               {"name": "model", "kind": "model", "alternatives": ["poisson"]},
               {"name": "effects", "kind": "absorb", "alternatives": [
                  {"label": "none", "columns": []}, {"label": "district", "columns": ["district"]}]},
               {"name": "errors", "kind": "errors", "alternatives": ["HC3", "cluster:school", "cluster:class"]}
             ]}
            """;

    /** The weights decision of the weighted cases: invented survey weights with zeros and missing cells. */
    static final String WEIGHTS = "{\"name\": \"weights\", \"kind\": \"weights\", \"alternatives\": [{\"label\": "
            + "\"survey\", \"column\": \"w\"}]},\n               {\"name\": \"errors\"";

    @ParameterizedTest(name = "{0} slices")
    @ValueSource(ints = {1, 3, 8})
    void logitAndProbitRowDraws(int slices) {
        compare(BINARY_PLAN, new BootstrapDesign(61, null), slices, "binary-rows");
    }

    @ParameterizedTest(name = "{0} slices")
    @ValueSource(ints = {1, 3, 8})
    void logitAndProbitSchoolDrawsMakeNewSchools(int slices) {
        compare(BINARY_PLAN, new BootstrapDesign(62, "school"), slices, "binary-schools");
    }

    @ParameterizedTest(name = "{0} slices")
    @ValueSource(ints = {1, 3, 8})
    void poissonRowDraws(int slices) {
        compare(COUNT_PLAN, new BootstrapDesign(63, null), slices, "count-rows");
    }

    @ParameterizedTest(name = "{0} slices")
    @ValueSource(ints = {1, 3, 8})
    void poissonSchoolDrawsMakeNewSchoolsAndClasses(int slices) {
        compare(COUNT_PLAN, new BootstrapDesign(64, "school"), slices, "count-schools");
    }

    /** A drawn copy of a row keeps its prior weight: the draw's weights are the counts times the weights. */
    @ParameterizedTest(name = "{0} slices")
    @ValueSource(ints = {1, 3, 8})
    void weightedLogitAndProbitSchoolDraws(int slices) {
        compare(weighted(BINARY_PLAN), new BootstrapDesign(65, "school"), slices, "weighted-binary-schools");
    }

    @ParameterizedTest(name = "{0} slices")
    @ValueSource(ints = {1, 3, 8})
    void weightedPoissonRowDraws(int slices) {
        compare(weighted(COUNT_PLAN), new BootstrapDesign(66, null), slices, "weighted-count-rows");
    }

    /**
     * The same draws from 1, 3 and 8 slices: rows exactly, estimates and standard errors within
     * {@value #RELATIVE} (the slices group the sums differently); and, for one slicing, the same bits whether
     * the fits of a draw go side by side in one batch or one at a time.
     */
    @Test
    void drawsDoNotDependOnTheSlicesOrTheBatch() {
        BootstrapDesign design = new BootstrapDesign(67, "school");
        TreeMap<String, KeyFit> one = byParts(COUNT_PLAN, design, 1, GlmFitsByParts.MAX_PER_BATCH);
        for (int slices : new int[] {3, 8}) {
            TreeMap<String, KeyFit> other = byParts(COUNT_PLAN, design, slices, GlmFitsByParts.MAX_PER_BATCH);
            assertEquals(one.keySet(), other.keySet());
            for (String where : one.keySet()) {
                KeyFit a = one.get(where);
                KeyFit b = other.get(where);
                assertEquals(a.status(), b.status(), where);
                assertEquals(a.nObs(), b.nObs(), where + " n_obs at " + slices + " slices");
                if (a.ok()) {
                    close(a.estimate(), b.estimate(), where + " estimate at " + slices + " slices");
                    close(a.stdError(), b.stdError(), where + " std_error at " + slices + " slices");
                }
            }
        }
        TreeMap<String, KeyFit> together = byParts(COUNT_PLAN, design, 3, GlmFitsByParts.MAX_PER_BATCH);
        TreeMap<String, KeyFit> alone = byParts(COUNT_PLAN, design, 3, 1);
        for (String where : together.keySet()) {
            KeyFit a = together.get(where);
            KeyFit b = alone.get(where);
            assertEquals(Double.doubleToRawLongBits(a.estimate()), Double.doubleToRawLongBits(b.estimate()), where);
            assertEquals(Double.doubleToRawLongBits(a.stdError()), Double.doubleToRawLongBits(b.stdError()), where);
        }
    }

    /** Every fit of every draw by parts, keyed by variant, draw and specification, in batches of {@code batch}. */
    /**
     * A draw fit whose information needs the QR of its weighted design (two controls nearly equal, the design
     * of {@link GlmNearCollinearExactTest}) makes the QR passes over the draw's parts (asserted) and equals
     * one machine's refit of the same counts ({@link ResampledVariant}) within {@value #RELATIVE}, from 3 slices.
     */
    @Test
    void aDrawFitThatNeedsTheQrOfItsDesignFactorsTheDrawsParts() {
        String json = """
                {"data": "near.csv", "decisions": [
                  {"name": "o", "kind": "outcome", "alternatives": [{"label": "y", "column": "y"}]},
                  {"name": "k", "kind": "predictor", "alternatives": [{"label": "x", "column": "key"}]},
                  {"name": "c", "kind": "controls", "required": ["first", "second"]},
                  {"name": "e", "kind": "errors", "alternatives": ["classical", "HC1", "cluster:school"]},
                  {"name": "m", "kind": "model", "alternatives": ["logit"]}]}
                """;
        Table table = GlmNearCollinearExactTest.rows(1e-3, false);
        Plan plan = new PlanReader(false).read(json, Path.of("."));
        long[] keys = PartsOfTable.rowKeys("near.parquet", table.rowCount());
        BootstrapDesign design = new BootstrapDesign(67, null);
        RunResult byParts = new MultiverseRunner(1).withVariants(PartsOfTable.source(plan, table, keys, 3))
                .run(plan, table, RunProgress.SILENT, new AtomicBoolean());
        RunResult inMemory = new MultiverseRunner(1).run(plan, table, RunProgress.SILENT, new AtomicBoolean());
        RunVariants indexed = RunVariants.of(byParts);
        int[] specs = indexed.specificationsOf(0);
        List<SpecificationModel> models = new ArrayList<>();
        for (int i : specs) {
            models.add(indexed.model(i));
        }
        VariantKey key = byParts.models().variantKey(0);
        DataVariant[] inDraw = byParts.models().bootstrap(design).draws(key, indexed.variant(0), 0, DRAWS);
        SpecificationFitter fitter = new SpecificationFitter().deferringRowPasses().deferringRefits();
        for (int d = 0; d < DRAWS; d++) {
            DrawFit[] expected = PartsOfTable.oneMachine(inMemory.models().variant(key), 1, models, table, keys,
                    design, d);
            KeyFit[] fits = RowPassesByParts.fitEach(fitter, inDraw[d], models, () -> { });
            assertTrue(inDraw[d].glmOrthogonalPasses() > 0, "draw " + d + ": QR passes over the draw's parts");
            for (int s = 0; s < specs.length; s++) {
                String where = "draw " + d + ", specification " + (s + 1);
                assertTrue(fits[s] != null && fits[s].ok(), where + ": fitted by parts");
                close(expected[s].estimate(), fits[s].estimate(), RELATIVE, "estimate", where, new TreeMap<>());
                close(expected[s].stdError(), fits[s].stdError(), RELATIVE, "std_error", where, new TreeMap<>());
            }
        }
    }

    private static TreeMap<String, KeyFit> byParts(String planJson, BootstrapDesign design, int slices, int batch) {
        Table table = PartsOfTable.glmSchools(71, 30);
        Plan plan = new PlanReader(false).read(planJson, Path.of("."));
        long[] keys = PartsOfTable.rowKeys("schools.parquet", table.rowCount());
        RunResult run = new MultiverseRunner(1).withVariants(PartsOfTable.source(plan, table, keys, slices))
                .run(plan, table, RunProgress.SILENT, new AtomicBoolean());
        RunVariants indexed = RunVariants.of(run);
        BootstrapByParts draws = run.models().bootstrap(design);
        TreeMap<String, KeyFit> out = new TreeMap<>();
        for (int v = 0; v < indexed.variantCount(); v++) {
            int[] specs = indexed.specificationsOf(v);
            if (specs.length == 0) {
                continue;
            }
            List<SpecificationModel> models = new ArrayList<>();
            for (int i : specs) {
                models.add(indexed.model(i));
            }
            DataVariant[] inDraw = draws.draws(run.models().variantKey(v), indexed.variant(v), 0, DRAWS);
            for (int d = 0; d < DRAWS; d++) {
                KeyFit[] fits = GlmFitsByParts.fit(inDraw[d], models, batch, () -> { }).fits();
                for (int s = 0; s < specs.length; s++) {
                    assertNotNull(fits[s], "a pass refused by parts");
                    out.put(String.format("variant %d, draw %d, specification %s", v, d,
                            run.results().specNumber(indexed.slot(specs[s]))), fits[s]);
                }
            }
        }
        return out;
    }

    private static void compare(String planJson, BootstrapDesign design, int slices, String name) {
        java.util.Map<String, Double> worst = new java.util.TreeMap<>();
        Table table = PartsOfTable.glmSchools(71, 30);
        Plan plan = new PlanReader(false).read(planJson, Path.of("."));
        long[] keys = PartsOfTable.rowKeys("schools.parquet", table.rowCount());
        RunResult byParts = new MultiverseRunner(1).withVariants(PartsOfTable.source(plan, table, keys, slices))
                .run(plan, table, RunProgress.SILENT, new AtomicBoolean());
        RunResult inMemory = new MultiverseRunner(1).run(plan, table, RunProgress.SILENT, new AtomicBoolean());
        RunVariants indexed = RunVariants.of(byParts);
        BootstrapByParts draws = byParts.models().bootstrap(design);
        int predictors = plan.predictor().alternatives().size();
        // as the null draws fit them (infer.DrawsByParts)
        SpecificationFitter fitter = new SpecificationFitter().deferringRowPasses().deferringRefits();
        RunResult[] repeated = new RunResult[DRAWS];
        for (int d = 0; d < DRAWS; d++) {
            repeated[d] = new MultiverseRunner(1).run(plan, repeatedTable(table, keys, design, d), RunProgress.SILENT,
                    new AtomicBoolean());
        }
        int compared = 0;
        for (int v = 0; v < indexed.variantCount(); v++) {
            int[] specs = indexed.specificationsOf(v);
            if (specs.length == 0) {
                continue;
            }
            VariantKey key = byParts.models().variantKey(v);
            List<SpecificationModel> models = new ArrayList<>();
            for (int i : specs) {
                models.add(indexed.model(i));
            }
            DataVariant[] inDraw = draws.draws(key, indexed.variant(v), 0, DRAWS);
            for (int d = 0; d < DRAWS; d++) {
                DrawFit[] expected = PartsOfTable.oneMachine(inMemory.models().variant(key), predictors, models, table,
                        keys, design, d);
                KeyFit[] fits = RowPassesByParts.fitEach(fitter, inDraw[d], models, () -> { });
                assertEquals(specs.length, inDraw[d].glmFitsServed.get(), "every fit of the draw from its parts");
                assertTrue(inDraw[d].glmRounds.get() > 0 && inDraw[d].glmRounds.get() < inDraw[d].glmPasses.get(),
                        inDraw[d].glmPasses.get() + " passes in " + inDraw[d].glmRounds.get() + " rounds");
                for (int s = 0; s < specs.length; s++) {
                    int slot = indexed.slot(specs[s]);
                    String where = "variant " + v + ", draw " + d + ", specification "
                            + byParts.results().specNumber(slot);
                    KeyFit fit = fits[s];
                    assertNotNull(fit, where + ": a pass refused by parts");
                    boolean inRepeated = repeated[d].results().fitted(slot) && repeated[d].results().stdError(slot) > 0;
                    if (expected[s] == null || !(expected[s].stdError() > 0)) {
                        assertTrue(!fit.ok() || !(fit.stdError() > 0), where + ": fitted by parts, not on one machine");
                        assertTrue(!inRepeated, where + ": fitted on the repeated table, not by ResampledVariant");
                        continue;
                    }
                    assertTrue(fit.ok(), where + ": not fitted by parts: " + fit.status() + " " + fit.statusText());
                    assertTrue(inRepeated, where + ": not fitted on the repeated table");
                    close(expected[s].estimate(), fit.estimate(), RELATIVE, "estimate against ResampledVariant",
                            where, worst);
                    close(expected[s].stdError(), fit.stdError(), RELATIVE, "std_error against ResampledVariant",
                            where, worst);
                    assertEquals(expected[s].df(), fit.df(), 0.0, where + " df");
                    // an estimate near 0 is held on its standard error's scale, the one the convergence rule reaches
                    double scale = Math.max(Math.abs(repeated[d].results().estimate(slot)),
                            repeated[d].results().stdError(slot));
                    double onScale = Math.abs(fit.estimate() - repeated[d].results().estimate(slot)) / scale;
                    assertTrue(onScale <= CONVERGED, where + " estimate " + fit.estimate() + " by parts against "
                            + repeated[d].results().estimate(slot) + " on the repeated table, " + onScale
                            + " of the larger of it and its std_error");
                    worst.merge("estimate against the repeated table (on the larger of it and its std_error)",
                            onScale, Math::max);
                    close(repeated[d].results().stdError(slot), fit.stdError(), CONVERGED,
                            "std_error against the repeated table", where, worst);
                    assertEquals(repeated[d].results().nObs(slot), fit.nObs(), where + " n_obs, repeated table");
                    compared++;
                }
            }
        }
        assertTrue(compared > DRAWS * indexed.size() * 3 / 4, compared + " fits compared");
        StringBuilder text = new StringBuilder(name + " at " + slices + " slices: " + compared + " draw fits of "
                + indexed.size() + " specifications in " + DRAWS + " draws\n");
        worst.forEach((what, value) -> text.append(what).append(' ').append(value).append('\n'));
        try {
            Path dir = Path.of("target", "parts-reports");
            java.nio.file.Files.createDirectories(dir);
            java.nio.file.Files.writeString(dir.resolve("glm-draws-" + name + "-" + slices + ".txt"), text);
        } catch (java.io.IOException e) {
            throw new java.io.UncheckedIOException(e);
        }
    }

    /**
     * The table of draw {@code draw}: each row written out as often as its unit was drawn, in row order, and
     * with whole schools each copy of a school (and of each of its classes) named as a school of its own, as
     * README's "Null draws" describes the resampled data set.
     */
    private static Table repeatedTable(Table table, long[] keys, BootstrapDesign design, int draw) {
        int[] counts = design.counts(design.unitKeys(table, keys), draw);
        int total = 0;
        for (int c : counts) {
            total += c;
        }
        int[] rowOf = new int[total];
        int[] copy = new int[total];
        int k = 0;
        for (int r = 0; r < counts.length; r++) {
            for (int c = 0; c < counts[r]; c++) {
                rowOf[k] = r;
                copy[k++] = c;
            }
        }
        boolean renew = design.resampledColumn() != null;
        List<Column> out = new ArrayList<>();
        for (Column c : table.columns()) {
            if (c instanceof CategoricalColumn cat) {
                String[] names = new String[total];
                for (int i = 0; i < total; i++) {
                    String level = cat.levels().get(cat.codes()[rowOf[i]]);
                    names[i] = renew ? level + "#" + copy[i] : level;
                }
                out.add(categorical(c.name(), names));
            } else {
                double[] from = ((NumericColumn) c).values();
                double[] to = new double[total];
                for (int i = 0; i < total; i++) {
                    to[i] = from[rowOf[i]];
                }
                out.add(new NumericColumn(c.name(), to));
            }
        }
        return new Table("schools.csv", out);
    }

    /** A text column of the present values, its levels sorted as the CSV reader sorts them. */
    private static CategoricalColumn categorical(String name, String[] values) {
        List<String> levels = new ArrayList<>(new java.util.TreeSet<>(List.of(values)));
        java.util.Map<String, Integer> code = new java.util.HashMap<>();
        for (String level : levels) {
            code.put(level, code.size());
        }
        int[] codes = new int[values.length];
        for (int i = 0; i < values.length; i++) {
            codes[i] = code.get(values[i]);
        }
        return new CategoricalColumn(name, codes, levels);
    }

    private static String weighted(String plan) {
        String out = plan.replace("{\"name\": \"errors\"", WEIGHTS);
        assertTrue(out.contains("\"survey\""), "the plan edit took");
        return out;
    }

    private static void close(double expected, double actual, String what) {
        double relative = Math.abs(actual - expected) / Math.abs(expected);
        assertTrue(expected == actual || relative <= RELATIVE, what + ": " + actual + " by parts against " + expected
                + ", relative " + relative);
    }

    /** Within {@code tolerance} relative, the largest difference of each kind kept in {@code worst}. */
    private static void close(double expected, double actual, double tolerance, String what, String where,
            java.util.Map<String, Double> worst) {
        double relative = expected == actual ? 0 : Math.abs(actual - expected) / Math.abs(expected);
        assertTrue(relative <= tolerance, where + " " + what + ": " + actual + " by parts against " + expected
                + ", relative " + relative);
        worst.merge(what, relative, Math::max);
    }
}
