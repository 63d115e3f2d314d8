package org.forkscape.fit;

import java.io.Serializable;
import java.util.HashMap;
import java.util.Map;

/**
 * What the coding of one part of a variant's rows takes from all of them: the mean and standard deviation
 * of each trim rule's column over the rows kept before it, of each standardized column, the winsorizing
 * bounds, the sorted values of each numeric grouping column over the whole table, the fixed-effect codes
 * present in the variant, and the level shifts. A runner that holds every row in one place computes these
 * from the rows as it codes them ({@link #NONE}); a runner that holds the rows in parts (on a cluster)
 * computes them in first aggregations and hands them to every part, so that each part codes its rows exactly
 * as the whole would be coded. Immutable; each {@code with} returns a copy.
 */
public final class WholeRows implements Serializable {
    private static final long serialVersionUID = 1L;

    /** Nothing given: every fact is computed from the rows at hand. */
    public static final WholeRows NONE = new WholeRows(Map.of(), Map.of(), Map.of(), Map.of(), null, null);

    private final Map<Integer, double[]> trim;
    private final Map<Integer, double[]> standardize;
    private final Map<Integer, double[]> winsorize;
    private final Map<String, double[]> groupingValues;
    private final int[] absorbCodes;
    private final double[][] levelShift;

    private WholeRows(Map<Integer, double[]> trim, Map<Integer, double[]> standardize,
            Map<Integer, double[]> winsorize, Map<String, double[]> groupingValues, int[] absorbCodes,
            double[][] levelShift) {
        this.trim = trim;
        this.standardize = standardize;
        this.winsorize = winsorize;
        this.groupingValues = groupingValues;
        this.absorbCodes = absorbCodes;
        this.levelShift = levelShift;
    }

    /** With the mean and standard deviation of sample decision {@code sample}'s trim column (position among the sample decisions). */
    public WholeRows withTrim(int sample, double mean, double sd) {
        Map<Integer, double[]> t = new HashMap<>(trim);
        t.put(sample, new double[] {mean, sd});
        return new WholeRows(t, standardize, winsorize, groupingValues, absorbCodes, levelShift);
    }

    /** With the mean and standard deviation a standardized model column is coded with. */
    public WholeRows withStandardize(int modelColumn, double mean, double sd) {
        Map<Integer, double[]> s = new HashMap<>(standardize);
        s.put(modelColumn, new double[] {mean, sd});
        return new WholeRows(trim, s, winsorize, groupingValues, absorbCodes, levelShift);
    }

    /** With the bounds a winsorized model column is clamped to. */
    public WholeRows withWinsorize(int modelColumn, double low, double high) {
        Map<Integer, double[]> w = new HashMap<>(winsorize);
        w.put(modelColumn, new double[] {low, high});
        return new WholeRows(trim, standardize, w, groupingValues, absorbCodes, levelShift);
    }

    /** With the sorted distinct values of each numeric grouping column (fixed effects, clusters) over the whole table. */
    public WholeRows withGroupingValues(Map<String, double[]> values) {
        return new WholeRows(trim, standardize, winsorize, Map.copyOf(values), absorbCodes, levelShift);
    }

    /** With the absorbed column's codes present in the variant's rows, ascending. */
    public WholeRows withAbsorbCodes(int[] codes) {
        return new WholeRows(trim, standardize, winsorize, groupingValues, codes.clone(), levelShift);
    }

    /** With the shift of each level (rows) and model column. */
    public WholeRows withLevelShift(double[][] shift) {
        return new WholeRows(trim, standardize, winsorize, groupingValues, absorbCodes, shift);
    }

    double[] trim(int sample) {
        return trim.get(sample);
    }

    double[] standardize(int modelColumn) {
        return standardize.get(modelColumn);
    }

    double[] winsorize(int modelColumn) {
        return winsorize.get(modelColumn);
    }

    double[] groupingValues(String column) {
        return groupingValues.get(column);
    }

    int[] absorbCodes() {
        return absorbCodes;
    }

    double[][] levelShift() {
        return levelShift;
    }

    /** Whether the level shifts are given (then the variant's rows are shifted by them, not by their own means). */
    boolean hasLevelShift() {
        return levelShift != null;
    }

    @Override
    public String toString() {
        return "WholeRows[trim " + trim.keySet() + ", standardize " + standardize.keySet() + ", winsorize "
                + winsorize.keySet() + ", grouping " + groupingValues.keySet() + ", levels "
                + (absorbCodes == null ? "-" : String.valueOf(absorbCodes.length)) + "]";
    }
}
