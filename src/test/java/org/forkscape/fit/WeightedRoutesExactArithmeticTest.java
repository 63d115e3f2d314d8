package org.forkscape.fit;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Path;
import java.util.ArrayList;
import java.util.EnumMap;
import java.util.List;
import java.util.Map;
import org.forkscape.data.Table;
import org.forkscape.plan.Plan;
import org.forkscape.plan.PlanReader;
import org.forkscape.reference.Agreement;
import org.forkscape.reference.ExactLeastSquares;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.ValueSource;

/**
 * The routes without rows of a weighted variant with none or one absorbed column against exact arithmetic on
 * the near-copy design of {@link NearCopyExactArithmeticTest} with analytic weights: HC0 and HC1 from fourth
 * moments weighted by w^2 at every order (no fixed effects; beside zone effects the row pass, by design),
 * and from the per-cluster cells (sum w z z', sum w z and the weight total per (cluster, level) cell,
 * weighted level means as offsets) CR1 by site and two-way CR1 by site and season (Cameron, Gelbach &amp; Miller 2011, Journal of Business &amp; Economic Statistics
 * 29(2)), without fixed effects and with zone effects absorbed, by the fitter that may take the cells (told
 * that they pay) and by the one that always passes over rows, against {@link ExactLeastSquares} with the
 * weights and the dummies explicit (90-digit decimals on the same doubles). Tolerance 1e-9 relative, the
 * engine's promise. The routes are asserted: a route without rows serves every specification whose controls
 * are not both near-copies (but HC0/HC1 and the two-way errors beside zone effects, see below), and the guard
 * declines some of those that are at small gaps.
 */
class WeightedRoutesExactArithmeticTest {
    private static final int SEASONS = 6;
    private static final String PLAN = "{\"data\": \"unused.csv\", \"decisions\": ["
            + "{\"name\": \"o\", \"kind\": \"outcome\", \"alternatives\": [{\"label\": \"y\", \"column\": \"y\"}]},"
            + "{\"name\": \"k\", \"kind\": \"predictor\", \"alternatives\": [{\"label\": \"x\", \"column\": \"x\"}]},"
            + "{\"name\": \"c\", \"kind\": \"controls\", \"optional\": [\"a\", \"b\", \"c\"]},"
            + "{\"name\": \"e\", \"kind\": \"errors\", \"alternatives\": [\"cluster:site\", \"cluster:site+season\", \"HC0\","
            + "  \"HC1\"]},"
            + "{\"name\": \"f\", \"kind\": \"absorb\", \"alternatives\": [{\"label\": \"none\", \"columns\": []},"
            + "  {\"label\": \"zone\", \"columns\": [\"zone\"]}]},"
            + "{\"name\": \"w\", \"kind\": \"weights\", \"alternatives\": [{\"label\": \"volume\", \"column\": \"volume\"}]}]}";

