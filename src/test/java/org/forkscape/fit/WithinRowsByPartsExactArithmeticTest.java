package org.forkscape.fit;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Path;
import java.util.ArrayList;
import java.util.EnumMap;
import java.util.List;
import java.util.Map;
import org.forkscape.data.CategoricalColumn;
import org.forkscape.data.Table;
import org.forkscape.plan.Plan;
import org.forkscape.plan.PlanReader;
import org.forkscape.reference.Agreement;
import org.forkscape.reference.AgreementReport;
import org.forkscape.reference.ExactLeastSquares;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.ValueSource;

/**
 * The routes without rows beside two absorbed columns held in parts, against exact arithmetic: the near-copy
 * stations of {@link WithinRowsExactArithmeticTest} (zone and season absorbed, unweighted and with analytic
 * weights) cut into 3 parts by the absorbed column with more levels, as the Spark runner partitions them, so
 * that the fourth moments and the clusters' cells are those the parts sum from their within values
 * ({@link CrossedEffectsByParts.WithinPass}) and the site x season intersection, which spans parts, is counted
 * from the parts' keys. The reference is {@link ExactLeastSquares} in 90-digit decimals on the same doubles
 * with both sets of dummies explicit; tolerance 1e-9 relative, the engine's promise. The routes are asserted:
 * HC0, HC1, site and site x season clusters from the parts' structures for every specification whose controls
 * are not both near-copies (reading clusters, one row each, do not pay for cells there and take the row
 * passes), and at small gaps the rounding-error guard sends some near-copy specifications to the row passes
 * over the parts' within values.
 */
class WithinRowsByPartsExactArithmeticTest {
    private static final String PLAN = "{\"data\": \"unused.csv\", \"decisions\": ["
            + "{\"name\": \"o\", \"kind\": \"outcome\", \"alternatives\": [{\"label\": \"y\", \"column\": \"y\"}]},"
            + "{\"name\": \"k\", \"kind\": \"predictor\", \"alternatives\": [{\"label\": \"x\", \"column\": \"x\"}]},"
            + "{\"name\": \"c\", \"kind\": \"controls\", \"optional\": [\"a\", \"b\", \"c\"]},"
            + "{\"name\": \"e\", \"kind\": \"errors\", \"alternatives\": [\"HC0\", \"HC1\", \"cluster:site\","
            + "  \"cluster:reading\", \"cluster:site+season\"]},"
            + "{\"name\": \"f\", \"kind\": \"absorb\", \"alternatives\": [{\"label\": \"zone and season\","
            + "  \"columns\": [\"zone\", \"season\"]}]},"
            + "{\"name\": \"w\", \"kind\": \"weights\", \"alternatives\": [{\"label\": \"unweighted\"},"
            + "  {\"label\": \"volume\", \"column\": \"volume\"}]}]}";
    private static final String[] ERRORS = {"HC0", "HC1", "cluster:site", "cluster:reading", "cluster:site+season"};

