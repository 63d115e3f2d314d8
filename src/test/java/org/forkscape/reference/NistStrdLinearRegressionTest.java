package org.forkscape.reference;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import org.forkscape.data.Column;
import org.forkscape.data.NumericColumn;
import org.forkscape.data.Table;
import org.forkscape.plan.Plan;
import org.forkscape.plan.PlanReader;
import org.forkscape.run.MultiverseRunner;
import org.forkscape.run.ResultTable;
import org.forkscape.run.RunProgress;
import org.forkscape.run.RunResult;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.EnumSource;

/**
 * NIST Statistical Reference Datasets, linear regression: Longley, Wampler1 and Wampler2, against their
 * certified values (NIST Information Technology Laboratory, StRD; Longley 1967, "An appraisal of
 * least squares programs for the electronic computer from the point of view of the user", JASA 62(319);
 * Wampler 1970, "A report on the accuracy of some widely used least squares computer programs", JASA
 * 65(330)), scored by log relative error (LRE, the number of correct significant digits) as in McCullough
 * (1998, "Assessing the reliability of statistical software: Part I", The American Statistician 52(4)).
 *
 * <p>Data: Longley's 16 rows are R's {@code datasets::longley} in NIST's units ({@code longley.csv},
 * converted by {@code src/test/r/make-reference.R}); Wampler1 and Wampler2 follow from their definition, a
 * degree-5 polynomial in x = 0..20 with coefficients all 1 (Wampler1) and 1, 0.1, ..., 0.00001 (Wampler2),
 * built below. That definition is typed from memory; it is confirmed by the fits reproducing the certified
 * values (exact fit, R-squared 1), here and in R's lm ({@code nist-lm.csv}).
 *
 * <p>Each slope is the key predictor in turn, the other regressors required controls, so every certified
 * slope and standard error passes through the engine's key-coefficient path; the residual SD is
 * sqrt(RSS / df) and R-squared is reported directly. The engine never reports the intercept (it solves in
 * centered coordinates), so b0 is only cross-checked against R.
 */
class NistStrdLinearRegressionTest {
    /** The number of digits NIST certifies; LRE is capped there. */
    static final double CERTIFIED_DIGITS = 15;

    /**
     * Each data set with its certified values and two thresholds: the lowest LRE accepted from the engine,
     * and the lowest LRE accepted from R's lm when cross-checking the certified values typed from memory
     * (set about one digit below what R reaches, so a slip in one of the leading digits shows).
     */
    enum Dataset {
        /**
         * Longley, NIST StRD certified values, typed from memory (cross-checked against R's lm in
         * nist-lm.csv, which matches them to at least 12.9 digits). Engine minimum LRE 11: the centered,
         * unit-scaled design has condition number about 110, so the normal equations that the engine's
         * Cholesky route solves (the precision guard lets Longley through) have about 1.2e4 and leave about
         * 16 - 4 = 12 digits; 11 allows for rounding spread. McCullough (1998) counts about 7 or more on
         * Longley as reliable.
         */
        LONGLEY(11, 12, new double[] {-3482258.63459582, 15.0618722713733, -0.358191792925910E-01,
                -2.02022980381683, -1.03322686717359, -0.511041056535807E-01, 1829.15146461355},
                new double[] {890420.383607373, 84.9149257747669, 0.334910077722432E-01, 0.488399681651699,
                        0.214274163161675, 0.226073200069370, 455.478499142212},
                304.854073561965, 0.995479004577296),
        /**
         * Wampler1, NIST StRD certified values, typed from memory: every coefficient 1, every standard
         * error 0, residual SD 0, R-squared 1 (an exact fit). Engine minimum LRE 8. The centered, unit-scaled
         * design of x, ..., x^5 has condition number about 1.6e3, 2.7e6 for its normal equations, which the
         * precision guard refuses, so every slope is refit by QR; what limits the digits is the data: y
         * reaches 3.4e6, so its rounding when centered (about 5e-10) is noise against which the lower powers'
         * coefficients are estimated. R's lm reaches 9.8 on b1 and 10 on the standard errors (where the
         * certified value is 0 and the LRE is absolute); 8 allows the engine's different centering order.
         */
        WAMPLER1(8, 9, new double[] {1, 1, 1, 1, 1, 1}, new double[] {0, 0, 0, 0, 0, 0}, 0, 1),
        /**
         * Wampler2, NIST StRD certified values, typed from memory: coefficients 1, 0.1, 0.01, 0.001,
         * 0.0001, 0.00001, every standard error 0, residual SD 0, R-squared 1. Same design and guard as
         * Wampler1, with y at most 63, so more digits survive; engine minimum LRE 8 as for Wampler1.
         */
        WAMPLER2(8, 9, new double[] {1, 0.1, 0.01, 0.001, 1e-4, 1e-5}, new double[] {0, 0, 0, 0, 0, 0}, 0, 1);

