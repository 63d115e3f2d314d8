package org.forkscape.fit;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Files;
import java.nio.file.Path;
import java.util.Map;
import java.util.TreeMap;
import java.util.concurrent.atomic.AtomicBoolean;
import org.forkscape.data.CsvTableReader;
import org.forkscape.data.Table;
import org.forkscape.plan.Plan;
import org.forkscape.plan.PlanReader;
import org.forkscape.reference.ExactGeneralizedLinear;
import org.forkscape.reference.ReferenceFiles;
import org.forkscape.run.MultiverseRunner;
import org.forkscape.run.ResultTable;
import org.forkscape.run.RunProgress;
import org.forkscape.run.RunResult;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.ValueSource;

/**
 * Generalized linear fits of variants held in parts, without Spark ({@link GlmFitsByParts}): plans with
 * logit, probit and Poisson models run with their variants built by {@link VariantByParts} from 1, 3 and 8
 * slices of the table, against the engine fitting them from the whole table: every specification's status,
 * rows and coefficients exactly, its estimate, standard error, p-value, average marginal effect and its
 * error, deviance, pseudo-R-squared and model p-value within 1e-10 relative. The plans: the demo's Poisson
 * plan (Poisson beside least squares, HC1 and school clusters, the absorbed zone, a winsorize, a sample
 * rule), and three of the GLM reference plans of {@code src/test/r/glm-reference.R} (birthwt-smoking: logit
 * and probit, classical, HC0 to HC3 and age clusters, with and without the absorbed race, a 0/1 key;
 * quine: Poisson with HC2 and HC3 beside the absorbed age group; school: separation among the statuses), the
 * weighted water-survey Poisson and logit plans, and the tutoring logit, probit and Poisson plans of
 * {@code src/test/r/multiway-glm-reference.R} (two- and three-way cluster errors).
 * The route is asserted: every fitted generalized linear specification came from the passes over the parts,
 * in fewer rounds than passes. The largest differences go to {@code target/parts-reports/}.
 */
class GlmFitsByPartsTest {
    static final double RELATIVE = 1e-10;

    @ParameterizedTest(name = "{0} parts")
    @ValueSource(ints = {1, 3, 8})
    void demoPoissonPlan(int slices) {
        compare(Path.of("sample-data/civic-demo-models.plan.json"), "demo-models", slices);
    }

    @ParameterizedTest(name = "{0} parts")
    @ValueSource(ints = {1, 3, 8})
    void birthWeightLogitAndProbit(int slices) {
        compare(ReferenceFiles.path("glm/birthwt-smoking-plan.json"), "birthwt-smoking", slices);
    }

    @ParameterizedTest(name = "{0} parts")
    @ValueSource(ints = {1, 3, 8})
    void quinePoissonWithLeverages(int slices) {
        compare(ReferenceFiles.path("glm/quine-plan.json"), "quine", slices);
    }

    /** Prior weights with zeros and missing among them (water-poisson-plan.json, checked against R's glm on one machine). */
    @ParameterizedTest(name = "{0} parts")
    @ValueSource(ints = {1, 3, 8})
    void weightedPoissonAndLogit(int slices) {
        compare(ReferenceFiles.path("water-poisson-plan.json"), "water-poisson", slices);
        compare(ReferenceFiles.path("water-logit-plan.json"), "water-logit", slices);
    }

    /**
     * Multi-way cluster errors (school+term and school+term+tutor; tutoring-logit-plan.json,
     * tutoring-probit-plan.json and tutoring-poisson-plan.json, checked against R's glm with
     * {@code sandwich::vcovCL(type = "HC1", cadjust = TRUE, multi0 = FALSE)} on one machine by
     * RMultiwayGlmReferenceTest, from {@code src/test/r/multiway-glm-reference.R}): each component's cluster
     * sums from the parts, the intersections' clusters numbered by their keys over the whole table. The route
     * is asserted: the multi-way specifications were fitted from the parts with a standard error.
     */
    @ParameterizedTest(name = "{0} parts")
    @ValueSource(ints = {1, 3, 8})
    void multiwayClusters(int slices) {
        for (String model : new String[] {"logit", "probit", "poisson"}) {
            Path planFile = ReferenceFiles.path("tutoring-" + model + "-plan.json");
            RunResult parts = compare(planFile, "tutoring-" + model, slices);
            assertTrue(multiwayWithError(parts) > 0, model + ": multi-way specifications fitted from the parts");
        }
    }

