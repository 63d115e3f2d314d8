package org.forkscape.fit;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Path;
import java.util.ArrayList;
import java.util.EnumMap;
import java.util.List;
import java.util.Map;
import java.util.SplittableRandom;
import java.util.TreeMap;
import org.forkscape.data.CategoricalColumn;
import org.forkscape.data.Column;
import org.forkscape.data.NumericColumn;
import org.forkscape.data.Table;
import org.forkscape.plan.Plan;
import org.forkscape.plan.PlanReader;
import org.forkscape.reference.Agreement;
import org.forkscape.reference.AgreementReport;
import org.forkscape.reference.ExactLeastSquares;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.ValueSource;

/**
 * Every route of the engine against exact arithmetic on a design built to break them: two controls that
 * are near-copies of each other, b = a + gap v, with v independent noise that neither the key predictor
 * nor the outcome depends on. As the gap shrinks the residual's coefficients and the key row of the
 * inverse grow on a and b with opposite signs, which is what makes contractions of stored moments
 * cancel. The gaps run from 0.1 down to 3e-7, just above the collinearity rule's threshold (a column is
 * dropped when its remaining norm is below 1e-7 of its norm about the mean: here about the gap).
 *
 * <p>Each specification (every subset of the controls a, b, c; classical, HC0-HC3 and CR1 errors; with
 * and without absorbed zone effects) is fitted by the fitter that may take the moment routes, with
 * every variant told that they pay, and by the one that always passes over rows; both are compared with
 * {@link ExactLeastSquares} (90-digit decimal arithmetic on the same doubles). Tolerance 1e-9 relative
 * for the estimate and the standard error: the engine's promise. The test also asserts which routes were
 * taken, so that a guard that declined everything could not pass it.
 */
class NearCopyExactArithmeticTest {
    static final double RELATIVE = 1e-9;
    static final int ROWS = 240;
    static final int ZONES = 5;
    static final int CLUSTERS = 16;

    private static final String PLAN = "{\"data\": \"unused.csv\", \"decisions\": ["
            + "{\"name\": \"o\", \"kind\": \"outcome\", \"alternatives\": [{\"label\": \"y\", \"column\": \"y\"}]},"
            + "{\"name\": \"k\", \"kind\": \"predictor\", \"alternatives\": [{\"label\": \"x\", \"column\": \"x\"}]},"
            + "{\"name\": \"c\", \"kind\": \"controls\", \"optional\": [\"a\", \"b\", \"c\"]},"
            + "{\"name\": \"e\", \"kind\": \"errors\", \"alternatives\": [\"classical\", \"HC0\", \"HC1\", \"HC2\","
            + "  \"HC3\", \"cluster:site\"]},"
            + "{\"name\": \"f\", \"kind\": \"absorb\", \"alternatives\": [{\"label\": \"none\", \"columns\": []},"
            + "  {\"label\": \"zone\", \"columns\": [\"zone\"]}]}]}";
    private static final String[] ERRORS = {"classical", "HC0", "HC1", "HC2", "HC3", "cluster:site"};

    /** River-monitoring stations: a, a near-copy b, another reading c, the key x, a zone and a site. */
    static Table stations(int rows, double gap, long seed) {
        SplittableRandom r = new SplittableRandom(seed);
        double[] y = new double[rows];
        double[] x = new double[rows];
        double[] a = new double[rows];
        double[] b = new double[rows];
        double[] c = new double[rows];
        int[] zone = new int[rows];
        int[] site = new int[rows];
        double[] siteEffect = new double[CLUSTERS];
        for (int g = 0; g < CLUSTERS; g++) {
            siteEffect[g] = r.nextGaussian();
        }
        for (int i = 0; i < rows; i++) {
            zone[i] = i % ZONES;
            site[i] = r.nextInt(CLUSTERS);
            a[i] = r.nextGaussian();
            b[i] = a[i] + gap * r.nextGaussian();
            c[i] = r.nextGaussian() + 0.3 * a[i];
            x[i] = 0.5 * a[i] + 0.4 * c[i] + 0.2 * zone[i] + r.nextGaussian();
            y[i] = 1 + 0.7 * x[i] + 0.5 * a[i] - 0.3 * c[i] + 0.4 * zone[i] + siteEffect[site[i]]
                    + r.nextGaussian() * (1 + Math.abs(x[i]));
        }
        List<String> zones = new ArrayList<>();
        for (int z = 0; z < ZONES; z++) {
            zones.add("z" + z);
        }
        List<String> sites = new ArrayList<>();
        for (int g = 0; g < CLUSTERS; g++) {
            sites.add(String.format("s%02d", g));
        }
        List<Column> cols = new ArrayList<>();
        cols.add(new NumericColumn("y", y));
        cols.add(new NumericColumn("x", x));
        cols.add(new NumericColumn("a", a));
        cols.add(new NumericColumn("b", b));
        cols.add(new NumericColumn("c", c));
        cols.add(new CategoricalColumn("zone", zone, zones));
        cols.add(new CategoricalColumn("site", site, sites));
        return new Table("stations", cols);
    }

