package org.forkscape.fit;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;

import org.junit.jupiter.api.Test;

/** A status written as its sentence reads back as the same status and detail (specifications.csv round trip). */
class FitStatusTest {
    @Test
    void everySentenceReadsBackAsItsStatusAndDetail() {
        for (FitStatus s : FitStatus.values()) {
            String detail = s.describe("x").equals(s.describe("")) ? "" : "reading_hours";
            FitStatus.Read read = FitStatus.read(s.describe(detail));
            assertEquals(s, read.status(), s.describe(detail));
            assertEquals(detail, read.detail(), s.describe(detail));
        }
        assertEquals(new FitStatus.Read(FitStatus.TOO_FEW_ROWS, "4 rows for 6 coefficients"),
                FitStatus.read("too few rows: 4 rows for 6 coefficients"));
        assertEquals(new FitStatus.Read(FitStatus.LEVERAGE_ONE, "HC3"), FitStatus.read(
                "undefined: leverage 1 for HC3 (a row fits perfectly, such as a fixed-effect level with one row)"));
    }

    @Test
    void aSentenceNoStatusWritesIsRefused() {
        assertThrows(IllegalArgumentException.class, () -> FitStatus.read("fitted by hand"));
    }
}