    /** The fitted specifications of a run whose error type is multi-way and whose standard error is a number. */
    static long multiwayWithError(RunResult run) {
        org.forkscape.plan.SpecificationSpace space = run.models().space();
        int errors = -1;
        for (int d = 0; d < space.decisionCount(); d++) {
            if (space.decisions().get(d) instanceof org.forkscape.plan.Decision.Errors) {
                errors = d;
            }
        }
        org.forkscape.plan.Decision.Errors decision = (org.forkscape.plan.Decision.Errors) space.decisions().get(errors);
        long[] choices = new long[space.decisionCount()];
        long count = 0;
        for (int slot = 0; slot < run.results().size(); slot++) {
            space.decode(run.results().specIndex(slot), choices);
            if (decision.alternatives().get((int) choices[errors]).multiway() && run.results().fitted(slot)
                    && Double.isFinite(run.results().stdError(slot))) {
                count++;
            }
        }
        return count;
    }

    @ParameterizedTest(name = "{0} parts")
    @ValueSource(ints = {1, 3, 8})
    void schoolWithSeparation(int slices) {
        RunResult parts = compare(ReferenceFiles.path("glm/school-plan.json"), "school", slices);
        long separated = 0;
        for (int slot = 0; slot < parts.results().size(); slot++) {
            if (parts.results().status(slot).startsWith("separation")) {
                separated++;
            }
        }
        assertTrue(separated > 0, "the school plan has separated specifications (glm/school-expected.csv)");
    }

    /**
     * The batch changes no bit: every variant of birthwt-smoking fitted from 3 slices with one fit at a
     * time, with 7 side by side and with up to {@link GlmFitsByParts#MAX_PER_BATCH}, each time on freshly built
     * variants (no start kept from before); one at a time takes the most rounds.
     */
    @org.junit.jupiter.api.Test
    void theBatchSizeChangesNoBit() {
        Plan plan = new PlanReader(false).read(ReferenceFiles.path("glm/birthwt-smoking-plan.json"));
        Table table = new CsvTableReader().read(plan.dataFile());
        SpecificationModels models = new SpecificationModels(plan, table);
        org.forkscape.plan.SpecificationSpace space = models.space();
        java.util.Map<Integer, java.util.List<SpecificationModel>> byVariant = new TreeMap<>();
        long[] choices = new long[space.decisionCount()];
        for (long index = 0; index < space.count().longValueExact(); index++) {
            space.decode(index, choices);
            byVariant.computeIfAbsent(models.variantOrdinal(choices), v -> new java.util.ArrayList<>())
                    .add(models.model(choices));
        }
        long[] rounds = new long[3];
        int[] batches = {1, 7, GlmFitsByParts.MAX_PER_BATCH};
        for (Map.Entry<Integer, java.util.List<SpecificationModel>> e : byVariant.entrySet()) {
            KeyFit[][] fits = new KeyFit[3][];
            for (int b = 0; b < 3; b++) {
                DataVariant variant = VariantByPartsTest.source(plan, table, 3).variant(models.variantKey(e.getKey()),
                        null);
                fits[b] = GlmFitsByParts.fit(variant, e.getValue(), batches[b], () -> { }).fits();
                rounds[b] += variant.glmRounds();
            }
            for (int i = 0; i < fits[0].length; i++) {
                for (int b = 1; b < 3; b++) {
                    assertEquals(fits[0][i].statusText(), fits[b][i].statusText());
                    assertEquals(fits[0][i].estimate(), fits[b][i].estimate(), 0.0, "estimate, batches of " + batches[b]);
                    assertEquals(fits[0][i].stdError(), fits[b][i].stdError(), 0.0, "std_error, batches of " + batches[b]);
                    assertEquals(fits[0][i].effect(), fits[b][i].effect(), 0.0, "effect, batches of " + batches[b]);
                }
            }
        }
        assertTrue(rounds[0] > rounds[1] && rounds[1] > rounds[2], java.util.Arrays.toString(rounds) + " rounds");
    }

