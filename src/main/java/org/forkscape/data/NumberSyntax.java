package org.forkscape.data;

/**
 * The cells we read as numbers: optional sign, digits with an optional decimal point, optional exponent.
 * Narrower than {@link Double#parseDouble}, which also takes {@code Infinity}, hexadecimal and a trailing
 * {@code d} or {@code f}: a cell like {@code 12f} in a data file is a label, not a number.
 */
final class NumberSyntax {
    private NumberSyntax() {
    }

    static boolean isDecimal(String s) {
        int n = s.length();
        int i = 0;
        if (i < n && (s.charAt(i) == '+' || s.charAt(i) == '-')) {
            i++;
        }
        int digits = 0;
        while (i < n && s.charAt(i) >= '0' && s.charAt(i) <= '9') {
            i++;
            digits++;
        }
        if (i < n && s.charAt(i) == '.') {
            i++;
            while (i < n && s.charAt(i) >= '0' && s.charAt(i) <= '9') {
                i++;
                digits++;
            }
        }
        if (digits == 0) {
            return false;
        }
        if (i < n && (s.charAt(i) == 'e' || s.charAt(i) == 'E')) {
            i++;
            if (i < n && (s.charAt(i) == '+' || s.charAt(i) == '-')) {
                i++;
            }
            int exponentDigits = 0;
            while (i < n && s.charAt(i) >= '0' && s.charAt(i) <= '9') {
                i++;
                exponentDigits++;
            }
            if (exponentDigits == 0) {
                return false;
            }
        }
        return i == n;
    }
}
