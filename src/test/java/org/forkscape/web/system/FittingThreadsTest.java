package org.forkscape.web.system;

import static org.junit.jupiter.api.Assertions.assertEquals;

import org.junit.jupiter.api.Test;
import org.springframework.util.unit.DataSize;

/** By default a run fits on every processor but one, so that one stays free to serve the explorer. */
class FittingThreadsTest {
    @Test
    void theDefaultLeavesOneProcessorAndAnExplicitCountIsKept() {
        int processors = Runtime.getRuntime().availableProcessors();
        assertEquals(Math.max(1, processors - 1), runs(0).fittingThreads());
        assertEquals(3, runs(3).fittingThreads());
    }

    private static ForkscapeSettings.Runs runs(int threads) {
        return new ForkscapeSettings.Runs(1, 16, threads, 1_000_000, 10_000, DataSize.ofBytes(0));
    }
}