    /**
     * Where one machine factors a fit's weighted design by QR (two controls nearly equal, the design of
     * {@link GlmNearCollinearExactTest}, whose exact fit it matches), the fit from parts factors it from the
     * parts' triangular factors of their rows, stacked (asserted: the QR passes were made): logit and Poisson,
     * classical, HC1, HC3 and cluster errors, from 1, 3 and 8 slices, against the whole table within the
     * tolerance, and at a gap of 1e-5 against the exact 60-digit fit ({@link ExactGeneralizedLinear}, 1e-7, the
     * stopping tolerance); with the controls far apart no QR pass is made.
     */
    @ParameterizedTest(name = "{0} parts")
    @ValueSource(ints = {1, 3, 8})
    void aFitThatNeedsTheQrOfItsDesignFactorsTheStackedFactorsOfTheParts(int slices) {
        for (String model : new String[] {"logit", "poisson"}) {
            String json = """
                    {"data": "near.csv", "decisions": [
                      {"name": "o", "kind": "outcome", "alternatives": [{"label": "y", "column": "y"}]},
                      {"name": "k", "kind": "predictor", "alternatives": [{"label": "x", "column": "key"}]},
                      {"name": "c", "kind": "controls", "required": ["first", "second"]},
                      {"name": "e", "kind": "errors", "alternatives": ["classical", "HC1", "HC3", "cluster:school"]},
                      {"name": "m", "kind": "model", "alternatives": ["%s"]}]}
                    """.formatted(model);
            Plan plan = new PlanReader(false).read(json, Path.of("."));
            boolean poisson = model.equals("poisson");
            for (double gap : new double[] {1e-5, 1e-1}) {
                Table table = GlmNearCollinearExactTest.rows(gap, poisson);
                ResultTable whole = new MultiverseRunner(1).run(plan, table, RunProgress.SILENT, new AtomicBoolean())
                        .results();
                RunResult run = runOnParts(plan, table, slices);
                ResultTable parts = run.results();
                long orthogonalPasses = 0;
                for (int v = 0; v < run.models().variantCount(); v++) {
                    orthogonalPasses += run.models().variant(run.models().variantKey(v)).glmOrthogonalPasses();
                }
                String where = model + ", gap " + gap + ", " + slices + " parts";
                assertEquals(gap < 1e-3, orthogonalPasses > 0, where + ": QR passes made (" + orthogonalPasses + ")");
                for (int s = 0; s < whole.size(); s++) {
                    assertEquals(whole.status(s), parts.status(s), where + " status");
                    close(whole.estimate(s), parts.estimate(s), where, "estimate", new TreeMap<>());
                    close(whole.stdError(s), parts.stdError(s), where, "std_error", new TreeMap<>());
                }
                if (gap < 1e-3) {
                    ExactGeneralizedLinear.KeyResult exact = ExactGeneralizedLinear.fit(poisson, new double[][] {
                        values(table, "first"), values(table, "second"), values(table, "key")}, values(table, "y"));
                    assertEquals(exact.estimate(), parts.estimate(0), 1e-7 * Math.abs(exact.estimate()), where);
                    assertEquals(exact.classical(), parts.stdError(0), 1e-7 * exact.classical(), where + " classical");
                    assertEquals(exact.hc1(), parts.stdError(1), 1e-7 * exact.hc1(), where + " HC1");
                }
            }
        }
    }

    private static double[] values(Table table, String column) {
        return ((org.forkscape.data.NumericColumn) table.column(column)).values();
    }

    /**
     * A cancel that arrives during a round stops every fit of the batch before the next round (none left
     * waiting), and a round that fails stops the run with its exception.
     */
    @org.junit.jupiter.api.Test
    void aCancelOrAFailedRoundStopsEveryFitOfTheBatch() {
        Plan plan = new PlanReader(false).read(ReferenceFiles.path("glm/birthwt-smoking-plan.json"));
        Table table = new CsvTableReader().read(plan.dataFile());
        VariantSource built = VariantByPartsTest.source(plan, table, 3);
        AtomicBoolean cancel = new AtomicBoolean();
        java.util.concurrent.atomic.AtomicLong rounds = new java.util.concurrent.atomic.AtomicLong();
        VariantSource cancelling = (key, pool) -> {
            DataVariant v = built.variant(key, pool);
            DataVariant.GlmPassReduction parts = v.glmPassReduction;
            // the cancel arrives while the first round is made
            v.glmPassReduction = batch -> {
                rounds.incrementAndGet();
                cancel.set(true);
                return parts.sums(batch);
            };
            return v;
        };
        org.junit.jupiter.api.Assertions.assertThrows(org.forkscape.run.RunCancelledException.class,
                () -> new MultiverseRunner(2).withVariants(cancelling).run(plan, table, RunProgress.SILENT, cancel));
        assertEquals(1, rounds.get(), "rounds made after the cancel");
        VariantSource failing = (key, pool) -> {
            DataVariant v = built.variant(key, pool);
            v.glmPassReduction = batch -> {
                throw new IllegalStateException("a part was lost");
            };
            return v;
        };
        IllegalStateException e = org.junit.jupiter.api.Assertions.assertThrows(IllegalStateException.class,
                () -> new MultiverseRunner(2).withVariants(failing).run(plan, table, RunProgress.SILENT,
                        new AtomicBoolean()));
        assertEquals("a part was lost", e.getMessage());
    }

