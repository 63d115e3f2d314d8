package org.forkscape.text;

import java.math.BigDecimal;
import java.math.MathContext;
import java.math.RoundingMode;
import java.util.Locale;

/**
 * Numbers in the sentences the server writes (the batch command's result line, the influence sentence),
 * by the same rules as the explorer's {@code frontend/js/numbers.js}: counts with thousands separators,
 * p-values read off null draws with two significant digits and the draws behind them.
 */
public final class HumanNumbers {
    /** Two significant digits: a p-value's third digit is noise at any usual number of draws or rows. */
    private static final int P_DIGITS = 2;

    private HumanNumbers() {
    }

    /** A whole number with thousands separators: 4,608. */
    public static String count(long n) {
        return String.format(Locale.ROOT, "%,d", n);
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

    private static String plain(BigDecimal v) {
        return v.stripTrailingZeros().toPlainString();
    }
}
