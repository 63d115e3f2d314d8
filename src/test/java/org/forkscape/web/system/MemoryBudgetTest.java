package org.forkscape.web.system;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.forkscape.data.TableFootprint;
import org.junit.jupiter.api.Test;

/** Uploads read at once share the budget: one that fits alone waits for the others (503), then fits. */
class MemoryBudgetTest {
    @Test
    void uploadsReadAtOnceShareTheCapacity() {
        MemoryBudget budget = new MemoryBudget(1 << 20);
        // 20,000 rows of 3 columns: per column 2 blocks of 16,384 doubles, and one final array: 946,544 bytes
        TableFootprint footprint = TableFootprint.of(20_000, 3);
        assertEquals(3 * 2 * (16 + 16_384 * 8) + 16 + 20_000 * 8, footprint.bytes());
        try (MemoryBudget.Reservation first = budget.reserve("a.csv", footprint, "the upload was not kept")) {
            MemoryBudgetException busy = assertThrows(MemoryBudgetException.class,
                    () -> budget.reserve("b.csv", footprint, "the upload was not kept"));
            assertFalse(busy.overLimit());
            assertTrue(busy.getMessage().contains("the uploads being read now hold"), busy.getMessage());
            assertTrue(busy.getMessage().contains("forkscape.runs.max-memory"), busy.getMessage());
            assertEquals(footprint.bytes(), budget.held());
            // growing within what is left is granted, with room to spare; past the capacity it is not
            long granted = first.require(footprint.bytes() + 1000);
            assertTrue(granted >= footprint.bytes() + 1000 && granted <= 1 << 20);
            MemoryBudgetException over = assertThrows(MemoryBudgetException.class, () -> first.require(2 << 20));
            assertTrue(over.overLimit());
        }
        assertEquals(0, budget.held());
        budget.reserve("b.csv", footprint, "the upload was not kept").close();
        assertEquals(0, budget.held());
    }
}
