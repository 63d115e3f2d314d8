package org.forkscape.reference;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import java.util.Random;
import java.util.TreeMap;
import java.util.TreeSet;
import org.apache.commons.math3.stat.regression.OLSMultipleLinearRegression;
import org.forkscape.data.CategoricalColumn;
import org.forkscape.data.Column;
import org.forkscape.data.NumericColumn;
import org.forkscape.data.Table;
import org.forkscape.plan.Decision;
import org.forkscape.plan.Plan;
import org.forkscape.plan.PlanReader;
import org.forkscape.plan.SpecificationSpace;
import org.forkscape.run.MultiverseRunner;
import org.forkscape.run.ResultTable;
import org.forkscape.run.RunProgress;
import org.forkscape.run.RunResult;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.ValueSource;

/**
 * Every specification of a plan over seeded random data against Apache Commons Math 3.6.1's
 * {@link OLSMultipleLinearRegression} (Householder QR on the explicit design with an intercept), refit
 * here from the rows of each specification: rows kept by the sample rule, then complete on the
 * specification's variables; categorical controls and absorbed fixed effects as explicit dummy columns
 * against their first level present. The data have correlated predictor and control columns (c3 nearly
 * c1 + c2; c4 nearly c1 + x/2, so that with c1 and c4 in a specification the key predictor is nearly a
 * combination of the controls and the precision guard must send it to the QR refit), a categorical control,
 * missing cells in most columns, and a fixed-effect column with missing cells.
 *
 * <p>Tolerance {@value #RELATIVE} relative for the key coefficient, its classical standard error and
 * R-squared. Both sides are double-precision least squares; on the nearly collinear specifications two
 * backward-stable solutions differ by rounding amplified by about the squared condition number, measured at
 * up to 5e-11 (about 6e-10 when the guard is switched off and those specifications are solved from the
 * normal equations), and below 1e-13 elsewhere. The largest errors measured are written to
 * {@code target/reference-reports/commons-math-ols-seed-*.txt}.
 */
class CommonsMathOlsReferenceTest {
    static final double RELATIVE = 1e-9;
    static final int ROWS = 240;
    static final String[] CATEGORIES = {"east", "north", "south", "west"};
    static final int GROUPS = 12;
    static final String PLAN = """
            {"data": "unused.csv", "decisions": [
              {"name": "outcome", "kind": "outcome", "alternatives": [
                {"label": "level", "column": "y"}, {"label": "log", "column": "ypos", "transform": "log"}]},
              {"name": "key", "kind": "predictor", "alternatives": [
                {"label": "x", "column": "x"}, {"label": "x alt", "column": "xalt"}]},
              {"name": "controls", "kind": "controls", "optional": ["c1", "c2", "c3", "c4", "zone"]},
              {"name": "rows", "kind": "sample", "alternatives": [{"label": "all"}, {"label": "c2 above", "keep": "c2 > -1.5"}]},
              {"name": "effects", "kind": "absorb", "alternatives": [
                {"label": "none", "columns": []}, {"label": "group", "columns": ["group"]}]}
            ]}""";

    /** Seeded data: numeric columns with NaN for missing cells, categorical ones as codes. */
    record Data(Map<String, double[]> numeric, int[] zone, int[] group, Table table) {
    }

