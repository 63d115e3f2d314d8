package org.forkscape.reference;

import static org.junit.jupiter.api.Assertions.assertEquals;

import java.util.function.ToDoubleFunction;
import org.forkscape.data.Table;
import org.forkscape.plan.Plan;
import org.forkscape.run.MultiverseRunner;
import org.forkscape.run.ResultTable;
import org.forkscape.run.RunProgress;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.ValueSource;

/**
 * Determinism (a property the engine promises, so no outside source): the same plan run with one and with
 * two worker threads gives bit-identical results for every specification, whichever thread fitted it. The
 * reference plans are large enough that each data variant is split into several chunks of work.
 */
class ThreadCountDeterminismTest {
    @ParameterizedTest(name = "{0}")
    @ValueSource(strings = {"airquality", "chickweight"})
    void oneAndTwoThreadsGiveIdenticalBits(String name) {
        Plan plan = ReferenceFiles.plan(name + "-plan.json");
        Table table = ReferenceFiles.table(plan);
        ResultTable one = new MultiverseRunner(1).run(plan, table, RunProgress.SILENT, null).results();
        ResultTable two = new MultiverseRunner(2).run(plan, table, RunProgress.SILENT, null).results();
        assertEquals(one.size(), two.size());
        for (int slot = 0; slot < one.size(); slot++) {
            String where = name + " spec " + (one.specIndex(slot) + 1);
            assertEquals(one.specIndex(slot), two.specIndex(slot), where);
            assertEquals(one.status(slot), two.status(slot), where + " status");
            assertEquals(one.nObs(slot), two.nObs(slot), where + " n_obs");
            assertEquals(one.nParams(slot), two.nParams(slot), where + " n_params");
            int s = slot;
            sameBits(where, "estimate", r -> r.estimate(s), one, two);
            sameBits(where, "std_error", r -> r.stdError(s), one, two);
            sameBits(where, "df", r -> r.df(s), one, two);
            sameBits(where, "r2", r -> r.r2(s), one, two);
            sameBits(where, "rss", r -> r.rss(s), one, two);
            sameBits(where, "model_p_value", r -> r.modelPValue(s), one, two);
            sameBits(where, "p_value", r -> r.pValue(s), one, two);
        }
    }

    private static void sameBits(String where, String what, ToDoubleFunction<ResultTable> value,
            ResultTable one, ResultTable two) {
        assertEquals(Double.doubleToRawLongBits(value.applyAsDouble(one)), Double.doubleToRawLongBits(
                value.applyAsDouble(two)), where + " " + what + ": 1 thread " + value.applyAsDouble(one) + ", 2 threads "
                + value.applyAsDouble(two));
    }
}
