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
    void numbersKeepFourSignificantDigitsWithoutAnExponentBetweenATenThousandthAndAMillion() {
        // digits worked out by hand
        assertEquals("-0.000203", HumanNumbers.number(-0.000203));
        assertEquals("0.0001", HumanNumbers.number(0.0001));
        assertEquals("1", HumanNumbers.number(1.0));
        assertEquals("0.5", HumanNumbers.number(0.5));
        assertEquals("3.142", HumanNumbers.number(Math.PI));
        assertEquals("4,608", HumanNumbers.number(4608));
        assertEquals("12,350", HumanNumbers.number(12345.678));
        assertEquals("999,900", HumanNumbers.number(999_900));
        assertEquals("0", HumanNumbers.number(0));
        assertEquals("undefined", HumanNumbers.number(Double.NaN));
        assertEquals("0.12", HumanNumbers.number(0.1234, 2));
    }

    @Test
    void numbersBeyondThatRangeTakeAPowerOfTen() {
        assertEquals("-1.301\u00d710\u207b\u2075", HumanNumbers.number(-1.301e-5));
        assertEquals("9.999\u00d710\u207b\u2075", HumanNumbers.number(0.00009999));
        assertEquals("2.5\u00d710\u2076", HumanNumbers.number(2_500_000));
        // 999,999.7 rounds to 1.000e6 and so leaves the plain range
        assertEquals("1\u00d710\u2076", HumanNumbers.number(999_999.7));
        assertEquals("1.235\u00d710\u00b9\u00b2", HumanNumbers.number(1.2345e12));
    }

    @Test
    void nominalPValuesKeepTwoDigitsAndSayLessThanAThousandthBelowIt() {
        // as numbers.js's pValue, worked out by hand
        assertEquals("< 0.001", HumanNumbers.pValue(0.00049));
        assertEquals("0.001", HumanNumbers.pValue(0.001));
        assertEquals("0.012", HumanNumbers.pValue(0.01234));
        assertEquals("0.5", HumanNumbers.pValue(0.5));
        assertEquals("undefined", HumanNumbers.pValue(Double.NaN));
    }

    @Test
    void sharesAreNeverRoundedToNoneOrAll() {
        // 99.65% is what a curve whose range starts just below zero may have
        assertEquals("99.7%", HumanNumbers.share(0.9965));
        assertEquals("> 99.9%", HumanNumbers.share(0.9999));
        assertEquals("< 0.1%", HumanNumbers.share(0.0004));
        assertEquals("0.1%", HumanNumbers.share(0.001));
        assertEquals("100%", HumanNumbers.share(1.0));
        assertEquals("0%", HumanNumbers.share(0.0));
        assertEquals("75%", HumanNumbers.share(0.75));
        assertEquals("62.5%", HumanNumbers.share(0.625));
        assertEquals("undefined", HumanNumbers.share(Double.NaN));
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
