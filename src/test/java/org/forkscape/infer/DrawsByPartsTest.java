package org.forkscape.infer;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Path;
import java.util.concurrent.atomic.AtomicBoolean;
import org.forkscape.data.Table;
import org.forkscape.fit.BootstrapByParts;
import org.forkscape.fit.BootstrapDesign;
import org.forkscape.fit.DataVariant;
import org.forkscape.fit.KeyFit;
import org.forkscape.fit.PartsOfTable;
import org.forkscape.fit.SpecificationFitter;
import org.forkscape.plan.Plan;
import org.forkscape.plan.PlanReader;
import org.forkscape.run.MultiverseRunner;
import org.forkscape.run.RunProgress;
import org.forkscape.run.RunResult;
import org.junit.jupiter.api.Test;

/**
 * The null draws of variants held in parts, as the Spark runner makes them (here on slices of an invented table
 * in memory): the same numbers on 1, 2 and 3 threads, bit for bit (each draw fitted by one thread, the
 * statistics taken in a fixed order), a draw the same in any batch and in a run of fewer draws, and the warning about split clusters
 * worded as one machine words it for the same settings (exact text); degenerate draws (no rows, or a sandwich
 * the draw's sums cannot give) left out and counted, not fatal.
 */
class DrawsByPartsTest {
    private static final Table TABLE = PartsOfTable.schools(11, 20, 10, 0.3, 0);

    private static RunResult run(String planJson, int draws, String nullCluster) {
        Plan plan = new PlanReader(false).read(planJson, Path.of(".")).withNull(draws, "bootstrap", nullCluster, 5);
        return new MultiverseRunner(1).withVariants(PartsOfTable.source(plan, TABLE, PartsOfTable.rowKeys(
                "schools.parquet", TABLE.rowCount()), 3)).run(plan, TABLE, RunProgress.SILENT, new AtomicBoolean());
    }

    private static NullDrawResult draws(RunResult run, int threads) {
        return NullDraws.run(RunVariants.of(run), NullDrawSettings.of(run.plan()), threads, RunProgress.SILENT, null);
    }

    @Test
    void theSameBitsOnOneTwoAndThreeThreads() {
        RunResult run = run(PartsOfTable.ROWS_PLAN, 30, "rows");
        NullDrawResult one = draws(run, 1);
        for (int threads : new int[] {2, 3}) {
            NullDrawResult other = draws(run, threads);
            assertEquals(one.drawCount(), other.drawCount());
            for (int d = 0; d < one.drawCount(); d++) {
                assertEquals(one.draw(d), other.draw(d), threads + " threads, draw " + (d + 1));
                for (int c = 0; c < one.curveCount(); c++) {
                    assertEquals(one.drawCurve(d, c).statistics(), other.drawCurve(d, c).statistics(), "curve " + c);
                    assertArrayEquals(one.drawCurve(d, c).atRanks(), other.drawCurve(d, c).atRanks(), 0, "curve " + c);
                }
            }
            for (int c = 0; c < one.curveCount(); c++) {
                assertEquals(one.curveJson(c), other.curveJson(c), "curve " + c + " as summary.json writes it");
            }
            assertEquals(one.failedFits(), other.failedFits());
        }
    }

    /**
     * Logit and probit draws through the null draws' own loop: every specification refit in every draw from the
     * draw's parts, the same bits on 1 and 2 threads, every draw fit made ({@code failed_fits} 0).
     */
    @Test
    void generalizedLinearDrawsAreTheSameBitsOnOneAndTwoThreads() {
        Table table = PartsOfTable.glmSchools(13, 20);
        String planJson = PartsOfTable.SCHOOLS_PLAN.replace("\"column\": \"y\"}]}", "\"column\": \"passed\"}]},\n"
                + "{\"name\": \"model\", \"kind\": \"model\", \"alternatives\": [\"logit\", \"probit\"]}");
        assertTrue(planJson.contains("probit"), "the plan edit took");
        Plan plan = new PlanReader(false).read(planJson, Path.of(".")).withNull(12, "bootstrap", "school", 5);
        RunResult run = new MultiverseRunner(1).withVariants(PartsOfTable.source(plan, table, PartsOfTable.rowKeys(
                "schools.parquet", table.rowCount()), 3)).run(plan, table, RunProgress.SILENT, new AtomicBoolean());
        NullDrawResult one = draws(run, 1);
        NullDrawResult two = draws(run, 2);
        assertEquals(12, one.drawCount());
        for (int d = 0; d < one.drawCount(); d++) {
            assertEquals(one.draw(d), two.draw(d), "draw " + (d + 1));
            assertEquals(RunVariants.of(run).size(), one.draw(d).fitted(), "every specification fitted in draw " + (d + 1));
        }
        for (int c = 0; c < one.curveCount(); c++) {
            assertEquals(one.curveJson(c), two.curveJson(c), "curve " + c + " as summary.json writes it");
        }
        assertEquals(0, one.failedFits());
    }

