package org.forkscape.fit;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.concurrent.atomic.AtomicBoolean;
import org.forkscape.data.CsvTableReader;
import org.forkscape.data.Table;
import org.forkscape.plan.ErrorType;
import org.forkscape.plan.Plan;
import org.forkscape.plan.PlanReader;
import org.forkscape.reference.ReferenceFiles;
import org.forkscape.run.MultiverseRunner;
import org.forkscape.run.ResultTable;
import org.forkscape.run.RunProgress;
import org.forkscape.run.RunResult;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.ValueSource;

/**
 * The row passes of variants held in parts, without Spark: the reference plans of
 * {@code src/test/r/make-reference.R} whose error types need each row (ChickWeight: HC0 to HC3 with and
 * without the absorbed chick, a sample where one chick keeps one row, so leverage 1, and a diet control the
 * chick effects make redundant, so QR refits; AirQuality: HC2 and HC3 with per-specification missing rows, a
 * trim, a winsorize and QR refits) with their variants built by {@link VariantByParts} from 1, 3 and 7 slices
 * of the table, against the engine building them from the whole table: every specification within 1e-10
 * relative, statuses equal (leverage 1 among them), and the specifications served counted. The batch size
 * does not change a bit: each part's sums are the same whatever batch carries them. A cancel stops the run
 * before the next pass.
 */
class RowPassesByPartsTest {
    static final double RELATIVE = 1e-10;

    @ParameterizedTest(name = "{0} parts")
    @ValueSource(ints = {1, 3, 7})
    void chickWeightFromPartsAsTheWholeTable(int slices) {
        RunResult parts = compare("chickweight-plan.json", slices, RowPassesByParts.MAX_PER_BATCH);
        long leverageOne = 0;
        for (int slot = 0; slot < parts.results().size(); slot++) {
            if (parts.results().status(slot).startsWith("undefined: leverage 1")) {
                leverageOne++;
            }
        }
        // the same 16 as R's hatvalues() (chickweight-expected.csv, make-reference.R)
        assertEquals(16, leverageOne, "specifications with a leverage of 1, as chickweight-expected.csv has them");
    }

    @ParameterizedTest(name = "{0} parts")
    @ValueSource(ints = {1, 3, 7})
    void airqualityFromPartsAsTheWholeTable(int slices) {
        compare("airquality-plan.json", slices, RowPassesByParts.MAX_PER_BATCH);
    }

    @Test
    void theBatchSizeChangesNoBit() {
        RunResult one = runOnParts("chickweight-plan.json", 3, 1);
        RunResult seven = runOnParts("chickweight-plan.json", 3, 7);
        RunResult all = runOnParts("chickweight-plan.json", 3, RowPassesByParts.MAX_PER_BATCH);
        assertTrue(batches(one) > batches(seven) && batches(seven) > batches(all), batches(one) + ", "
                + batches(seven) + " and " + batches(all) + " passes");
        for (int slot = 0; slot < one.results().size(); slot++) {
            assertEquals(all.results().stdError(slot), one.results().stdError(slot), 0.0, "batches of 1");
            assertEquals(all.results().stdError(slot), seven.results().stdError(slot), 0.0, "batches of 7");
            assertEquals(all.results().status(slot), one.results().status(slot));
        }
    }

    /**
     * The progress counts a specification that waits for its pass over the rows when the pass is made: the
     * count never goes back and reaches the total exactly once, with the last pass (common practice for a
     * progress bar).
     */
    @Test
    void progressCountsADeferredSpecificationWhenItsPassIsMade() {
        Plan plan = plan("chickweight-plan.json");
        Table table = new CsvTableReader().read(plan.dataFile());
        VariantSource source = VariantByPartsTest.source(plan, table, 3);
        java.util.List<Long> seen = java.util.Collections.synchronizedList(new java.util.ArrayList<>());
        java.util.concurrent.atomic.AtomicLong passes = new java.util.concurrent.atomic.AtomicLong();
        java.util.concurrent.atomic.AtomicLong doneAtFirstPass = new java.util.concurrent.atomic.AtomicLong(-1);
        VariantSource counting = (key, pool) -> {
            DataVariant v = source.variant(key, pool);
            DataVariant.RowPassReduction parts = v.rowPassReduction;
            v.rowPassReduction = batch -> {
                if (passes.getAndIncrement() == 0) {
                    doneAtFirstPass.set(seen.isEmpty() ? 0 : seen.get(seen.size() - 1));
                }
                return parts.sums(batch);
            };
            return v;
        };
        RunResult run = new MultiverseRunner(1).withVariants(counting).withRowPassBatch(1)
                .run(plan, table, (done, total) -> seen.add(done), new AtomicBoolean());
        long total = run.results().size();
        assertTrue(passes.get() > 0, "the plan has specifications that need their rows");
        assertTrue(doneAtFirstPass.get() < total, "counted done before their pass: " + doneAtFirstPass.get());
        for (int i = 1; i < seen.size(); i++) {
            assertTrue(seen.get(i) >= seen.get(i - 1), "the count went back at update " + i);
        }
        assertEquals(total, (long) seen.get(seen.size() - 1));
        assertEquals(1, seen.stream().filter(d -> d == total).count(), "the total is reached once");
    }

