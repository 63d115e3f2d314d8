package org.forkscape.fit;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.concurrent.atomic.AtomicBoolean;
import org.forkscape.data.CategoricalColumn;
import org.forkscape.data.Column;
import org.forkscape.data.CsvTableReader;
import org.forkscape.data.NumericColumn;
import org.forkscape.data.Table;
import org.forkscape.plan.Plan;
import org.forkscape.plan.PlanReader;
import org.forkscape.run.MultiverseRunner;
import org.forkscape.run.ResultTable;
import org.forkscape.run.RunProgress;
import org.forkscape.run.RunResult;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.ValueSource;

/**
 * The statistics seam without Spark: the demo plan (as far as a run from statistics alone goes, see
 * {@link PlanEdits#demoFromStatistics}) with its variants built by {@link VariantByParts} from 1, 3 and 7
 * slices of the demo table, as the Spark runner builds them from partitions, against the engine building
 * them from the whole table. Every specification's estimate, standard error and p-value within 1e-10
 * relative (the same cells summed in another order, shifts by merged means), counts and statuses equal;
 * the variants hold no rows; and with the zone control, which sends specifications to the precision
 * guard's QR refit, the refits made from the parts' triangular factors (tall-skinny QR) agree too.
 */
class VariantByPartsTest {
    static final double RELATIVE = 1e-10;
    static final Path SAMPLE = Path.of("sample-data");

    @ParameterizedTest(name = "{0} parts")
    @ValueSource(ints = {1, 3, 7})
    void variantsFromPartsFitAsTheWholeTable(int slices) throws IOException {
        String text = PlanEdits.demoFromStatistics(Files.readString(SAMPLE.resolve("civic-demo.plan.json")));
        Plan plan = new PlanReader(false).read(text, SAMPLE.toAbsolutePath());
        Table table = new CsvTableReader().read(plan.dataFile());
        RunResult whole = new MultiverseRunner(2).run(plan, table, RunProgress.SILENT, new AtomicBoolean());
        RunResult parts = new MultiverseRunner(2).withVariants(source(plan, table, slices)).run(plan, table,
                RunProgress.SILENT, new AtomicBoolean());
        for (int v = 0; v < parts.models().variantCount(); v++) {
            assertFalse(parts.models().variant(parts.models().variantKey(v)).holdsRows());
        }
        ResultTable a = whole.results();
        ResultTable b = parts.results();
        int fitted = 0;
        for (int slot = 0; slot < a.size(); slot++) {
            String where = "specification " + a.specNumber(slot);
            assertEquals(a.status(slot), b.status(slot), where);
            assertEquals(a.nObs(slot), b.nObs(slot), where);
            assertEquals(a.df(slot), b.df(slot), 0.0, where);
            if (a.fitted(slot)) {
                fitted++;
                close(a.estimate(slot), b.estimate(slot), where + " estimate");
                close(a.stdError(slot), b.stdError(slot), where + " std_error");
                close(a.pValue(slot), b.pValue(slot), where + " p_value");
            }
        }
        assertEquals(a.size(), fitted);
    }

    /**
     * The refits a run meets are reduced in batches (one pass over the parts for up to 64 of them), each
     * factor merged part by part as a refit reduced alone is: a batch of 64, a batch of 1 and a refit reduced
     * on its own by a fitter that does not batch give the same bits (an engine property).
     */
    @Test
    void refitsReducedInBatchesGiveTheBitsOfARefitReducedAlone() throws IOException {
        String text = PlanEdits.withoutAlternatives(Files.readString(SAMPLE.resolve("civic-demo.plan.json")),
                "standard errors", List.of("HC1", "HC3"));
        Plan plan = new PlanReader(false).read(text, SAMPLE.toAbsolutePath());
        Table table = new CsvTableReader().read(plan.dataFile());
        java.util.Map<VariantKey, DataVariant> kept = new java.util.concurrent.ConcurrentHashMap<>();
        VariantSource built = source(plan, table, 3);
        VariantSource keeping = (key, pool) -> kept.computeIfAbsent(key, k -> built.variant(k, pool));
        RunResult batched = new MultiverseRunner(2).withVariants(keeping).run(plan, table, RunProgress.SILENT,
                new AtomicBoolean());
        long passes = kept.values().stream().mapToLong(v -> v.refitBatches.get()).sum();
        assertTrue(batched.refitByQr() > 2 * passes && passes > 0, batched.refitByQr() + " refits in " + passes
                + " passes");
        RunResult single = new MultiverseRunner(2).withVariants(source(plan, table, 3)).withRefitBatch(1)
                .run(plan, table, RunProgress.SILENT, new AtomicBoolean());
        SpecificationFitter alone = new SpecificationFitter();
        VariantSource fresh = source(plan, table, 3);
        java.util.Map<VariantKey, DataVariant> freshKept = new java.util.HashMap<>();
        SpecificationModels models = batched.models();
        long[] c = new long[models.space().decisionCount()];
        ResultTable a = batched.results();
        int refitAlone = 0;
        for (int slot = 0; slot < a.size(); slot++) {
            models.space().decode(a.specIndex(slot), c);
            VariantKey key = models.variantKey(models.variantOrdinal(c));
            KeyFit fit = alone.fit(freshKept.computeIfAbsent(key, k -> fresh.variant(k, null)), models.model(c));
            String where = "specification " + a.specNumber(slot);
            assertEquals(a.status(slot), single.results().status(slot), where);
            assertEquals(a.estimate(slot), single.results().estimate(slot), 0.0, where + ", batches of 1");
            assertEquals(a.stdError(slot), single.results().stdError(slot), 0.0, where + ", batches of 1");
            assertEquals(a.estimate(slot), fit.estimate(), 0.0, where + ", reduced alone");
            assertEquals(a.stdError(slot), fit.stdError(), 0.0, where + ", reduced alone");
            refitAlone += fit.refitByQr() ? 1 : 0;
        }
        assertEquals(batched.refitByQr(), refitAlone);
    }