        final double minimumLre;
        final double rCrossCheckLre;
        final double[] coefficients;
        final double[] standardErrors;
        final double residualSd;
        final double r2;

        Dataset(double minimumLre, double rCrossCheckLre, double[] coefficients, double[] standardErrors,
                double residualSd, double r2) {
            this.minimumLre = minimumLre;
            this.rCrossCheckLre = rCrossCheckLre;
            this.coefficients = coefficients;
            this.standardErrors = standardErrors;
            this.residualSd = residualSd;
            this.r2 = r2;
        }

        String nistName() {
            return name().charAt(0) + name().substring(1).toLowerCase();
        }

        Table table() {
            if (this == LONGLEY) {
                return ReferenceFiles.table("longley.csv");
            }
            return wampler(this == WAMPLER1);
        }

        boolean illConditioned() {
            return this != LONGLEY;
        }
    }

    /** Wampler1 or Wampler2 from the definition: y = sum_k c_k x^k for x = 0..20, columns x1..x5 = x^k. */
    static Table wampler(boolean first) {
        int n = 21;
        double[] y = new double[n];
        double[][] powers = new double[5][n];
        for (int x = 0; x < n; x++) {
            long p = 1;
            // Wampler2 as an integer numerator over 100000: each y is the double nearest the exact decimal
            long numerator = 0;
            for (int k = 0; k <= 5; k++) {
                numerator += (first ? 1 : (long) Math.pow(10, 5 - k)) * p;
                if (k > 0) {
                    powers[k - 1][x] = p;
                }
                p *= x;
            }
            y[x] = first ? numerator : numerator / 100000.0;
        }
        List<Column> columns = new ArrayList<>();
        columns.add(new NumericColumn("y", y));
        for (int k = 1; k <= 5; k++) {
            columns.add(new NumericColumn("x" + k, powers[k - 1]));
        }
        return new Table(first ? "Wampler1" : "Wampler2", columns);
    }

    @ParameterizedTest
    @EnumSource(Dataset.class)
    void certifiedValuesThroughTheKeyCoefficientPath(Dataset data) {
        Table table = data.table();
        int slopes = data.coefficients.length - 1;
        String source = "NIST StRD " + data.nistName() + " certified value (typed from memory)";
        Map<String, Double> lre = new LinkedHashMap<>();
        List<String> failures = new ArrayList<>();
        double rss = Double.NaN;
        double df = Double.NaN;
        double r2 = Double.NaN;
        for (int j = 1; j <= slopes; j++) {
            RunResult run = new MultiverseRunner(1).run(slopePlan(j, slopes), table, RunProgress.SILENT, null);
            ResultTable r = run.results();
            assertEquals(1, r.size());
            assertTrue(r.fitted(0), data.nistName() + " b" + j + ": " + r.status(0));
            if (data.illConditioned()) {
                assertTrue(run.refitByQr() > 0, data.nistName() + " b" + j + " is ill-conditioned: the precision "
                        + "guard must refit it by QR");
            }
            score(lre, failures, data, "b" + j, r.estimate(0), data.coefficients[j], source);
            score(lre, failures, data, "sd(b" + j + ")", r.stdError(0), data.standardErrors[j], source);
            rss = r.rss(0);
            df = r.df(0);
            r2 = r.r2(0);
        }
        assertEquals(table.rowCount() - slopes - 1, df, data.nistName() + " residual df");
        score(lre, failures, data, "residual SD", Math.sqrt(rss / df), data.residualSd, source);
        score(lre, failures, data, "R-squared", r2, data.r2, source);
        AgreementReport.write("nist-lre-" + data.nistName() + ".txt", "LRE against " + source + "; minimum "
                + data.minimumLre, lre);
        assertTrue(failures.isEmpty(), String.join("\n", failures));
    }

