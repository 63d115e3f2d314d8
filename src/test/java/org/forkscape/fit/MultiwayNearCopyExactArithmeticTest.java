package org.forkscape.fit;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Path;
import java.util.ArrayList;
import java.util.EnumMap;
import java.util.List;
import java.util.Map;
import java.util.SplittableRandom;
import org.forkscape.data.CategoricalColumn;
import org.forkscape.data.Column;
import org.forkscape.data.Table;
import org.forkscape.plan.Plan;
import org.forkscape.plan.PlanReader;
import org.forkscape.reference.Agreement;
import org.forkscape.reference.ExactLeastSquares;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.ValueSource;

/**
 * Two-way cluster-robust errors (Cameron, Gelbach &amp; Miller 2011, "Robust inference with multiway
 * clustering", Journal of Business &amp; Economic Statistics 29(2)) on the near-copy design of
 * {@link NearCopyExactArithmeticTest}, against exact arithmetic: V = V_site + V_season - V_site&amp;season,
 * each one-way CR1 variance computed by {@link ExactLeastSquares} in 90-digit decimals on the same doubles
 * and rounded once, then added. Every subset of the controls, with and without absorbed zone effects, by
 * the fitter that may take the per-cluster cells (told that they pay for every component) and by the one
 * that always passes over rows, and with the variants built from 3 parts of the table (a runner by parts:
 * the parts' per-cluster cells, or where they decline the clusters' scores summed over the parts' rows,
 * {@link ClusterScoresByParts}). Tolerance 1e-9 relative, the engine's promise; the routes taken are
 * asserted, so a guard that declined the cells everywhere could not pass.
 */
class MultiwayNearCopyExactArithmeticTest {
    private static final int SEASONS = 6;
    private static final String PLAN = "{\"data\": \"unused.csv\", \"decisions\": ["
            + "{\"name\": \"o\", \"kind\": \"outcome\", \"alternatives\": [{\"label\": \"y\", \"column\": \"y\"}]},"
            + "{\"name\": \"k\", \"kind\": \"predictor\", \"alternatives\": [{\"label\": \"x\", \"column\": \"x\"}]},"
            + "{\"name\": \"c\", \"kind\": \"controls\", \"optional\": [\"a\", \"b\", \"c\"]},"
            + "{\"name\": \"e\", \"kind\": \"errors\", \"alternatives\": [\"cluster:site+season\"]},"
            + "{\"name\": \"f\", \"kind\": \"absorb\", \"alternatives\": [{\"label\": \"none\", \"columns\": []},"
            + "  {\"label\": \"zone\", \"columns\": [\"zone\"]}]}]}";

    /** The stations of the near-copy test with the season of each reading, crossed with the sites. */
    private static Table stations(double gap) {
        Table t = NearCopyExactArithmeticTest.stations(NearCopyExactArithmeticTest.ROWS, gap, 41);
        SplittableRandom r = new SplittableRandom(7);
        int[] season = new int[t.rowCount()];
        List<String> seasons = new ArrayList<>();
        for (int s = 0; s < SEASONS; s++) {
            seasons.add("q" + s);
        }
        for (int i = 0; i < season.length; i++) {
            season[i] = r.nextInt(SEASONS);
        }
        List<Column> columns = new ArrayList<>(t.columns());
        columns.add(new CategoricalColumn("season", season, seasons));
        return new Table("stations", columns);
    }

