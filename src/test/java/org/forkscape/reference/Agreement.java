package org.forkscape.reference;

/** Relative and absolute agreement of two numbers, and the log relative error of McCullough (1998). */
public final class Agreement {
    private Agreement() {
    }

    /** |actual - expected| / |expected|; the absolute difference when expected is 0; 0 when both are equal. */
    public static double relativeError(double actual, double expected) {
        if (actual == expected) {
            return 0;
        }
        double diff = Math.abs(actual - expected);
        return expected == 0 ? diff : diff / Math.abs(expected);
    }

    /**
     * Log relative error: -log10(|x - c| / |c|), or -log10(|x - c|) when the certified value c is 0,
     * capped at the number of digits certified (McCullough 1998, "Assessing the reliability of
     * statistical software: Part I", The American Statistician 52(4)). It counts the correct
     * significant digits of x.
     */
    static double logRelativeError(double x, double certified, double digitsCertified) {
        double e = relativeError(x, certified);
        if (!(e > 0)) {
            return Double.isNaN(e) ? 0 : digitsCertified;
        }
        return Math.max(0, Math.min(digitsCertified, -Math.log10(e)));
    }
}