    @Test
    void drawsDependOnTheirNumberAlone() {
        // the first 10 of 30 draws are a 10-draw run's
        NullDrawResult thirty = draws(run(PartsOfTable.ROWS_PLAN, 30, "rows"), 2);
        NullDrawResult ten = draws(run(PartsOfTable.ROWS_PLAN, 10, "rows"), 2);
        for (int d = 0; d < 10; d++) {
            assertEquals(thirty.draw(d), ten.draw(d), "draw " + (d + 1));
        }
        // and a draw is the same in any batch: draws 5 and 6 within 0..7 and as a batch of their own
        RunResult run = run(PartsOfTable.SCHOOLS_PLAN, 8, null);
        RunVariants indexed = RunVariants.of(run);
        BootstrapByParts source = run.models().bootstrap(new BootstrapDesign(5, "school"));
        SpecificationFitter fitter = new SpecificationFitter();
        for (int v = 0; v < indexed.variantCount(); v++) {
            if (indexed.specificationsOf(v).length == 0) {
                continue;
            }
            DataVariant[] all = source.draws(run.models().variantKey(v), indexed.variant(v), 0, 8);
            DataVariant[] two = source.draws(run.models().variantKey(v), indexed.variant(v), 5, 7);
            for (int i : indexed.specificationsOf(v)) {
                for (int d = 5; d < 7; d++) {
                    KeyFit a = fitter.fit(all[d], indexed.model(i));
                    KeyFit b = fitter.fit(two[d - 5], indexed.model(i));
                    assertEquals(a.estimate(), b.estimate(), 0, "draw " + d + " estimate");
                    assertEquals(a.stdError(), b.stdError(), 0, "draw " + d + " std_error");
                }
            }
        }
    }

    @Test
    void degenerateDrawsAreLeftOutNotFatal() {
        // three schools drawn whole: some draws hold copies of one school alone (whose cluster scores cancel, so
        // the sandwich from sums would lose digits) or no school at all (e^-3 of them)
        Table three = PartsOfTable.schools(11, 3, 10, 0.3, 0);
        Plan plan = new PlanReader(false).read(PartsOfTable.SCHOOLS_PLAN, Path.of(".")).withNull(60, "bootstrap", null,
                5);
        RunResult run = new MultiverseRunner(1).withVariants(PartsOfTable.source(plan, three, PartsOfTable.rowKeys(
                "schools.parquet", three.rowCount()), 3)).run(plan, three, RunProgress.SILENT, new AtomicBoolean());
        NullDrawResult r = draws(run, 2);
        assertEquals(60, r.drawCount());
        assertTrue(r.emptyDraws() > 0, r.emptyDraws() + " draws with nothing fitted");
        assertTrue(r.failedFits() > 0, r.failedFits() + " fits left out");
    }

    @Test
    void theWarningIsOneMachinesForTheSameSettings() {
        RunResult byParts = run(PartsOfTable.ROWS_PLAN, 5, "rows");
        String warning = draws(byParts, 2).warning();
        RunResult inMemory = new MultiverseRunner(1).run(byParts.plan(), TABLE, RunProgress.SILENT, new AtomicBoolean());
        String oneMachine = draws(inMemory, 2).warning();
        assertTrue(oneMachine != null && oneMachine.contains("\"school\""), oneMachine);
        assertEquals(oneMachine, warning, "single rows split up the errors' school clusters");
        assertNull(draws(run(PartsOfTable.SCHOOLS_PLAN, 5, null), 2).warning(), "whole schools keep them");
        // whole schools keep the classes within them, not the districts that hold several schools
        RunResult classes = run(PartsOfTable.CLASSES_PLAN, 5, "school");
        String split = draws(classes, 2).warning();
        RunResult classesInMemory = new MultiverseRunner(1).run(classes.plan(), TABLE, RunProgress.SILENT,
                new AtomicBoolean());
        assertEquals(draws(classesInMemory, 2).warning(), split);
        assertTrue(split.contains("\"district\"") && !split.contains("\"class\""), split);
    }
}