    static Data data(long seed) {
        Random random = new Random(seed);
        double[] x = new double[ROWS];
        double[] xalt = new double[ROWS];
        double[] c1 = new double[ROWS];
        double[] c2 = new double[ROWS];
        double[] c3 = new double[ROWS];
        double[] c4 = new double[ROWS];
        double[] y = new double[ROWS];
        double[] ypos = new double[ROWS];
        int[] zone = new int[ROWS];
        int[] group = new int[ROWS];
        double[] groupEffect = new double[GROUPS];
        for (int g = 0; g < GROUPS; g++) {
            groupEffect[g] = random.nextGaussian();
        }
        for (int i = 0; i < ROWS; i++) {
            zone[i] = random.nextInt(CATEGORIES.length);
            group[i] = random.nextInt(GROUPS);
            x[i] = 3 + 2 * random.nextGaussian() + 0.5 * groupEffect[group[i]];
            xalt[i] = 0.9 * x[i] + 0.4 * random.nextGaussian();
            c1[i] = 0.7 * x[i] + random.nextGaussian();
            c2[i] = random.nextGaussian() + 0.3 * zone[i];
            c3[i] = c1[i] + c2[i] + 0.1 * random.nextGaussian();
            c4[i] = c1[i] + 0.5 * x[i] + 0.005 * random.nextGaussian();
            y[i] = 10 + 0.5 * x[i] + 0.3 * c1[i] - 0.2 * c2[i] + 0.4 * zone[i] + groupEffect[group[i]]
                    + random.nextGaussian();
            ypos[i] = Math.exp(0.2 * y[i]);
        }
        // missing cells, about 5% of each column, independently
        for (double[] column : new double[][] {xalt, c1, c2, c3, c4, y, ypos}) {
            for (int i = 0; i < ROWS; i++) {
                if (random.nextDouble() < 0.05) {
                    column[i] = Double.NaN;
                }
            }
        }
        for (int[] codes : new int[][] {zone, group}) {
            for (int i = 0; i < ROWS; i++) {
                if (random.nextDouble() < 0.04) {
                    codes[i] = -1;
                }
            }
        }
        Map<String, double[]> numeric = new TreeMap<>(Map.of("x", x, "xalt", xalt, "c1", c1, "c2", c2, "c3", c3,
                "c4", c4, "y", y, "ypos", ypos));
        List<Column> columns = new ArrayList<>();
        numeric.forEach((name, values) -> columns.add(new NumericColumn(name, values)));
        columns.add(new CategoricalColumn("zone", zone, List.of(CATEGORIES)));
        List<String> groupLevels = new ArrayList<>();
        for (int g = 0; g < GROUPS; g++) {
            groupLevels.add(String.format("g%02d", g + 1));
        }
        columns.add(new CategoricalColumn("group", group, groupLevels));
        return new Data(numeric, zone, group, new Table("seeded", columns));
    }

    @ParameterizedTest(name = "seed {0}")
    @ValueSource(longs = {11, 2024, 90210})
    void everySpecificationAgreesWithCommonsMathOls(long seed) {
        Data data = data(seed);
        Plan plan = new PlanReader(false).read(PLAN, ReferenceFiles.path("versions.txt").getParent());
        RunResult run = new MultiverseRunner(2).run(plan, data.table(), RunProgress.SILENT, null);
        ResultTable r = run.results();
        String[] outcomes = {"y", "ypos"};
        String[] keys = {"x", "xalt"};
        String[] optional = {"c1", "c2", "c3", "c4", "zone"};
        List<String> failures = new ArrayList<>();
        Map<String, Double> worst = new TreeMap<>();
        int spec = 0;
        for (int o = 0; o < 2; o++) {
            for (int k = 0; k < 2; k++) {
                for (int mask = 0; mask < 32; mask++) {
                    for (int sample = 0; sample < 2; sample++) {
                        for (int absorb = 0; absorb < 2; absorb++) {
                            List<String> controls = new ArrayList<>();
                            for (int j = 0; j < optional.length; j++) {
                                if ((mask >> j & 1) == 1) {
                                    controls.add(optional[j]);
                                }
                            }
                            String where = "seed " + seed + ", spec " + (spec + 1) + " (" + labels(plan, r, spec)
                                    + ")";
                            assertEquals(spec, r.specIndex(spec), where);
                            check(failures, worst, where, r, spec, data, outcomes[o], o == 1, keys[k], controls,
                                    sample == 1, absorb == 1);
                            spec++;
                        }
                    }
                }
            }
        }
        assertEquals(spec, r.size());
        AgreementReport.write("commons-math-ols-seed-" + seed + ".txt", "Commons Math 3.6.1 "
                + "OLSMultipleLinearRegression, largest relative errors; " + run.refitByQr() + " of " + r.size()
                + " specifications refit by QR", worst);
        assertTrue(failures.isEmpty(), failures.size() + " disagreements with Commons Math "
                + "OLSMultipleLinearRegression:\n" + String.join("\n", failures.subList(0, Math.min(20,
                        failures.size()))));
        assertTrue(run.refitByQr() > 0 && run.refitByQr() < r.size(), run.refitByQr() + " of " + r.size()
                + " specifications refit by QR; the nearly collinear ones should be, the others not");
    }

