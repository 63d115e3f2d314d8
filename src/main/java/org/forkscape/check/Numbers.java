package org.forkscape.check;

import java.math.BigDecimal;
import java.math.MathContext;

/** Numbers in the check's sentences: four significant digits, no exponent for ordinary sizes. */
final class Numbers {
    private Numbers() {
    }

    static String text(double v) {
        if (!Double.isFinite(v)) {
            return "undefined";
        }
        return new BigDecimal(v).round(new MathContext(4)).stripTrailingZeros().toPlainString();
    }
}
