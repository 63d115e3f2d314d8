package org.forkscape.text;

import java.math.BigDecimal;
import java.math.MathContext;
import java.math.RoundingMode;
import java.util.Locale;

/**
 * Numbers in the text the server writes (the batch command's result line, the influence sentence, the
 * data page), by the same rules as the explorer's {@code frontend/js/numbers.js}: counts with thousands
 * separators; shares as percentages with one decimal, never 0% or 100% unless exact; other numbers with
 * four significant digits, written out between 1e-4 and 1e6 and as a power of ten beyond; p-values read
 * off null draws with two significant digits and the draws behind them.
 */
public final class HumanNumbers {
    /** Two significant digits: a p-value's third digit is noise at any usual number of draws or rows. */
    private static final int P_DIGITS = 2;

    /** Significant digits of an estimate: enough to compare neighbours on the curve, few enough to read. */
    private static final int DIGITS = 4;

    /** Plain decimals from here up to {@link #LARGE}; a power of ten outside (common practice). */
    private static final double SMALL = 1e-4;
    private static final double LARGE = 1e6;

    private static final String SUPERSCRIPTS = "\u2070\u00b9\u00b2\u00b3\u2074\u2075\u2076\u2077\u2078\u2079";

    private HumanNumbers() {
    }

    /** A whole number with thousands separators: 4,608. */
    public static String count(long n) {
        return String.format(Locale.ROOT, "%,d", n);
    }

    /** A number with four significant digits: "-0.0002034", "4,608", "1", "-1.301\u00d710\u207b\u2075". */
    public static String number(double v) {
        return number(v, DIGITS);
    }

    /**
     * A number with {@code digits} significant digits and trailing zeros dropped; thousands separators in
     * the whole part; {@code m\u00d710\u207f} with a superscript exponent below 1e-4 or from 1e6 in size;
     * "undefined" when not finite.
     */
    public static String number(double v, int digits) {
        if (!Double.isFinite(v)) {
            return "undefined";
        }
        if (v == 0) {
            return "0";
        }
        // the exact binary value, as the browser's toPrecision rounds it
        BigDecimal rounded = new BigDecimal(v).round(new MathContext(digits, RoundingMode.HALF_UP));
        double size = Math.abs(rounded.doubleValue());
        if (size >= SMALL && size < LARGE) {
            return grouped(plain(rounded));
        }
        int exponent = rounded.precision() - rounded.scale() - 1;
        return plain(rounded.movePointLeft(exponent)) + "\u00d710" + superscript(exponent);
    }

    /**
     * A nominal p-value as {@code numbers.js}'s {@code pValue} writes it: "< 0.001" below that, a bound true as
     * written, otherwise two significant digits; "undefined" when not finite.
     */
    public static String pValue(double p) {
        if (!Double.isFinite(p)) {
            return "undefined";
        }
        return p < 0.001 ? "< 0.001" : number(p, 2);
    }

    /**
     * A share as a percentage with one decimal, ".0" dropped: "99.7%", "75%"; "0%" and "100%" only when
     * exact, otherwise "< 0.1%" and "> 99.9%"; "undefined" when not finite.
     */
    public static String share(double s) {
        if (!Double.isFinite(s)) {
            return "undefined";
        }
        if (s == 0 || s == 1) {
            return s == 0 ? "0%" : "100%";
        }
        String text = String.format(Locale.ROOT, "%.1f", 100 * s);
        if (text.equals("0.0") || text.equals("-0.0")) {
            return "< 0.1%";
        }
        if (text.equals("100.0")) {
            return "> 99.9%";
        }
        return (text.endsWith(".0") ? text.substring(0, text.length() - 2) : text) + "%";
    }

    /**
     * A p-value read off null draws, with the draws that make it: "p = 0.012 (3 of 300 draws)", or when
     * none was as extreme, the bound 1 / (draws + 1) rounded up so that the claim stays true:
     * "p < 0.0034 (1/301; none of 300 draws as extreme)".
     */
    public static String drawP(int exceedances, int draws) {
        if (draws <= 0) {
            return "p undefined (no draw could be compared)";
        }
        BigDecimal denominator = BigDecimal.valueOf(draws);
        if (exceedances == 0) {
            BigDecimal bound = BigDecimal.ONE.divide(denominator.add(BigDecimal.ONE),
                    new MathContext(P_DIGITS, RoundingMode.UP));
            return "p < " + plain(bound) + " (1/" + count(draws + 1L) + "; none of " + count(draws)
                    + " draws as extreme)";
        }
        BigDecimal p = BigDecimal.valueOf(exceedances).divide(denominator, new MathContext(P_DIGITS,
                RoundingMode.HALF_UP));
        return "p = " + plain(p) + " (" + count(exceedances) + " of " + count(draws) + " draws)";
    }

    private static String grouped(String plain) {
        int start = plain.startsWith("-") ? 1 : 0;
        int point = plain.indexOf('.');
        int end = point < 0 ? plain.length() : point;
        StringBuilder s = new StringBuilder(plain);
        for (int at = end - 3; at > start; at -= 3) {
            s.insert(at, ',');
        }
        return s.toString();
    }

    private static String superscript(int exponent) {
        StringBuilder s = new StringBuilder(exponent < 0 ? "\u207b" : "");
        for (char c : Integer.toString(Math.abs(exponent)).toCharArray()) {
            s.append(SUPERSCRIPTS.charAt(c - '0'));
        }
        return s.toString();
    }

    private static String plain(BigDecimal v) {
        return v.stripTrailingZeros().toPlainString();
    }
}