    private static String labels(Plan plan, ResultTable r, int slot) {
        long[] choices = new long[plan.decisions().size()];
        new SpecificationSpace(plan).decode(r.specIndex(slot), choices);
        List<String> out = new ArrayList<>();
        for (int d = 0; d < choices.length; d++) {
            Decision decision = plan.decisions().get(d);
            out.add(decision.label(choices[d]));
        }
        return String.join(" | ", out);
    }

    /** Refits one specification with Commons Math from its rows and compares. */
    private static void check(List<String> failures, Map<String, Double> worst, String where, ResultTable r, int slot, Data data,
            String outcome, boolean log, String key, List<String> controls, boolean keepRule, boolean absorb) {
        Map<String, double[]> num = data.numeric();
        List<Integer> rows = new ArrayList<>();
        for (int i = 0; i < ROWS; i++) {
            double c2 = num.get("c2")[i];
            boolean kept = !keepRule || !Double.isNaN(c2) && c2 > -1.5;
            boolean complete = !Double.isNaN(num.get(outcome)[i]) && !Double.isNaN(num.get(key)[i])
                    && (!absorb || data.group()[i] >= 0);
            for (String c : controls) {
                complete &= c.equals("zone") ? data.zone()[i] >= 0 : !Double.isNaN(num.get(c)[i]);
            }
            if (kept && complete) {
                rows.add(i);
            }
        }
        List<double[]> design = new ArrayList<>();
        design.add(column(num.get(key), rows));
        for (String c : controls) {
            if (c.equals("zone")) {
                design.addAll(dummies(data.zone(), rows));
            } else {
                design.add(column(num.get(c), rows));
            }
        }
        if (absorb) {
            design.addAll(dummies(data.group(), rows));
        }
        int n = rows.size();
        double[] y = new double[n];
        double[][] x = new double[n][design.size()];
        for (int i = 0; i < n; i++) {
            double v = num.get(outcome)[rows.get(i)];
            y[i] = log ? Math.log(v) : v;
            for (int j = 0; j < design.size(); j++) {
                x[i][j] = design.get(j)[i];
            }
        }
        OLSMultipleLinearRegression ols = new OLSMultipleLinearRegression();
        ols.newSampleData(y, x);
        double estimate = ols.estimateRegressionParameters()[1];
        double se = ols.estimateRegressionParametersStandardErrors()[1];
        double r2 = ols.calculateRSquared();
        if (!r.fitted(slot)) {
            failures.add(where + ": Forkscape status " + r.status(slot));
            return;
        }
        if (r.nObs(slot) != n || r.nParams(slot) != design.size() + 1) {
            failures.add(where + ": rows and coefficients " + r.nObs(slot) + ", " + r.nParams(slot)
                    + "; Commons Math design " + n + ", " + (design.size() + 1));
        }
        compare(failures, worst, where, "estimate", r.estimate(slot), estimate);
        compare(failures, worst, where, "classical std_error", r.stdError(slot), se);
        compare(failures, worst, where, "r2", r.r2(slot), r2);
    }

    private static void compare(List<String> failures, Map<String, Double> worst, String where, String what,
            double actual, double expected) {
        double err = Agreement.relativeError(actual, expected);
        worst.merge(what, err, Math::max);
        if (!(err <= RELATIVE)) {
            failures.add(String.format("%s: %s %.17g, Commons Math OLSMultipleLinearRegression %.17g (relative error "
                    + "%.2e > %.0e)", where, what, actual, expected, err, RELATIVE));
        }
    }

    static double[] column(double[] values, List<Integer> rows) {
        double[] out = new double[rows.size()];
        for (int i = 0; i < out.length; i++) {
            out[i] = values[rows.get(i)];
        }
        return out;
    }

    /** One 0/1 column per level present in the rows except the first present (the reference level). */
    static List<double[]> dummies(int[] codes, List<Integer> rows) {
        TreeSet<Integer> present = new TreeSet<>();
        rows.forEach(i -> present.add(codes[i]));
        present.pollFirst();
        List<double[]> out = new ArrayList<>();
        for (int level : present) {
            double[] d = new double[rows.size()];
            for (int i = 0; i < d.length; i++) {
                d[i] = codes[rows.get(i)] == level ? 1 : 0;
            }
            out.add(d);
        }
        return out;
    }
}
