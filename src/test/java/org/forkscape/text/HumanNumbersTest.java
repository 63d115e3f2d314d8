package org.forkscape.text;

import static org.junit.jupiter.api.Assertions.assertEquals;

import org.junit.jupiter.api.Test;

/** The number formats of the server's sentences; every expected value is worked out by hand beside it. */
class HumanNumbersTest {

    @Test
    void countsCarryThousandsSeparators() {
        assertEquals("4,608", HumanNumbers.count(4608));
        assertEquals("1,000,000", HumanNumbers.count(1_000_000));
        assertEquals("999", HumanNumbers.count(999));
    }

    @Test
    void noDrawAsExtremeIsABoundRoundedUp() {
        // 1/301 = 0.0033222...: two significant digits rounded up give 0.0034, never the too-strong 0.0033
        assertEquals("p < 0.0034 (1/301; none of 300 draws as extreme)", HumanNumbers.drawP(0, 300));
        // 1/100 = 0.01 exactly: nothing to round
        assertEquals("p < 0.01 (1/100; none of 99 draws as extreme)", HumanNumbers.drawP(0, 99));
        // 1/10,000 = 0.0001 exactly, written without an exponent
        assertEquals("p < 0.0001 (1/10,000; none of 9,999 draws as extreme)", HumanNumbers.drawP(0, 9999));
        // 1/20 = 0.05
        assertEquals("p < 0.05 (1/20; none of 19 draws as extreme)", HumanNumbers.drawP(0, 19));
    }

    @Test
    void someDrawsAsExtremeGiveTheirShare() {
        // 4/300 = 0.01333... -> 0.013; 3/300 = 0.01; 150/300 = 0.5; 1/3 = 0.333... -> 0.33
        assertEquals("p = 0.013 (4 of 300 draws)", HumanNumbers.drawP(4, 300));
        assertEquals("p = 0.01 (3 of 300 draws)", HumanNumbers.drawP(3, 300));
        assertEquals("p = 0.5 (150 of 300 draws)", HumanNumbers.drawP(150, 300));
        assertEquals("p = 0.33 (1 of 3 draws)", HumanNumbers.drawP(1, 3));
        assertEquals("p = 1 (1,200 of 1,200 draws)", HumanNumbers.drawP(1200, 1200));
    }

    @Test
    void noDrawComparedIsSaidSo() {
        assertEquals("p undefined (no draw could be compared)", HumanNumbers.drawP(0, 0));
    }
}