    /** Every specification on parts against the whole table; returns the run on parts. */
    static RunResult compare(Path planFile, String name, int slices) {
        Plan plan = new PlanReader(false).read(planFile);
        Table table = new CsvTableReader().read(plan.dataFile());
        RunResult whole = new MultiverseRunner(2).run(plan, table, RunProgress.SILENT, new AtomicBoolean());
        RunResult parts = runOnParts(plan, table, slices);
        ResultTable a = whole.results();
        ResultTable b = parts.results();
        Map<String, Double> worst = new TreeMap<>();
        long generalizedFitted = 0;
        for (int slot = 0; slot < a.size(); slot++) {
            String where = name + ", specification " + a.specNumber(slot);
            assertEquals(a.status(slot), b.status(slot), where);
            assertEquals(a.nObs(slot), b.nObs(slot), where);
            assertEquals(a.nParams(slot), b.nParams(slot), where);
            if (!a.fitted(slot)) {
                continue;
            }
            close(a.estimate(slot), b.estimate(slot), where, "estimate", worst);
            close(a.stdError(slot), b.stdError(slot), where, "std_error", worst);
            close(a.pValue(slot), b.pValue(slot), where, "p_value", worst);
            if (!a.family(slot).leastSquares()) {
                generalizedFitted++;
                close(a.effect(slot), b.effect(slot), where, "effect", worst);
                close(a.effectStdError(slot), b.effectStdError(slot), where, "effect_std_error", worst);
                close(a.deviance(slot), b.deviance(slot), where, "deviance", worst);
                close(a.r2(slot), b.r2(slot), where, "r2", worst);
                close(a.modelPValue(slot), b.modelPValue(slot), where, "model_p_value", worst);
            }
        }
        long served = 0;
        long rounds = 0;
        long passes = 0;
        for (int v = 0; v < parts.models().variantCount(); v++) {
            DataVariant variant = parts.models().variant(parts.models().variantKey(v));
            assertFalse(variant.holdsRows());
            served += variant.glmFitsServed();
            rounds += variant.glmRounds();
            passes += variant.glmPasses();
        }
        assertTrue(generalizedFitted > 0 && served >= generalizedFitted, served + " specifications fitted from the "
                + "passes over the parts, of which at least the " + generalizedFitted + " fitted generalized linear ones");
        assertTrue(rounds > 0 && rounds < passes, rounds + " rounds for " + passes + " passes");
        report(name + "-" + slices, worst, served, rounds, passes);
        return parts;
    }

    static RunResult runOnParts(Plan plan, Table table, int slices) {
        VariantSource built = VariantByPartsTest.source(plan, table, slices);
        // kept once built, as the Spark runner keeps them, so that the counts of the passes can be read after
        Map<VariantKey, DataVariant> kept = new java.util.concurrent.ConcurrentHashMap<>();
        VariantSource source = (key, pool) -> kept.computeIfAbsent(key, k -> built.variant(k, pool));
        return new MultiverseRunner(2).withVariants(source).run(plan, table, RunProgress.SILENT, new AtomicBoolean());
    }

    private static void close(double expected, double actual, String where, String what, Map<String, Double> worst) {
        if (expected == actual || Double.isNaN(expected) && Double.isNaN(actual)) {
            worst.merge(what, 0.0, Math::max);
            return;
        }
        double relative = Math.abs(actual - expected) / Math.abs(expected);
        worst.merge(what, relative, Math::max);
        assertTrue(relative <= RELATIVE, where + " " + what + ": " + actual + " against " + expected + ", relative "
                + relative);
    }

    private static void report(String name, Map<String, Double> worst, long served, long rounds, long passes) {
        StringBuilder text = new StringBuilder("generalized linear fits from parts against the whole table, " + name
                + "\nspecifications served " + served + ", rounds " + rounds + ", passes " + passes + "\n");
        worst.forEach((what, value) -> text.append(what).append(' ').append(value).append('\n'));
        try {
            Path dir = Path.of("target", "parts-reports");
            Files.createDirectories(dir);
            Files.writeString(dir.resolve("glm-by-parts-" + name + ".txt"), text);
        } catch (java.io.IOException e) {
            throw new java.io.UncheckedIOException(e);
        }
    }
}
