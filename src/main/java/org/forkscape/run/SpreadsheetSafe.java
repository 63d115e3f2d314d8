package org.forkscape.run;

/**
 * Neutralises text cells that a spreadsheet would run as a formula (those beginning with =, +, - or @,
 * and tab or carriage return), by prefixing an apostrophe, as the OWASP guidance on CSV injection
 * recommends. Only text cells: numbers are written as numbers.
 */
public final class SpreadsheetSafe {
    private SpreadsheetSafe() {
    }

    public static String text(String cell) {
        if (cell.isEmpty()) {
            return cell;
        }
        char c = cell.charAt(0);
        return c == '=' || c == '+' || c == '-' || c == '@' || c == '\t' || c == '\r' ? "'" + cell : cell;
    }
}