    @ParameterizedTest(name = "gap {0}")
    @ValueSource(doubles = {1e-1, 1e-3, 1e-5, 1e-6, 3e-7})
    void routesByPartsMatchExactArithmetic(double gap) {
        Table t = WithinRowsExactArithmeticTest.stations(gap);
        Plan plan = new PlanReader(false).read(PLAN, Path.of("."));
        SpecificationModels models = new SpecificationModels(plan, t);
        String cutBy = ((CategoricalColumn) t.column("zone")).levels().size()
                >= ((CategoricalColumn) t.column("season")).levels().size() ? "zone" : "season";
        VariantSource parts = TwoWayEffectsByPartsTest.source(plan, t, cutBy, 3);
        int[] zone = NearCopyExactArithmeticTest.codes(t, "zone");
        int[] season = NearCopyExactArithmeticTest.codes(t, "season");
        int[] site = NearCopyExactArithmeticTest.codes(t, "site");
        int[] reading = NearCopyExactArithmeticTest.codes(t, "reading");
        int seasons = ((CategoricalColumn) t.column("season")).levels().size();
        int[] siteSeason = new int[site.length];
        for (int i = 0; i < site.length; i++) {
            siteSeason[i] = site[i] * seasons + season[i];
        }
        double[][] columns = {NearCopyExactArithmeticTest.values(t, "a"), NearCopyExactArithmeticTest.values(t, "b"),
            NearCopyExactArithmeticTest.values(t, "c")};
        double[] y = NearCopyExactArithmeticTest.values(t, "y");
        double[] volume = NearCopyExactArithmeticTest.values(t, "volume");
        Map<VarianceRoute, Integer> routes = new EnumMap<>(VarianceRoute.class);
        Map<String, Double> worstByRoute = new java.util.TreeMap<>();
        int declinedNearCopies = 0;
        double worst = 0;
        String worstAt = "";
        long many = 1L << 40;
        long[] choices = new long[models.space().decisionCount()];
        for (int v = 0; v < models.variantCount(); v++) {
            DataVariant variant = parts.variant(models.variantKey(v), null);
            assertFalse(variant.holdsRows(), "the variant is held in parts");
            variant.expect(many, Map.of("site", many, "reading", many, "season", many,
                    "site" + ClusterComponents.JOIN + "season", many), 3, null);
            assertTrue(variant.useFourthMoments, "fourth moments of the parts' within values");
            assertTrue(variant.usesClusterMoments("site") && variant.usesClusterMoments("season")
                    && variant.usesClusterMoments("site" + ClusterComponents.JOIN + "season"), "the parts' cells");
            double[] weight = variant.weight == null && !variant.weighted ? null : volume;
            List<SpecificationModel> specs = new ArrayList<>();
            List<long[]> chosen = new ArrayList<>();
            for (long index = 0; index < models.space().size(); index++) {
                models.space().decode(index, choices);
                if (models.variantOrdinal(choices) == v) {
                    specs.add(models.model(choices));
                    chosen.add(choices.clone());
                }
            }
            KeyFit[] fits = RowPassesByParts.fitEach(new SpecificationFitter().deferringRowPasses().deferringRefits(),
                    variant, specs, () -> { });
            assertTrue(variant.partsFourthMoments() > 0 && variant.partsClusterCells() > 0,
                    "the parts summed the structures");
            for (int s = 0; s < specs.size(); s++) {
                long[] c = chosen.get(s);
                List<double[]> regressors = new ArrayList<>();
                for (int j = 0; j < 3; j++) {
                    if ((c[2] & (1L << j)) != 0) {
                        regressors.add(columns[j]);
                    }
                }
                regressors.add(NearCopyExactArithmeticTest.values(t, "x"));
                double[][] x = regressors.toArray(new double[0][]);
                String type = ERRORS[(int) c[3]];
                int[][] more = {season};
                ExactLeastSquares.KeyResult exact = ExactLeastSquares.fitWithEffects(x, y, weight, zone, more,
                        type.equals("cluster:reading") ? reading : site);
                double expected = exact.stdError(type);
                if (type.equals("cluster:site+season")) {
                    expected = Math.sqrt(exact.cr1Variance()
                            + ExactLeastSquares.fitWithEffects(x, y, weight, zone, more, season).cr1Variance()
                            - ExactLeastSquares.fitWithEffects(x, y, weight, zone, more, siteSeason).cr1Variance());
                }
                KeyFit fit = fits[s];
                boolean nearCopies = (c[2] & 3) == 3;
                String where = String.format("gap %.0e, %s, controls %s, %s, route %s", gap, type,
                        Long.toBinaryString(c[2]), weight == null ? "unweighted" : "weighted", fit.route());
                assertEquals(FitStatus.OK, fit.status(), where);
                assertEquals(exact.k(), fit.nParams(), where);
                routes.merge(fit.route(), 1, Integer::sum);
                if (!nearCopies && !type.equals("cluster:reading")) {
                    assertTrue(fit.route() != VarianceRoute.ROW_PASS, where + ": the parts' structures serve it");
                } else if (nearCopies && fit.route() == VarianceRoute.ROW_PASS) {
                    declinedNearCopies++;
                }
                double e = Math.max(Agreement.relativeError(fit.estimate(), exact.estimate()),
                        Agreement.relativeError(fit.stdError(), expected));
                worstByRoute.merge(fit.route() + (weight == null ? ", unweighted" : ", weighted"), e, Math::max);
                if (e > worst) {
                    worst = e;
                    worstAt = where;
                }
            }
        }
        AgreementReport.write(String.format("within-rows-by-parts-gap-%.0e.txt", gap), String.format("largest "
                + "relative error of estimate or standard error against 90-digit arithmetic beside two absorbed "
                + "columns held in 3 parts, near-copy gap %.0e, by route", gap), worstByRoute);
        assertTrue(worst <= NearCopyExactArithmeticTest.RELATIVE, String.format("worst relative error %.2e at %s; "
                + "tolerance 1e-9 (exact 90-digit arithmetic on the same doubles)", worst, worstAt));
        assertTrue(routes.getOrDefault(VarianceRoute.FOURTH_MOMENTS, 0) >= 24, "fourth moments: " + routes);
        assertTrue(routes.getOrDefault(VarianceRoute.CLUSTER_CELLS, 0) >= 24, "cluster cells: " + routes);
        if (gap <= 1e-5) {
            assertTrue(declinedNearCopies > 0, "the guard declines near-copies this close: " + routes);
        }
    }
}