    @ParameterizedTest(name = "gap {0}")
    @ValueSource(doubles = {1e-1, 1e-3, 1e-5, 1e-6, 3e-7})
    void twoWayClusteredErrorsMatchExactArithmetic(double gap) {
        Table t = stations(gap);
        Plan plan = new PlanReader(false).read(PLAN, Path.of("."));
        SpecificationModels models = new SpecificationModels(plan, t);
        int[] site = NearCopyExactArithmeticTest.codes(t, "site");
        int[] season = NearCopyExactArithmeticTest.codes(t, "season");
        int[] both = new int[site.length];
        for (int i = 0; i < both.length; i++) {
            both[i] = site[i] * SEASONS + season[i];
        }
        double[][] columns = {NearCopyExactArithmeticTest.values(t, "a"), NearCopyExactArithmeticTest.values(t, "b"),
            NearCopyExactArithmeticTest.values(t, "c")};
        double[] y = NearCopyExactArithmeticTest.values(t, "y");
        Map<VarianceRoute, Integer> routes = new EnumMap<>(VarianceRoute.class);
        Map<VarianceRoute, Integer> partsRoutes = new EnumMap<>(VarianceRoute.class);
        VariantSource parts = VariantByPartsTest.source(plan, t, 3);
        long[] choices = new long[models.space().decisionCount()];
        double worst = 0;
        String worstAt = "";
        for (int v = 0; v < models.variantCount(); v++) {
            DataVariant variant = models.variant(models.variantKey(v));
            long many = 1L << 40;
            variant.expect(0, Map.of("site", many, "season", many, "site" + ClusterComponents.JOIN + "season", many),
                    3, null);
            assertTrue(variant.usesClusterMoments("site") && variant.usesClusterMoments("season"), "cells built");
            SpecificationFitter cells = new SpecificationFitter(true);
            SpecificationFitter rowPass = new SpecificationFitter(false);
            SpecificationFitter byParts = new SpecificationFitter(true);
            DataVariant fromParts = parts.variant(models.variantKey(v), null);
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
                int[] zone = v == 1 ? NearCopyExactArithmeticTest.codes(t, "zone") : null;
                ExactLeastSquares.KeyResult bySite = ExactLeastSquares.fit(x, y, zone, site);
                double variance = bySite.cr1Variance() + ExactLeastSquares.fit(x, y, zone, season).cr1Variance()
                        - ExactLeastSquares.fit(x, y, zone, both).cr1Variance();
                SpecificationModel model = models.model(choices);
                for (SpecificationFitter fitter : new SpecificationFitter[] {cells, rowPass, byParts}) {
                    KeyFit fit = fitter == byParts ? fitter.fit(fromParts, model) : fitter.fit(variant, model);
                    String where = String.format("gap %.0e, specification %d (controls %s, %s, route %s%s%s)", gap,
                            index + 1, Long.toBinaryString(choices[2]), v == 1 ? "zone effects" : "no fixed effects",
                            fit.route(), fit.refitByQr() ? ", refit by QR" : "", fitter == byParts ? ", by parts" : "");
                    if (fitter == byParts) {
                        partsRoutes.merge(fit.route(), 1, Integer::sum);
                    }
                    assertEquals(bySite.k(), fit.nParams(), where);
                    assertEquals(SEASONS - 1, fit.df(), 0, where + ": df = fewest clusters - 1");
                    routes.merge(fit.route(), 1, Integer::sum);
                    if (variance <= 0) {
                        assertEquals(FitStatus.VARIANCE_NOT_POSITIVE, fit.status(), where);
                        continue;
                    }
                    assertEquals(FitStatus.OK, fit.status(), where);
                    double e = Math.max(Agreement.relativeError(fit.estimate(), bySite.estimate()),
                            Agreement.relativeError(fit.stdError(), Math.sqrt(variance)));
                    if (e > worst) {
                        worst = e;
                        worstAt = where;
                    }
                }
            }
        }
        assertTrue(worst <= NearCopyExactArithmeticTest.RELATIVE, String.format("worst relative error %.2e at %s; "
                + "tolerance 1e-9 (exact 90-digit arithmetic on the same doubles)", worst, worstAt));
        assertTrue(routes.getOrDefault(VarianceRoute.CLUSTER_CELLS, 0) >= 4, "cluster cells taken: " + routes);
        assertTrue(routes.getOrDefault(VarianceRoute.ROW_PASS, 0) >= 16, "row pass taken: " + routes);
        assertTrue(partsRoutes.getOrDefault(VarianceRoute.CLUSTER_CELLS, 0) + partsRoutes.getOrDefault(
                VarianceRoute.ROW_PASS, 0) == 16, "by parts, from the cells or the clusters' scores: " + partsRoutes);
    }
}