    @ParameterizedTest(name = "gap {0}")
    @ValueSource(doubles = {1e-1, 1e-3, 1e-5, 1e-6, 3e-7})
    void weightedCellsMatchExactArithmetic(double gap) {
        Table t = WithinRowsExactArithmeticTest.stations(gap);
        Plan plan = new PlanReader(false).read(PLAN, Path.of("."));
        SpecificationModels models = new SpecificationModels(plan, t);
        int[] zone = NearCopyExactArithmeticTest.codes(t, "zone");
        int[] season = NearCopyExactArithmeticTest.codes(t, "season");
        int[] site = NearCopyExactArithmeticTest.codes(t, "site");
        int[] siteSeason = new int[site.length];
        for (int i = 0; i < site.length; i++) {
            siteSeason[i] = site[i] * SEASONS + season[i];
        }
        double[][] columns = {NearCopyExactArithmeticTest.values(t, "a"), NearCopyExactArithmeticTest.values(t, "b"),
            NearCopyExactArithmeticTest.values(t, "c")};
        double[] y = NearCopyExactArithmeticTest.values(t, "y");
        double[] volume = NearCopyExactArithmeticTest.values(t, "volume");
        Map<VarianceRoute, Integer> fastRoutes = new EnumMap<>(VarianceRoute.class);
        int declinedNearCopies = 0;
        long[] choices = new long[models.space().decisionCount()];
        double worst = 0;
        String worstAt = "";
        long many = 1L << 40;
        for (int v = 0; v < models.variantCount(); v++) {
            DataVariant variant = models.variant(models.variantKey(v));
            variant.expect(many, Map.of("site", many, "season", many, "site" + ClusterComponents.JOIN + "season", many),
                    3, null);
            assertTrue(variant.weight != null && variant.usesClusterMoments("site")
                    && variant.usesClusterMoments("season"), "weighted cells built");
            assertEquals(v == 0, variant.useFourthMoments, "weighted fourth moments without fixed effects");
            assertFalse(variant.absorbsSeveral);
            SpecificationFitter fast = new SpecificationFitter(true);
            SpecificationFitter rowPass = new SpecificationFitter(false);
            for (long index = 0; index < models.space().size(); index++) {
                models.space().decode(index, choices);
                if (models.variantOrdinal(choices) != v) {
                    continue;
                }
                List<double[]> regressors = new ArrayList<>();
                for (int j = 0; j < 3; j++) {
                    if ((choices[2] & (1L << j)) != 0) {
                        regressors.add(columns[j]);
                    }
                }
                regressors.add(NearCopyExactArithmeticTest.values(t, "x"));
                double[][] x = regressors.toArray(new double[0][]);
                int[] level = v == 1 ? zone : null;
                ExactLeastSquares.KeyResult exact = ExactLeastSquares.fit(x, y, volume, level, null, site);
                String type = new String[] {"cluster:site", "cluster:site+season", "HC0", "HC1"}[(int) choices[3]];
                double expected = exact.stdError(type);
                if (choices[3] == 1) {
                    expected = Math.sqrt(exact.cr1Variance()
                            + ExactLeastSquares.fit(x, y, volume, level, null, season).cr1Variance()
                            - ExactLeastSquares.fit(x, y, volume, level, null, siteSeason).cr1Variance());
                }
                boolean nearCopies = (choices[2] & 3) == 3;
                SpecificationModel model = models.model(choices);
                for (SpecificationFitter fitter : new SpecificationFitter[] {fast, rowPass}) {
                    KeyFit fit = fitter.fit(variant, model);
                    String where = String.format("gap %.0e, specification %d (%s, controls %s, %s, route %s%s)", gap,
                            index + 1, type, Long.toBinaryString(choices[2]), v == 1 ? "zone effects" : "no fixed effects",
                            fit.route(), fit.refitByQr() ? ", refit by QR" : "");
                    assertEquals(FitStatus.OK, fit.status(), where);
                    assertEquals(exact.k(), fit.nParams(), where);
                    if (fitter == fast) {
                        fastRoutes.merge(fit.route(), 1, Integer::sum);
                        // beside zone effects the guard declines a component of the two-way error at every gap,
                        // weighted or not (measured; the row pass then serves it), and HC0/HC1 take the row pass
                        if (!nearCopies && !(v == 1 && choices[3] >= 1)) {
                            assertEquals(choices[3] >= 2 ? VarianceRoute.FOURTH_MOMENTS : VarianceRoute.CLUSTER_CELLS,
                                    fit.route(), where);
                        } else if (fit.route() == VarianceRoute.ROW_PASS) {
                            declinedNearCopies++;
                        }
                    }
                    double e = Math.max(Agreement.relativeError(fit.estimate(), exact.estimate()),
                            Agreement.relativeError(fit.stdError(), expected));
                    if (e > worst) {
                        worst = e;
                        worstAt = where;
                    }
                }
            }
        }
        assertTrue(worst <= NearCopyExactArithmeticTest.RELATIVE, String.format("worst relative error %.2e at %s; "
                + "tolerance 1e-9 (exact 90-digit arithmetic on the same doubles)", worst, worstAt));
        if (gap <= 1e-5) {
            assertTrue(declinedNearCopies > 0, "the guard declines near-copies this close: " + fastRoutes);
        }
    }
}
