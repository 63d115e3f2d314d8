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
    static int[] of(CompiledPlan plan, VariantKey key, WholeRows whole) {
        return indicesOf(kept(plan, key, plan.samples.length, whole));
    }

    /**
     * Which table rows are kept by the common missing rule and the variant's first {@code samples} sample
     * decisions: the rows a trim rule of decision {@code samples} takes its mean and spread over. A trim
     * takes them from {@code whole} when given there, else from the rows at hand.
     */
    static boolean[] kept(CompiledPlan plan, VariantKey key, int samples, WholeRows whole) {
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
        apply(plan, key.sampleChoices(), samples, keep, whole);
        return keep;
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
    private static void apply(CompiledPlan plan, int[] choices, int samples, boolean[] keep, WholeRows whole) {
        Table table = plan.table;
        for (int s = 0; s < samples; s++) {
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
                trim(table.column(t.column()), t.z(), keep, path + ".trim", whole.trim(s));
            }
        }
    }

    /**
     * Drops kept rows whose |z| on the column exceeds the bound; mean and sd (n - 1) over the kept rows, or
     * {@code given} ({mean, sd} over every part's kept rows) when not null.
     */
    private static void trim(Column column, double bound, boolean[] keep, String path, double[] given) {
        double[] x = ((NumericColumn) column).values();
        if (given != null) {
            drop(x, given[0], given[1], bound, keep);
            return;
        }
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
        requireSpread(column.name(), n, sd, path);
        drop(x, mean, sd, bound, keep);
    }

    /** A trim rule's column over every kept row: count, mean and sum of squared deviations (Welford). */
    static double[] trimMoments(Column column, boolean[] keep) {
        double[] x = ((NumericColumn) column).values();
        long n = 0;
        double mean = 0;
        double m2 = 0;
        for (int r = 0; r < keep.length; r++) {
            if (keep[r] && !Double.isNaN(x[r])) {
                n++;
                double d = x[r] - mean;
                mean += d / n;
                m2 += d * (x[r] - mean);
            }
        }
        return new double[] {n, mean, m2};
    }

    /** The trim's refusal when its column has no spread in the rows kept at that point. */
    static void requireSpread(String column, long n, double sd, String path) {
        if (!(sd > 0)) {
            throw new PlanException(path, "cannot trim on \"" + column + "\": it has "
                    + (n < 2 ? "fewer than two values" : "no spread") + " in the rows kept at that point");
        }
    }

    private static void drop(double[] x, double mean, double sd, double bound, boolean[] keep) {
        for (int r = 0; r < keep.length; r++) {
            if (keep[r] && !Double.isNaN(x[r]) && Math.abs(x[r] - mean) / sd > bound) {
                keep[r] = false;
            }
        }
    }
}
