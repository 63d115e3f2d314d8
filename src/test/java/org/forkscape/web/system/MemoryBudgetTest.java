package org.forkscape.web.system;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.concurrent.CompletableFuture;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.atomic.AtomicBoolean;
import org.forkscape.data.TableFootprint;
import org.forkscape.run.RunCancelledException;
import org.junit.jupiter.api.Test;

/**
 * Runs and uploads share the budget: an upload that fits alone is refused while the others hold what it
 * needs (503), a run waits for room, and either fits once the others are done.
 */
class MemoryBudgetTest {
    // 20,000 rows of 3 columns: per column 2 blocks of 16,384 doubles, and one final array: 946,544 bytes
    private static final TableFootprint FOOTPRINT = TableFootprint.of(20_000, 3);

    @Test
    void uploadsReadAtOnceShareTheCapacity() {
        assertEquals(3 * 2 * (16 + 16_384 * 8) + 16 + 20_000 * 8, FOOTPRINT.bytes());
        MemoryBudget budget = new MemoryBudget(1 << 20, 1);
        try (MemoryBudget.Reservation first = budget.reserve("a.csv", FOOTPRINT, "the upload was not kept")) {
            MemoryBudgetException busy = assertThrows(MemoryBudgetException.class,
                    () -> budget.reserve("b.csv", FOOTPRINT, "the upload was not kept"));
            assertFalse(busy.overLimit());
            assertTrue(busy.getMessage().contains("the runs computing and uploads being read now hold"),
                    busy.getMessage());
            assertTrue(busy.getMessage().contains("forkscape.runs.max-memory"), busy.getMessage());
            assertEquals(FOOTPRINT.bytes(), budget.held());
            // growing within what is left is granted, with room to spare; past the limit it is not
            long granted = first.require(FOOTPRINT.bytes() + 1000);
            assertTrue(granted >= FOOTPRINT.bytes() + 1000 && granted <= 1 << 20);
            MemoryBudgetException over = assertThrows(MemoryBudgetException.class, () -> first.require(2 << 20));
            assertTrue(over.overLimit());
        }
        assertEquals(0, budget.held());
        budget.reserve("b.csv", FOOTPRINT, "the upload was not kept").close();
        assertEquals(0, budget.held());
    }

    @Test
    void aRunWaitsWhileAnUploadHoldsWhatItNeedsAndAnUploadIsRefusedWhileARunHoldsIt() throws Exception {
        MemoryBudget budget = new MemoryBudget(1 << 20, 1);
        MemoryBudget.Reservation upload = budget.reserve("a.csv", FOOTPRINT, "the upload was not kept");
        assertTrue(budget.wouldWait(1 << 19));
        CompletableFuture<MemoryBudget.Reservation> run = CompletableFuture.supplyAsync(
                () -> budget.awaitRoom("run", 1 << 19, () -> false));
        assertThrows(java.util.concurrent.TimeoutException.class, () -> run.get(300, TimeUnit.MILLISECONDS));
        upload.close();
        MemoryBudget.Reservation running = run.get(30, TimeUnit.SECONDS);
        assertEquals(1 << 19, budget.held());
        MemoryBudgetException refused = assertThrows(MemoryBudgetException.class,
                () -> budget.reserve("b.csv", FOOTPRINT, "the upload was not kept"));
        assertFalse(refused.overLimit());
        running.close();
        assertEquals(0, budget.held());
    }

    @Test
    void aRunCancelledWhileItWaitsEndsItsWait() throws Exception {
        MemoryBudget budget = new MemoryBudget(1 << 20, 1);
        try (MemoryBudget.Reservation upload = budget.reserve("a.csv", FOOTPRINT, "the upload was not kept")) {
            AtomicBoolean cancel = new AtomicBoolean();
            CompletableFuture<MemoryBudget.Reservation> run = CompletableFuture.supplyAsync(
                    () -> budget.awaitRoom("run", 1 << 19, cancel::get));
            cancel.set(true);
            java.util.concurrent.ExecutionException e = assertThrows(java.util.concurrent.ExecutionException.class,
                    () -> run.get(30, TimeUnit.SECONDS));
            assertTrue(e.getCause() instanceof RunCancelledException, e.getCause().toString());
            assertEquals(FOOTPRINT.bytes(), budget.held());
        }
    }
}