    @ParameterizedTest(name = "gap {0}")
    @ValueSource(doubles = {1e-1, 1e-2, 1e-3, 1e-4, 3e-5, 1e-5, 1e-6, 3e-7})
    void everyRouteMatchesExactArithmetic(double gap) {
        Table t = stations(ROWS, gap, 41);
        Plan plan = new PlanReader(false).read(PLAN, Path.of("."));
        SpecificationModels models = new SpecificationModels(plan, t);
        Map<VarianceRoute, Integer> routes = new EnumMap<>(VarianceRoute.class);
        int refits = 0;
        double worst = 0;
        String worstAt = "";
        Map<String, Double> worstByRoute = new TreeMap<>();
        long[] choices = new long[models.space().decisionCount()];
        double[][] columns = {values(t, "a"), values(t, "b"), values(t, "c")};
        for (int v = 0; v < models.variantCount(); v++) {
            DataVariant variant = models.variant(models.variantKey(v));
            // tell the variant that the moment routes pay, so that only their guards can decline them
            variant.expect(1L << 40, Map.of("site", 1L << 40), 3, null);
            assertEquals(v == 0, variant.useFourthMoments, "fourth moments serve the variant without fixed effects");
            assertTrue(variant.usesClusterMoments("site"));
            SpecificationFitter fast = new SpecificationFitter(true);
            SpecificationFitter rowPass = new SpecificationFitter(false);
            for (long index = 0; index < models.space().size(); index++) {
                models.space().decode(index, choices);
                if (models.variantOrdinal(choices) != v) {
                    continue;
                }
                long subset = choices[2];
                List<double[]> regressors = new ArrayList<>();
                for (int j = 0; j < 3; j++) {
                    if ((subset & (1L << j)) != 0) {
                        regressors.add(columns[j]);
                    }
                }
                regressors.add(values(t, "x"));
                ExactLeastSquares.KeyResult exact = ExactLeastSquares.fit(regressors.toArray(new double[0][]),
                        values(t, "y"), v == 1 ? codes(t, "zone") : null, codes(t, "site"));
                String type = ERRORS[(int) choices[3]];
                SpecificationModel model = models.model(choices);
                for (SpecificationFitter fitter : new SpecificationFitter[] {fast, rowPass}) {
                    KeyFit fit = fitter.fit(variant, model);
                    assertEquals(FitStatus.OK, fit.status(), "specification " + (index + 1));
                    assertEquals(exact.k(), fit.nParams(), "coefficients, specification " + (index + 1));
                    routes.merge(fit.route(), 1, Integer::sum);
                    if (fit.refitByQr()) {
                        refits++;
                    }
                    double e = Math.max(Agreement.relativeError(fit.estimate(), exact.estimate()),
                            Agreement.relativeError(fit.stdError(), exact.stdError(type)));
                    worstByRoute.merge(fit.route() + (fit.refitByQr() ? " after a QR refit" : " after Cholesky"),
                            e, Math::max);
                    if (e > worst) {
                        worst = e;
                        worstAt = String.format("specification %d (%s, controls %s, %s, route %s%s)", index + 1,
                                type, Long.toBinaryString(subset), v == 1 ? "zone effects" : "no fixed effects",
                                fit.route(), fit.refitByQr() ? ", refit by QR" : "");
                    }
                }
            }
        }
        AgreementReport.write(String.format("near-copy-gap-%.0e.txt", gap), String.format("largest relative error "
                + "of estimate or standard error against 90-digit arithmetic, near-copy gap %.0e, by route", gap),
                worstByRoute);
        assertTrue(worst <= RELATIVE, String.format("gap %.0e: worst relative error %.2e at %s; tolerance %.0e "
                + "(exact 90-digit arithmetic on the same doubles)", gap, worst, worstAt, RELATIVE));
        // the moment routes serve the well-conditioned subsets at every gap, and the row pass the rest
        assertTrue(routes.getOrDefault(VarianceRoute.FOURTH_MOMENTS, 0) >= 8, "fourth moments taken: " + routes);
        assertTrue(routes.getOrDefault(VarianceRoute.CLUSTER_CELLS, 0) >= 8, "cluster cells taken: " + routes);
        assertTrue(routes.getOrDefault(VarianceRoute.ROW_PASS, 0) >= 48, "row pass taken: " + routes);
        assertTrue(routes.getOrDefault(VarianceRoute.CLASSICAL, 0) >= 16, "classical: " + routes);
        if (gap <= 1e-4) {
            assertTrue(refits > 0, "near-copies this close are refit by QR");
        }
    }

    static double[] values(Table t, String column) {
        return ((NumericColumn) t.column(column)).values();
    }

    static int[] codes(Table t, String column) {
        return ((CategoricalColumn) t.column(column)).codes();
    }
}
