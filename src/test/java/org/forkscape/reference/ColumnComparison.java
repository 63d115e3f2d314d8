package org.forkscape.reference;

import java.util.List;
import java.util.Map;

/**
 * Compares the cells of one specification that Forkscape wrote with a reference row, adding a line per
 * disagreement to {@code failures} and the largest error per column to {@code worst}.
 *
 * @param actual   the row of Forkscape's specifications.csv
 * @param expected the reference row
 * @param where    the plan and specification, for messages
 * @param source   what produced the reference values, for messages
 */
record ColumnComparison(Map<String, String> actual, Map<String, String> expected, String where, String source,
        List<String> failures, Map<String, Double> worst) {

    /** Whether Forkscape's file has the column; a missing one is a failure. */
    boolean has(String column) {
        if (actual.containsKey(column)) {
            return true;
        }
        failures.add(where + ": specifications.csv has no column " + column);
        return false;
    }

    /** Both cells empty, or both numbers within {@code tolerance} relative to the reference. */
    void relative(String column, double tolerance) {
        if (!bothDefined(column)) {
            return;
        }
        double a = number(actual, column);
        double e = number(expected, column);
        record(column, "relative", Agreement.relativeError(a, e), tolerance, a, e);
    }

    /** Both cells empty, or both numbers within {@code tolerance} of each other. */
    void absolute(String column, double tolerance) {
        if (!bothDefined(column)) {
            return;
        }
        double a = number(actual, column);
        double e = number(expected, column);
        record(column, "absolute", Math.abs(a - e), tolerance, a, e);
    }

    /**
     * An interval bound: relative to the larger of |bound| and the standard error, since a bound near zero is
     * the difference of two comparable numbers and has no relative accuracy of its own.
     */
    void bound(String column, double tolerance) {
        if (!bothDefined(column)) {
            return;
        }
        double a = number(actual, column);
        double e = number(expected, column);
        double scale = Math.max(Math.abs(e), number(expected, "std_error"));
        record(column, "relative to max(|bound|, se)", Math.abs(a - e) / scale, tolerance, a, e);
    }

    /** The same cell text, as for counts and labels. */
    void exact(String column) {
        if (has(column) && !actual.get(column).equals(expected.get(column))) {
            failures.add(where + ": " + column + " \"" + actual.get(column) + "\", " + source + " gives \""
                    + expected.get(column) + "\"");
        }
    }

    /** An empty cell, where the reference leaves the number undefined. */
    void empty(String column) {
        if (has(column) && !actual.get(column).isEmpty()) {
            failures.add(where + ": " + column + " " + actual.get(column) + ", expected an empty cell as in "
                    + source);
        }
    }

    private boolean bothDefined(String column) {
        if (!has(column)) {
            return false;
        }
        boolean a = actual.get(column).isEmpty();
        boolean e = expected.get(column).isEmpty();
        if (a != e) {
            failures.add(where + ": " + column + " \"" + actual.get(column) + "\", " + source + " gives \""
                    + expected.get(column) + "\"");
        }
        return !a && !e;
    }

    private void record(String column, String kind, double error, double tolerance, double a, double e) {
        worst.merge(column + " (" + kind + ")", error, Math::max);
        if (!(error <= tolerance)) {
            failures.add(String.format("%s: %s %.17g, %s gives %.17g (%s error %.2e > %.0e)", where, column, a,
                    source, e, kind, error, tolerance));
        }
    }

    private static double number(Map<String, String> row, String column) {
        return ReferenceFiles.number(row.get(column));
    }
}
