package org.forkscape.data;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;

/** Two tables equal to the bit: the same columns in order, kinds, numbers (NaN for NaN), codes and levels. */
public final class SameTable {
    private SameTable() {
    }

    public static void assertSameTable(Table expected, Table actual) {
        assertEquals(expected.columns().stream().map(Column::name).toList(),
                actual.columns().stream().map(Column::name).toList());
        assertEquals(expected.rowCount(), actual.rowCount());
        for (Column e : expected.columns()) {
            Column a = actual.column(e.name());
            assertEquals(e.getClass(), a.getClass(), e.name());
            if (e instanceof NumericColumn n) {
                assertArrayEquals(n.values(), ((NumericColumn) a).values(), e.name());
            } else {
                CategoricalColumn c = (CategoricalColumn) e;
                assertEquals(c.levels(), ((CategoricalColumn) a).levels(), e.name());
                assertArrayEquals(c.codes(), ((CategoricalColumn) a).codes(), e.name());
            }
        }
    }
}