    @ParameterizedTest(name = "{0} parts")
    @ValueSource(ints = {1, 3, 7})
    void precisionGuardRefitsFromTheParts(int slices) throws IOException {
        // the zone control is collinear with the absorbed zone: those specifications are refit by QR, here from
        // the parts' triangular factors
        String text = PlanEdits.withoutAlternatives(Files.readString(SAMPLE.resolve("civic-demo.plan.json")),
                "standard errors", List.of("HC1", "HC3"));
        Plan plan = new PlanReader(false).read(text, SAMPLE.toAbsolutePath());
        Table table = new CsvTableReader().read(plan.dataFile());
        RunResult whole = new MultiverseRunner(2).run(plan, table, RunProgress.SILENT, new AtomicBoolean());
        RunResult parts = new MultiverseRunner(2).withVariants(source(plan, table, slices)).run(plan, table,
                RunProgress.SILENT, new AtomicBoolean());
        assertTrue(whole.refitByQr() > 0 && parts.refitByQr() == whole.refitByQr(), whole.refitByQr() + " and "
                + parts.refitByQr() + " refits by QR");
        ResultTable a = whole.results();
        ResultTable b = parts.results();
        for (int slot = 0; slot < a.size(); slot++) {
            String where = "specification " + a.specNumber(slot);
            assertEquals(a.status(slot), b.status(slot), where);
            assertEquals(a.nParams(slot), b.nParams(slot), where + " n_params (columns dropped)");
            if (a.fitted(slot)) {
                close(a.estimate(slot), b.estimate(slot), where + " estimate");
                close(a.stdError(slot), b.stdError(slot), where + " std_error");
                close(a.pValue(slot), b.pValue(slot), where + " p_value");
            }
        }
    }

    /** The parts reduced in their order, in memory, as a distributed engine reduces them in a fixed order. */
    static VariantParts inMemory(List<VariantByParts> parts) {
        return new VariantParts() {
            @Override
            public <T> T reduce(PartFunction<T> f, Merge<T> merge) {
                T acc = null;
                for (VariantByParts p : parts) {
                    T next = f.apply(p);
                    acc = acc == null ? next : next == null ? acc : merge.apply(acc, next);
                }
                return acc;
            }

            @Override
            public double[] quantiles(PartFunction<double[]> values, double low, double high) {
                double[] all = parts.stream().flatMapToDouble(p -> Arrays.stream(values.apply(p))).sorted().toArray();
                return new double[] {Transforms.quantileType7(all, low), Transforms.quantileType7(all, high)};
            }
        };
    }

    /** Variants built from {@code slices} consecutive slices of the table's rows. */
    static VariantSource source(Plan plan, Table table, int slices) {
        List<VariantByParts> parts = new ArrayList<>();
        int n = table.rowCount();
        for (int s = 0; s < slices; s++) {
            parts.add(new VariantByParts(plan, slice(table, s * n / slices, (s + 1) * n / slices)));
        }
        VariantByParts decider = new VariantByParts(plan, table);
        WholeRows grouping = WholeRows.NONE.withGroupingValues(numericGroupingValues(table));
        VariantParts inMemory = inMemory(parts);
        return (key, pool) -> decider.build(key, grouping, inMemory);
    }

    /** Every numeric column's sorted distinct values (the grouping columns among them are what is used). */
    static Map<String, double[]> numericGroupingValues(Table table) {
        Map<String, double[]> out = new HashMap<>();
        for (Column c : table.columns()) {
            if (c instanceof NumericColumn num) {
                out.put(c.name(), Arrays.stream(num.values()).filter(v -> !Double.isNaN(v)).distinct().sorted()
                        .toArray());
            }
        }
        return out;
    }

    static Table slice(Table table, int from, int to) {
        List<Column> columns = new ArrayList<>();
        for (Column c : table.columns()) {
            columns.add(c instanceof CategoricalColumn cat
                    ? new CategoricalColumn(c.name(), Arrays.copyOfRange(cat.codes(), from, to), cat.levels())
                    : new NumericColumn(c.name(), Arrays.copyOfRange(((NumericColumn) c).values(), from, to)));
        }
        return new Table(table.source(), columns);
    }

    private static void close(double expected, double actual, String what) {
        if (expected == actual || Double.isNaN(expected) && Double.isNaN(actual)) {
            return;
        }
        double relative = Math.abs(actual - expected) / Math.abs(expected);
        assertTrue(relative <= RELATIVE, what + ": " + actual + " against " + expected + ", relative " + relative);
    }
}
