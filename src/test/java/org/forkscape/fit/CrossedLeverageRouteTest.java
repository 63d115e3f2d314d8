package org.forkscape.fit;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.net.URISyntaxException;
import java.nio.file.Path;
import org.apache.commons.math3.linear.Array2DRowRealMatrix;
import org.apache.commons.math3.linear.RealMatrix;
import org.apache.commons.math3.linear.SingularValueDecomposition;
import org.forkscape.data.CategoricalColumn;
import org.forkscape.data.CsvTableReader;
import org.forkscape.data.NumericColumn;
import org.forkscape.data.Table;
import org.forkscape.plan.Plan;
import org.forkscape.plan.PlanReader;
import org.junit.jupiter.api.Test;

/**
 * The route of HC2 and HC3 beside two absorbed columns, on the reference plan {@code school-panel-leverage-plan.json}
 * (whose every specification {@code reference.RTwoWayLeverageReferenceTest} holds against R): the key fit takes the
 * row pass, and its standard error is that of Apache Commons Math 3.6.1 on the explicit design sqrt(W) [D1 D2 X]
 * (pseudo-inverse by the singular value decomposition, leverages the diagonal of Z Z^+), not the one whose
 * leverages leave out the crossed dummies' part (w_i/W in its place, the share of an intercept): the test fails if
 * that part is dropped. Unweighted and weighted, with and without a control the term effects make redundant (which
 * sends the fit to the QR refit, whose rows the leverages then read).
 */
class CrossedLeverageRouteTest {
    /** As the reference tests' standard errors (measured here below 1e-12). */
    private static final double RELATIVE = 1e-9;
    private static final int STEADY_PUPILS = 1;
    private static final int BOTH = 1;

    private final Table table;
    private final SpecificationModels models;

    CrossedLeverageRouteTest() throws URISyntaxException {
        Path path = Path.of(CrossedLeverageRouteTest.class.getResource("/reference/school-panel-leverage-plan.json").toURI());
        Plan plan = new PlanReader(false).read(path);
        table = new CsvTableReader().read(plan.dataFile());
        models = new SpecificationModels(plan, table);
    }

    @Test
    void hc3AndHc2TakeTheCrossedDummiesLeverages() {
        // controls mask 2 = class_size (constant within terms); weights 0 unweighted, 1 design; errors 0 HC2, 1 HC3
        for (long controls : new long[] {0, 2}) {
            for (int weights = 0; weights <= 1; weights++) {
                for (int errors = 0; errors <= 1; errors++) {
                    check(new long[] {0, 0, controls, STEADY_PUPILS, BOTH, weights, errors});
                }
            }
        }
    }

    private void check(long[] choices) {
        String where = java.util.Arrays.toString(choices);
        boolean hc3 = choices[6] == 1;
        boolean weighted = choices[5] == 1;
        DataVariant variant = models.variant(models.variantKey(models.variantOrdinal(choices)));
        assertTrue(variant.absorbsSeveral, where);
        SpecificationModel spec = models.model(choices);
        KeyFit fit = new SpecificationFitter().fit(variant, spec);
        assertTrue(fit.ok(), where + ": " + fit.statusText());
        assertEquals(VarianceRoute.ROW_PASS, fit.route(), where);
        assertEquals(choices[2] != 0, fit.refitByQr(), where + ": the redundant control takes the QR refit");

        // the explicit design over the specification's rows: pupil and term dummies, the controls, the key
        int[] rows = variant.moments(spec.variableMask()).usableRows();
        int[] pupil = ((CategoricalColumn) table.column("pupil")).codes();
        int[] term = ((CategoricalColumn) table.column("term")).codes();
        int pupils = ((CategoricalColumn) table.column("pupil")).levels().size();
        int terms = ((CategoricalColumn) table.column("term")).levels().size();
        double[] y = ((NumericColumn) table.column("score")).values();
        double[] x = ((NumericColumn) table.column("tutoring_hours")).values();
        double[] classSize = ((NumericColumn) table.column("class_size")).values();
        double[] w = ((NumericColumn) table.column("design_weight")).values();
        int n = rows.length;
        int dummies = pupils + terms;
        int p = dummies + (choices[2] != 0 ? 1 : 0) + 1;
        RealMatrix z = new Array2DRowRealMatrix(n, p);
        RealMatrix d = new Array2DRowRealMatrix(n, dummies);
        double[] target = new double[n];
        double total = 0;
        for (int i = 0; i < n; i++) {
            int r = variant.tableRows[rows[i]];
            double root = weighted ? Math.sqrt(w[r]) : 1;
            total += weighted ? w[r] : 1;
            z.setEntry(i, pupil[r], root);
            z.setEntry(i, pupils + term[r], root);
            d.setEntry(i, pupil[r], root);
            d.setEntry(i, pupils + term[r], root);
            if (choices[2] != 0) {
                z.setEntry(i, dummies, root * classSize[r]);
            }
            z.setEntry(i, p - 1, root * x[r]);
            target[i] = root * y[r];
        }
        RealMatrix pinv = new SingularValueDecomposition(z).getSolver().getInverse();
        RealMatrix pinvD = new SingularValueDecomposition(d).getSolver().getInverse();
        double[] b = pinv.operate(target);
        assertEquals(b[p - 1], fit.estimate(), 1e-9 * Math.abs(b[p - 1]), where + ": estimate, Commons Math SVD");
        double[] e = target.clone();
        for (int i = 0; i < n; i++) {
            for (int j = 0; j < p; j++) {
                e[i] -= z.getEntry(i, j) * b[j];
            }
        }
        double exact = 0;
        double withoutDummies = 0;
        for (int i = 0; i < n; i++) {
            double h = 0;
            for (int j = 0; j < p; j++) {
                h += z.getEntry(i, j) * pinv.getEntry(j, i);
            }
            double hD = 0;
            for (int j = 0; j < dummies; j++) {
                hD += d.getEntry(i, j) * pinvD.getEntry(j, i);
            }
            double share = (weighted ? w[variant.tableRows[rows[i]]] : 1) / total;
            double score = pinv.getEntry(p - 1, i) * e[i];
            exact += score * score / divisor(h, hc3);
            withoutDummies += score * score / divisor(h - hD + share, hc3);
        }
        double se = Math.sqrt(exact);
        double relative = Math.abs(fit.stdError() - se) / se;
        assertTrue(relative <= RELATIVE, where + ": standard error " + fit.stdError() + ", Commons Math on the "
                + "explicit dummies " + se + " (relative " + relative + ")");
        double dropped = Math.abs(Math.sqrt(withoutDummies) - se) / se;
        assertTrue(dropped > 1e-2, where + ": leaving the dummies' leverages out would move the standard error by "
                + dropped + " only, too little for this check to see it");
    }

    private static double divisor(double h, boolean hc3) {
        return hc3 ? (1 - h) * (1 - h) : 1 - h;
    }
}
