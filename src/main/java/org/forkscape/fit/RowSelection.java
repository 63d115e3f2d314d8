package org.forkscape.fit;

import org.forkscape.data.Column;
import org.forkscape.data.NumericColumn;
import org.forkscape.data.Table;
import org.forkscape.plan.PlanException;
import org.forkscape.plan.SampleRule;

/**
 * Which table rows a data variant starts from: those a {@code "missing": "common"} rule keeps, then those its
 * sample decisions keep, applied in declared order.
 */
final class RowSelection {
    private RowSelection() {
    }

    /**
     * The table rows of the variant {@code key}, ascending. A trim on a column without spread in the rows
     * kept so far is a {@link PlanException} at the trim's JSON path.
     */
    static int[] of(CompiledPlan plan, VariantKey key) {
        int n = plan.table.rowCount();
        boolean[] keep = new boolean[n];
        java.util.Arrays.fill(keep, true);
        if (plan.commonMissing) {
            for (Column c : plan.rawVariables) {
                for (int r = 0; r < n; r++) {
                    if (c.isMissing(r)) {
                        keep[r] = false;
                    }
                }
            }
        }
        apply(plan, key.sampleChoices(), keep);
        return indicesOf(keep);
    }

    private static int[] indicesOf(boolean[] keep) {
        int m = 0;
        for (boolean k : keep) {
            if (k) {
                m++;
            }
        }
        int[] out = new int[m];
        m = 0;
        for (int r = 0; r < keep.length; r++) {
            if (keep[r]) {
                out[m++] = r;
            }
        }
        return out;
    }

    /** Rows kept by the chosen sample alternatives, starting from {@code keep} (modified in place). */
    private static void apply(CompiledPlan plan, int[] choices, boolean[] keep) {
        Table table = plan.table;
        for (int s = 0; s < plan.samples.length; s++) {
            SampleRule rule = plan.samples[s].alternatives().get(choices[s]);
            String path = "decisions[" + plan.sampleAt[s] + "].alternatives[" + choices[s] + "]";
            if (rule instanceof SampleRule.KeepRows k) {
                var predicate = k.expression().bind(table, path + ".keep");
                for (int r = 0; r < keep.length; r++) {
                    if (keep[r] && !predicate.keep(r)) {
                        keep[r] = false;
                    }
                }
            } else if (rule instanceof SampleRule.TrimRows t) {
                trim(table.column(t.column()), t.z(), keep, path + ".trim");
            }
        }
    }

    /** Drops kept rows whose |z| on the column exceeds the bound; mean and sd (n - 1) over the kept rows. */
    private static void trim(Column column, double bound, boolean[] keep, String path) {
        double[] x = ((NumericColumn) column).values();
        int n = 0;
        double mean = 0;
        double m2 = 0;
        for (int r = 0; r < keep.length; r++) {
            if (keep[r] && !Double.isNaN(x[r])) {
                // Welford's update (Welford 1962, Technometrics 4(3)): one pass without cancellation
                n++;
                double d = x[r] - mean;
                mean += d / n;
                m2 += d * (x[r] - mean);
            }
        }
        double sd = n > 1 ? Math.sqrt(m2 / (n - 1)) : 0;
        if (!(sd > 0)) {
            throw new PlanException(path, "cannot trim on \"" + column.name() + "\": it has "
                    + (n < 2 ? "fewer than two values" : "no spread") + " in the rows kept at that point");
        }
        for (int r = 0; r < keep.length; r++) {
            if (keep[r] && !Double.isNaN(x[r]) && Math.abs(x[r] - mean) / sd > bound) {
                keep[r] = false;
            }
        }
    }
}
