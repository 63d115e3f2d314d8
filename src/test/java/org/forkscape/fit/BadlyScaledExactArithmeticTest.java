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
import org.junit.jupiter.api.Test;

/**
 * Badly scaled columns, without fixed effects: offsets of 1e9 and spreads from 1e-6 to 1e9 (air-quality
 * sensors reporting in raw counts, in parts per trillion on a large baseline and in micrograms), the
 * key predictor nearly a combination of the controls and the outcome nearly explained (R-squared above
 * 0.99999), with sensor drifts shared by the key, a control and the outcome. Every specification, every
 * error type and every route the variant offers (told that the moment routes pay) against exact
 * 90-digit arithmetic on the same doubles, and against the explorer's full fit (a QR refit from rows).
 * Tolerances: 1e-9 relative against exact arithmetic, the engine's promise; 1e-10 against the QR refit,
 * README's claim for every fast path.
 */
class BadlyScaledExactArithmeticTest {
    static final int ROWS = 400;
    static final int CLUSTERS = 20;

    private static final String PLAN = "{\"data\": \"unused.csv\", \"decisions\": ["
            + "{\"name\": \"o\", \"kind\": \"outcome\", \"alternatives\": [{\"label\": \"y\", \"column\": \"y\"}]},"
            + "{\"name\": \"k\", \"kind\": \"predictor\", \"alternatives\": [{\"label\": \"x\", \"column\": \"x\"}]},"
            + "{\"name\": \"c\", \"kind\": \"controls\", \"optional\": [\"counts\", \"trace\", \"mass\"]},"
            + "{\"name\": \"e\", \"kind\": \"errors\", \"alternatives\": [\"classical\", \"HC0\", \"HC1\", \"HC2\","
            + "  \"HC3\", \"cluster:sensor\"]}]}";

    static Table sensors() {
        SplittableRandom r = new SplittableRandom(19);
        double[] y = new double[ROWS];
        double[] x = new double[ROWS];
        double[] counts = new double[ROWS];
        double[] trace = new double[ROWS];
        double[] mass = new double[ROWS];
        int[] sensor = new int[ROWS];
        double[] drift = new double[CLUSTERS];
        for (int g = 0; g < CLUSTERS; g++) {
            drift[g] = r.nextGaussian();
        }
        for (int i = 0; i < ROWS; i++) {
            sensor[i] = r.nextInt(CLUSTERS);
            double g1 = r.nextGaussian();
            double g2 = r.nextGaussian();
            double g3 = r.nextGaussian();
            double g4 = 0.02 * (r.nextGaussian() + 0.5 * drift[sensor[i]]);
            counts[i] = 1e9 + 1e3 * (g1 + 20 * drift[sensor[i]]);
            trace[i] = 1e9 + 1e-6 * (g2 + 0.2 * g1);
            mass[i] = 1e9 * (g3 - 0.3 * g2);
            x[i] = 1e9 + 1e2 * (0.4 * g1 + 0.3 * g3 + g4);
            y[i] = 2e9 + 1e2 * (0.7 * (0.4 * g1 + 0.3 * g3 + g4) + 0.5 * g1 - 0.4 * g2 + 0.2 * g3
                    + 0.001 * (drift[sensor[i]] + (1 + Math.abs(g4)) * r.nextGaussian()));
        }
        List<String> names = new ArrayList<>();
        for (int g = 0; g < CLUSTERS; g++) {
            names.add(String.format("sensor%02d", g));
        }
        List<Column> cols = new ArrayList<>();
        cols.add(new NumericColumn("y", y));
        cols.add(new NumericColumn("x", x));
        cols.add(new NumericColumn("counts", counts));
        cols.add(new NumericColumn("trace", trace));
        cols.add(new NumericColumn("mass", mass));
        cols.add(new CategoricalColumn("sensor", sensor, names));
        return new Table("sensors", cols);
    }

    @Test
    void everyRouteMatchesExactArithmeticAndTheFullFit() {
        Table t = sensors();
        Plan plan = new PlanReader(false).read(PLAN, Path.of("."));
        SpecificationModels models = new SpecificationModels(plan, t);
        DataVariant variant = models.variant(models.variantKey(0));
        variant.expect(1L << 40, Map.of("sensor", 1L << 40), 3, null);
        assertTrue(variant.useFourthMoments && variant.usesClusterMoments("sensor"));
        String[] errors = {"classical", "HC0", "HC1", "HC2", "HC3", "cluster:sensor"};
        String[] controls = {"counts", "trace", "mass"};
        FullFitter full = new FullFitter();
        Map<VarianceRoute, Integer> routes = new EnumMap<>(VarianceRoute.class);
        Map<String, Double> worst = new TreeMap<>();
        long[] choices = new long[models.space().decisionCount()];
        int[] sensor = ((CategoricalColumn) t.column("sensor")).codes();
        for (long index = 0; index < models.space().size(); index++) {
            models.space().decode(index, choices);
            List<double[]> regressors = new ArrayList<>();
            for (int j = 0; j < 3; j++) {
                if ((choices[2] & (1L << j)) != 0) {
                    regressors.add(NearCopyExactArithmeticTest.values(t, controls[j]));
                }
            }
            regressors.add(NearCopyExactArithmeticTest.values(t, "x"));
            ExactLeastSquares.KeyResult exact = ExactLeastSquares.fit(regressors.toArray(new double[0][]),
                    NearCopyExactArithmeticTest.values(t, "y"), null, sensor);
            String type = errors[(int) choices[3]];
            FullFit refit = full.fit(plan, models, index);
            SpecificationModel model = models.model(choices);
            for (SpecificationFitter fitter : new SpecificationFitter[] {new SpecificationFitter(true),
                    new SpecificationFitter(false)}) {
                KeyFit fit = fitter.fit(variant, model);
                String where = String.format("specification %d (%s, route %s)", index + 1, type, fit.route());
                assertEquals(FitStatus.OK, fit.status(), where);
                routes.merge(fit.route(), 1, Integer::sum);
                double exactError = Math.max(Agreement.relativeError(fit.estimate(), exact.estimate()),
                        Agreement.relativeError(fit.stdError(), exact.stdError(type)));
                double refitError = Agreement.relativeError(fit.stdError(), refit.key().stdError());
                worst.merge("against exact arithmetic, " + fit.route(), exactError, Math::max);
                worst.merge("against the QR refit, " + fit.route(), refitError, Math::max);
                assertTrue(exactError <= 1e-9, where + ": relative error " + exactError + " against 90-digit arithmetic");
                assertTrue(refitError <= 1e-10, where + ": relative difference " + refitError + " to the QR refit");
            }
        }
        AgreementReport.write("badly-scaled.txt", "largest relative error of estimate or standard error, offsets 1e9 "
                + "and spreads 1e-6 to 1e9, by route", worst);
        assertTrue(routes.getOrDefault(VarianceRoute.FOURTH_MOMENTS, 0) > 0, "routes " + routes);
        assertTrue(routes.getOrDefault(VarianceRoute.CLUSTER_CELLS, 0) > 0, "routes " + routes);
    }
}