    @Test
    void aCancelStopsTheRunBetweenPasses() {
        Plan plan = plan("chickweight-plan.json");
        Table table = new CsvTableReader().read(plan.dataFile());
        VariantSource built = VariantByPartsTest.source(plan, table, 3);
        AtomicBoolean cancel = new AtomicBoolean();
        java.util.concurrent.atomic.AtomicLong passes = new java.util.concurrent.atomic.AtomicLong();
        VariantSource source = (key, pool) -> {
            DataVariant v = built.variant(key, pool);
            DataVariant.RowPassReduction parts = v.rowPassReduction;
            // the cancel arrives while the first pass is made
            v.rowPassReduction = batch -> {
                passes.incrementAndGet();
                cancel.set(true);
                return parts.sums(batch);
            };
            return v;
        };
        assertThrows(org.forkscape.run.RunCancelledException.class, () -> new MultiverseRunner(2)
                .withVariants(source).withRowPassBatch(1).run(plan, table, RunProgress.SILENT, cancel));
        assertEquals(1, passes.get(), "passes made after the cancel");
    }

    /** Every specification on parts against the whole table; returns the run on parts. */
    private static RunResult compare(String planName, int slices, int batch) {
        Plan plan = plan(planName);
        Table table = new CsvTableReader().read(plan.dataFile());
        RunResult whole = new MultiverseRunner(2).run(plan, table, RunProgress.SILENT, new AtomicBoolean());
        RunResult parts = runOnParts(planName, slices, batch);
        ResultTable a = whole.results();
        ResultTable b = parts.results();
        long rowPassTypes = 0;
        for (int slot = 0; slot < a.size(); slot++) {
            String where = planName + ", specification " + a.specNumber(slot);
            assertEquals(a.status(slot), b.status(slot), where);
            assertEquals(a.nObs(slot), b.nObs(slot), where);
            assertEquals(a.nParams(slot), b.nParams(slot), where);
            assertEquals(a.df(slot), b.df(slot), 0.0, where);
            if (a.fitted(slot)) {
                close(a.estimate(slot), b.estimate(slot), where + " estimate");
                close(a.stdError(slot), b.stdError(slot), where + " std_error");
                close(a.pValue(slot), b.pValue(slot), where + " p_value");
            }
        }
        for (int v = 0; v < parts.models().variantCount(); v++) {
            DataVariant variant = parts.models().variant(parts.models().variantKey(v));
            assertTrue(!variant.holdsRows());
            rowPassTypes += variant.rowPassesServed();
        }
        long hc23 = 0;
        long[] choices = new long[parts.models().space().decisionCount()];
        for (int slot = 0; slot < b.size(); slot++) {
            parts.models().space().decode(b.specIndex(slot), choices);
            ErrorType.Kind kind = parts.models().model(choices).errors().kind();
            if ((kind == ErrorType.Kind.HC2 || kind == ErrorType.Kind.HC3) && b.nObs(slot) > b.nParams(slot)) {
                hc23++;
            }
        }
        assertTrue(hc23 > 0 && rowPassTypes >= hc23, rowPassTypes + " specifications served by the passes over the "
                + "parts, of which at least the " + hc23 + " fitted with HC2 or HC3");
        return parts;
    }

    private static RunResult runOnParts(String planName, int slices, int batch) {
        Plan plan = plan(planName);
        Table table = new CsvTableReader().read(plan.dataFile());
        VariantSource built = VariantByPartsTest.source(plan, table, slices);
        // kept once built, as the Spark runner keeps them, so that the counts of the passes can be read after
        java.util.Map<VariantKey, DataVariant> kept = new java.util.concurrent.ConcurrentHashMap<>();
        VariantSource source = (key, pool) -> kept.computeIfAbsent(key, k -> built.variant(k, pool));
        return new MultiverseRunner(2).withVariants(source).withRowPassBatch(batch).run(plan, table, RunProgress.SILENT, new AtomicBoolean());
    }

    private static long batches(RunResult run) {
        long n = 0;
        for (int v = 0; v < run.models().variantCount(); v++) {
            n += run.models().variant(run.models().variantKey(v)).rowPassBatches();
        }
        return n;
    }

    private static Plan plan(String name) {
        return new PlanReader(false).read(ReferenceFiles.path(name));
    }

    private static void close(double expected, double actual, String what) {
        if (expected == actual || Double.isNaN(expected) && Double.isNaN(actual)) {
            return;
        }
        double relative = Math.abs(actual - expected) / Math.abs(expected);
        assertTrue(relative <= RELATIVE, what + ": " + actual + " against " + expected + ", relative " + relative);
    }
}
