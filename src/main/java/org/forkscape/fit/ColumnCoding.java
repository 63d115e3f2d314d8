package org.forkscape.fit;

import org.forkscape.data.CategoricalColumn;
import org.forkscape.data.NumericColumn;

/**
 * A variant's model columns coded over its rows, NaN where missing: every outcome and predictor alternative
 * with its transform, and every control, a categorical one as dummies against its first level.
 */
final class ColumnCoding {
    private ColumnCoding() {
    }

    /**
     * The outcome and predictor alternatives at the table rows {@code sampled}, indexed by model column (the
     * controls' entries are left null). Transforms that depend on the data (standardize, winsorize) use these
     * rows, before the absorbed fixed effect drops any; a transform that cannot apply is a
     * {@link org.forkscape.plan.PlanException} at its JSON path. Facts given in {@code whole} (the
     * statistics of every part of the rows) are used instead of those of {@code sampled}.
     *
     * @param rowsDescription the rows in words, for those messages
     */
    static double[][] alternatives(CompiledPlan plan, int[] sampled, String rowsDescription, WholeRows whole) {
        double[][] raw = new double[plan.layout.size()][];
        for (CompiledPlan.CodedVariable v : plan.outcomes) {
            raw[v.modelColumn()] = code(v, sampled, rowsDescription, whole);
        }
        for (CompiledPlan.CodedVariable v : plan.predictors) {
            raw[v.modelColumn()] = code(v, sampled, rowsDescription, whole);
        }
        return raw;
    }

    private static double[] code(CompiledPlan.CodedVariable v, int[] sampled, String rowsDescription,
            WholeRows whole) {
        double[] given = v.transform() instanceof org.forkscape.plan.Transform.Winsorize
                ? whole.winsorize(v.modelColumn()) : whole.standardize(v.modelColumn());
        return Transforms.apply(v.column(), v.transform(), sampled, v.transformPath(), rowsDescription, given);
    }

    /** Fills the controls' model columns of {@code raw} (modified) with their values at the table rows {@code rows}. */
    static void controls(CompiledPlan plan, int[] rows, double[][] raw) {
        for (CompiledPlan.CodedControl control : plan.codedControls) {
            int[] cols = control.modelColumns();
            if (cols.length == 0) {
                continue;
            }
            if (control.column() instanceof CategoricalColumn cat) {
                int[] codes = cat.codes();
                for (int k = 0; k < cols.length; k++) {
                    double[] d = new double[rows.length];
                    for (int i = 0; i < rows.length; i++) {
                        int code = codes[rows[i]];
                        d[i] = code < 0 ? Double.NaN : code == k + 1 ? 1 : 0;
                    }
                    raw[cols[k]] = d;
                }
            } else {
                double[] x = ((NumericColumn) control.column()).values();
                double[] d = new double[rows.length];
                for (int i = 0; i < rows.length; i++) {
                    d[i] = x[rows[i]];
                }
                raw[cols[0]] = d;
            }
        }
    }
}
