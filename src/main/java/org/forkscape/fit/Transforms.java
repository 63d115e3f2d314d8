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
        return apply(column, transform, rows, path, rowsDescription, null);
    }

    /**
     * As above; with {@code given} not null, a standardize takes its {mean, sd} and a winsorize its {low,
     * high} bounds from it (computed over every part of the rows, and checked there, see {@link #check}).
     */
    static double[] apply(Column column, Transform transform, int[] rows, String path, String rowsDescription,
            double[] given) {
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
            requireDomain(column.name(), transform, bad, path, rowsDescription);
            for (int i = 0; i < out.length; i++) {
                double v = out[i];
                out[i] = transform instanceof Transform.Log ? Math.log(v)
                        : transform instanceof Transform.Log1p ? Math.log1p(v) : Math.sqrt(v);
            }
            return out;
        }
        if (given != null) {
            for (int i = 0; i < out.length; i++) {
                double v = out[i];
                out[i] = transform instanceof Transform.Standardize ? (v - given[0]) / given[1]
                        : v != v ? v : Math.min(given[1], Math.max(given[0], v));
            }
            return out;
        }
        double[] present = Arrays.stream(out).filter(v -> !Double.isNaN(v)).toArray();
        requireTwoValues(column.name(), transform, present.length, path, rowsDescription);
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
            requireSpread(column.name(), sd, path, rowsDescription);
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

    /** The refusal of a log, log1p or sqrt with {@code bad} values outside its domain (none when 0). */
    private static void requireDomain(String column, Transform transform, long bad, String path,
            String rowsDescription) {
        if (bad > 0) {
            String rule = transform instanceof Transform.Log ? "<= 0" : transform instanceof Transform.Log1p
                    ? "<= -1" : "< 0";
            throw new PlanException(path, transform.spelling() + " of \"" + column + "\" is undefined for "
                    + bad + " row" + (bad == 1 ? "" : "s") + " with values " + rule + " (" + rowsDescription
                    + "); choose another transform or a sample rule that excludes them");
        }
    }

    /**
     * What a part of the rows tells about a transform that depends on all of them: for a log, log1p or
     * sqrt {count of values outside its domain}; for a standardize or winsorize {count, mean, sum of
     * squared deviations} of the non-missing values (Welford 1962, Technometrics 4(3)); null otherwise.
     * Parts are merged by {@link #mergeFacts}.
     */
    static double[] facts(Column column, Transform transform, int[] rows) {
        if (column instanceof CategoricalColumn || transform instanceof Transform.Identity) {
            return null;
        }
        double[] x = ((NumericColumn) column).values();
        if (transform instanceof Transform.Log || transform instanceof Transform.Log1p
                || transform instanceof Transform.Sqrt) {
            double floor = transform instanceof Transform.Log1p ? -1 : 0;
            boolean strict = !(transform instanceof Transform.Sqrt);
            long bad = 0;
            for (int r : rows) {
                double v = x[r];
                if (!Double.isNaN(v) && (strict ? v <= floor : v < floor)) {
                    bad++;
                }
            }
            return new double[] {bad};
        }
        long n = 0;
        double mean = 0;
        double m2 = 0;
        for (int r : rows) {
            double v = x[r];
            if (!Double.isNaN(v)) {
                n++;
                double d = v - mean;
                mean += d / n;
                m2 += d * (v - mean);
            }
        }
        return new double[] {n, mean, m2};
    }

    /**
     * Two parts' facts as one: counts add; means and squared deviations by the pairwise update of Chan,
     * Golub &amp; LeVeque (1983), "Algorithms for computing the sample variance: analysis and
     * recommendations", The American Statistician 37(3). Either may be null.
     */
    static double[] mergeFacts(double[] a, double[] b) {
        if (a == null) {
            return b == null ? null : b.clone();
        }
        if (b == null) {
            return a.clone();
        }
        if (a.length == 1) {
            return new double[] {a[0] + b[0]};
        }
        double n = a[0] + b[0];
        if (n == 0) {
            return new double[] {0, 0, 0};
        }
        double delta = b[1] - a[1];
        return new double[] {n, a[1] + delta * b[0] / n, a[2] + b[2] + delta * delta * a[0] * b[0] / n};
    }

    /**
     * Refuses a transform that cannot apply to the merged facts of every part of the rows, with the same
     * messages as the coding of all rows at once; returns the standardize's {mean, sd}, else null.
     */
    static double[] check(String column, Transform transform, double[] facts, String path, String rowsDescription) {
        if (facts == null) {
            return null;
        }
        if (facts.length == 1) {
            requireDomain(column, transform, (long) facts[0], path, rowsDescription);
            return null;
        }
        requireTwoValues(column, transform, (long) facts[0], path, rowsDescription);
        if (transform instanceof Transform.Standardize) {
            double sd = Math.sqrt(facts[2] / (facts[0] - 1));
            requireSpread(column, sd, path, rowsDescription);
            return new double[] {facts[1], sd};
        }
        return null;
    }

    private static void requireTwoValues(String column, Transform transform, long n, String path,
            String rowsDescription) {
        if (n < 2) {
            throw new PlanException(path, transform.spelling() + " of \"" + column
                    + "\" needs at least two values (" + rowsDescription + ")");
        }
    }

    private static void requireSpread(String column, double sd, String path, String rowsDescription) {
        if (!(sd > 0)) {
            throw new PlanException(path, "standardize of \"" + column + "\" is undefined: the column is "
                    + "constant (" + rowsDescription + ")");
        }
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