    /** The certified values typed from memory agree with R's lm on the same data (nist-lm.csv). */
    @ParameterizedTest
    @EnumSource(Dataset.class)
    void certifiedValuesTypedFromMemoryAgreeWithRsLm(Dataset data) {
        Map<String, Map<String, String>> fromR = new LinkedHashMap<>();
        for (Map<String, String> row : ReferenceFiles.rows("nist-lm.csv")) {
            if (row.get("dataset").equals(data.nistName())) {
                fromR.put(row.get("quantity"), row);
            }
        }
        String source = "R lm(), nist-lm.csv (" + ReferenceFiles.versions() + ")";
        List<String> failures = new ArrayList<>();
        for (int j = 0; j < data.coefficients.length; j++) {
            Map<String, String> row = fromR.get("b" + j);
            crossCheck(failures, data, "b" + j, ReferenceFiles.number(row.get("value")), data.coefficients[j], source);
            crossCheck(failures, data, "sd(b" + j + ")", ReferenceFiles.number(row.get("std_error")),
                    data.standardErrors[j], source);
        }
        crossCheck(failures, data, "residual SD", ReferenceFiles.number(fromR.get("residual_sd").get("value")),
                data.residualSd, source);
        crossCheck(failures, data, "R-squared", ReferenceFiles.number(fromR.get("r2").get("value")), data.r2, source);
        assertTrue(failures.isEmpty(), String.join("\n", failures));
    }

    private static void score(Map<String, Double> lre, List<String> failures, Dataset data, String what,
            double actual, double certified, String source) {
        double digits = Agreement.logRelativeError(actual, certified, CERTIFIED_DIGITS);
        lre.put(what, digits);
        if (!(digits >= data.minimumLre)) {
            failures.add(String.format("%s %s: Forkscape %.17g, %s %.15g: LRE %.1f below %.0f", data.nistName(), what,
                    actual, source, certified, digits, data.minimumLre));
        }
    }

    private static void crossCheck(List<String> failures, Dataset data, String what, double fromR, double certified,
            String source) {
        double digits = Agreement.logRelativeError(fromR, certified, CERTIFIED_DIGITS);
        if (!(digits >= data.rCrossCheckLre)) {
            failures.add(String.format("%s %s: NIST certified value typed from memory %.15g, %s %.17g: LRE %.1f "
                    + "below %.0f (a typing slip?)", data.nistName(), what, certified, source, fromR, digits,
                    data.rCrossCheckLre));
        }
    }

    /** y on x_key with the other regressors as required controls. */
    private static Plan slopePlan(int key, int slopes) {
        List<String> others = new ArrayList<>();
        for (int j = 1; j <= slopes; j++) {
            if (j != key) {
                others.add("\"x" + j + "\"");
            }
        }
        String json = "{\"data\": \"unused.csv\", \"decisions\": ["
                + "{\"name\": \"outcome\", \"kind\": \"outcome\", \"alternatives\": [{\"label\": \"y\", \"column\": \"y\"}]},"
                + "{\"name\": \"key\", \"kind\": \"predictor\", \"alternatives\": [{\"label\": \"x" + key
                + "\", \"column\": \"x" + key + "\"}]},"
                + "{\"name\": \"others\", \"kind\": \"controls\", \"required\": [" + String.join(", ", others) + "]}]}";
        return new PlanReader(false).read(json, ReferenceFiles.path("versions.txt").getParent());
    }
}
