package org.forkscape.fit;

import java.util.Arrays;
import org.forkscape.data.CategoricalColumn;
import org.forkscape.data.Column;
import org.forkscape.data.NumericColumn;
import org.forkscape.plan.PlanException;
import org.forkscape.plan.Transform;

/** Codes an outcome or predictor alternative over the rows of one variant. */
final class Transforms {
    private Transforms() {
    }

    /**
     * The coded values of {@code column} at {@code rows} (NaN where missing). Standardize and winsorize
     * use the non-missing values at those rows. A transform that cannot apply is a plan error at
     * {@code path}, never a silent loss of rows.
     */
    static double[] apply(Column column, Transform transform, int[] rows, String path, String rowsDescription) {
        double[] out = new double[rows.length];
        if (column instanceof CategoricalColumn cat) {
            int[] codes = cat.codes();
            for (int i = 0; i < rows.length; i++) {
                int c = codes[rows[i]];
                out[i] = c < 0 ? Double.NaN : c;
            }
            return out;
        }
        double[] x = ((NumericColumn) column).values();
        for (int i = 0; i < rows.length; i++) {
            out[i] = x[rows[i]];
        }
        if (transform instanceof Transform.Identity) {
            return out;
        }
        if (transform instanceof Transform.Log || transform instanceof Transform.Log1p
                || transform instanceof Transform.Sqrt) {
            double floor = transform instanceof Transform.Log ? 0 : transform instanceof Transform.Log1p ? -1 : 0;
            boolean strict = !(transform instanceof Transform.Sqrt);
            int bad = 0;
            for (double v : out) {
                if (!Double.isNaN(v) && (strict ? v <= floor : v < floor)) {
                    bad++;
                }
            }
            if (bad > 0) {
                String rule = transform instanceof Transform.Log ? "<= 0" : transform instanceof Transform.Log1p
                        ? "<= -1" : "< 0";
                throw new PlanException(path, transform.spelling() + " of \"" + column.name() + "\" is undefined for "
                        + bad + " row" + (bad == 1 ? "" : "s") + " with values " + rule + " (" + rowsDescription
                        + "); choose another transform or a sample rule that excludes them");
            }
            for (int i = 0; i < out.length; i++) {
                double v = out[i];
                out[i] = transform instanceof Transform.Log ? Math.log(v)
                        : transform instanceof Transform.Log1p ? Math.log1p(v) : Math.sqrt(v);
            }
            return out;
        }
        double[] present = Arrays.stream(out).filter(v -> !Double.isNaN(v)).toArray();
        if (present.length < 2) {
            throw new PlanException(path, transform.spelling() + " of \"" + column.name()
                    + "\" needs at least two values (" + rowsDescription + ")");
        }
        if (transform instanceof Transform.Standardize) {
            double mean = 0;
            for (double v : present) {
                mean += v;
            }
            mean /= present.length;
            double ss = 0;
            for (double v : present) {
                ss += (v - mean) * (v - mean);
            }
            double sd = Math.sqrt(ss / (present.length - 1));
            if (!(sd > 0)) {
                throw new PlanException(path, "standardize of \"" + column.name() + "\" is undefined: the column is "
                        + "constant (" + rowsDescription + ")");
            }
            for (int i = 0; i < out.length; i++) {
                out[i] = (out[i] - mean) / sd;
            }
            return out;
        }
        double f = ((Transform.Winsorize) transform).fraction();
        Arrays.sort(present);
        double low = quantileType7(present, f);
        double high = quantileType7(present, 1 - f);
        for (int i = 0; i < out.length; i++) {
            if (!Double.isNaN(out[i])) {
                out[i] = Math.min(high, Math.max(low, out[i]));
            }
        }
        return out;
    }

    /**
     * Sample quantile by linear interpolation between order statistics: Hyndman &amp; Fan (1996),
     * "Sample quantiles in statistical packages", The American Statistician 50(4), definition 7.
     */
    static double quantileType7(double[] sorted, double p) {
        double h = (sorted.length - 1) * p;
        int lo = (int) Math.floor(h);
        int hi = Math.min(lo + 1, sorted.length - 1);
        return sorted[lo] + (h - lo) * (sorted[hi] - sorted[lo]);
    }
}
