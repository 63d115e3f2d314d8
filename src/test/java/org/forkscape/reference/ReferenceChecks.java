package org.forkscape.reference;

import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import org.forkscape.fit.FullFit;
import org.forkscape.run.ResultTable;

/**
 * What the R reference tests share: one value against a reference row, a full fit's coefficients against a
 * reference file's, and a run's numbers as bits.
 */
final class ReferenceChecks {
    private ReferenceChecks() {
    }

    /**
     * Compares {@code actual} with the reference row's {@code column}: exactly when {@code tolerance} is 0, else
     * within it relatively (recording the largest relative error per column in {@code worst}); no number on both
     * sides (a variance that is not positive, say) agrees. A disagreement is added to {@code failures} with where
     * it is and the reference's source.
     */
    static void check(List<String> failures, Map<String, Double> worst, String where, String column, double actual,
            Map<String, String> row, String source, double tolerance) {
        double e = ReferenceFiles.number(row.get(column));
        if (Double.isNaN(e) && Double.isNaN(actual)) {
            return;
        }
        double err = tolerance == 0 ? (actual == e ? 0 : Double.POSITIVE_INFINITY) : Agreement.relativeError(actual, e);
        if (tolerance > 0) {
            worst.merge(column + " (relative)", err, Math::max);
        }
        if (!(err <= tolerance)) {
            failures.add(String.format("%s: %s %.17g, %s gives %.17g (tolerance %.0e)", where, column, actual, source,
                    e, tolerance));
        }
    }

    /**
     * The checks every least-squares reference row takes against R's {@code lm()} and sandwich: the rows
     * exactly, and where R fitted the specification (status {@code ok}) the estimate, the rank, the standard
     * error of the row's type, the residual df and R-squared; returns whether R fitted it.
     */
    static boolean lmRow(List<String> failures, Map<String, Double> worst, String where, ResultTable r, int slot,
            Map<String, String> row, double relative) {
        check(failures, worst, where, "n_obs", r.nObs(slot), row, "R nobs()", 0);
        if (!row.get("status").equals("ok")) {
            return false;
        }
        check(failures, worst, where, "estimate", r.estimate(slot), row, "R lm() coefficient", relative);
        check(failures, worst, where, "n_params", r.nParams(slot), row, "R lm() rank", 0);
        check(failures, worst, where, "std_error", r.stdError(slot), row, switch (row.get("errors")) {
            case "classical" -> "R vcov() of lm";
            case "HC0", "HC1", "HC2", "HC3" -> "sandwich::vcovHC";
            default -> "sandwich::vcovCL";
        }, relative);
        check(failures, worst, where, "df", r.df(slot), row, "R df.residual or min(G) - 1", 0);
        check(failures, worst, where, "r2", r.r2(slot), row, "R summary.lm r.squared", relative);
        return true;
    }

    /**
     * Each specification's estimate, standard error, R-squared, average marginal effect and its standard error
     * as raw bits, in specification order.
     */
    static long[] bits(ResultTable r) {
        long[] out = new long[5 * r.size()];
        for (int slot = 0; slot < r.size(); slot++) {
            int at = 5 * (int) r.specIndex(slot);
            out[at] = Double.doubleToRawLongBits(r.estimate(slot));
            out[at + 1] = Double.doubleToRawLongBits(r.stdError(slot));
            out[at + 2] = Double.doubleToRawLongBits(r.r2(slot));
            out[at + 3] = Double.doubleToRawLongBits(r.effect(slot));
            out[at + 4] = Double.doubleToRawLongBits(r.effectStdError(slot));
        }
        return out;
    }

    /** A reference file of every coefficient (columns spec, term, estimate, std_error): by spec, then by term in file order. */
    static Map<String, Map<String, Map<String, String>>> coefficientsBySpec(String file) {
        Map<String, Map<String, Map<String, String>>> out = new LinkedHashMap<>();
        for (Map<String, String> c : ReferenceFiles.rows(file)) {
            out.computeIfAbsent(c.get("spec"), s -> new LinkedHashMap<>()).put(c.get("term"), c);
        }
        return out;
    }

    /**
     * A full fit's coefficients against R's for its specification: the same terms in the same order, then each
     * estimate and standard error ({@code seSource} names the latter's origin) within {@code tolerance}.
     *
     * @return the coefficients compared (0 when the terms differ, which is a failure)
     */
    static int compareCoefficients(FullFit fit, Map<String, Map<String, String>> expected, String where, String seSource,
            double tolerance, List<String> failures, Map<String, Double> worst) {
        List<String> terms = fit.coefficients().stream().map(FullFit.Coefficient::term).toList();
        if (!terms.equals(List.copyOf(expected.keySet()))) {
            failures.add(where + ": coefficients " + terms + ", R keeps " + expected.keySet());
            return 0;
        }
        for (FullFit.Coefficient c : fit.coefficients()) {
            String at = where + " " + c.term();
            Map<String, String> r = expected.get(c.term());
            check(failures, worst, at, "estimate", c.estimate(), r, "R lm() coefficient", tolerance);
            check(failures, worst, at, "std_error", c.stdError(), r, seSource, tolerance);
        }
        return terms.size();
    }
}
