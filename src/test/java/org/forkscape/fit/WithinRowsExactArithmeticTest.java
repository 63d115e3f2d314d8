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
 * The row-free routes beside two absorbed columns (and three: a crossed sampling shift added, whose K comes from the
 * exact rank), unweighted and with analytic weights, against exact
 * arithmetic on the near-copy design of {@link NearCopyExactArithmeticTest}: zone and season effects absorbed
 * (crossed, one connected component), HC0, HC1, CR1 by site (per-cluster cells of the sets' demeaned rows),
 * CR1 by reading (one row per cluster: the fourth moments serve it) and two-way CR1 by site and season (the
 * signed sum of three one-way variances; Cameron, Gelbach &amp; Miller 2011, Journal of Business &amp;
 * Economic Statistics 29(2)). The reference is {@link ExactLeastSquares} in 90-digit decimals on the same
 * doubles, with the weights and both sets of dummies explicit. Every specification is fitted by the fitter
 * that may take the row-free routes, with the variant told that they pay, and by the one that always passes
 * over rows. Tolerance 1e-9 relative, the engine's promise. The routes are asserted: the row-free ones serve
 * every specification whose controls are not both near-copies, and at small gaps the rounding-error guard
 * declines some of those that are (their bound exceeds {@code SandwichRoute.MAX_AMPLIFICATION} times the
 * meat), so that neither a guard that declined everything nor one that declined nothing could pass.
 */
class WithinRowsExactArithmeticTest {
    private static final int SEASONS = 6;
    /** The sampling shift of a reading: a third crossed column for the three-way alternative. */
    private static final int SHIFTS = 3;
    private static final String PLAN = "{\"data\": \"unused.csv\", \"decisions\": ["
            + "{\"name\": \"o\", \"kind\": \"outcome\", \"alternatives\": [{\"label\": \"y\", \"column\": \"y\"}]},"
            + "{\"name\": \"k\", \"kind\": \"predictor\", \"alternatives\": [{\"label\": \"x\", \"column\": \"x\"}]},"
            + "{\"name\": \"c\", \"kind\": \"controls\", \"optional\": [\"a\", \"b\", \"c\"]},"
            + "{\"name\": \"e\", \"kind\": \"errors\", \"alternatives\": [\"HC0\", \"HC1\", \"cluster:site\","
            + "  \"cluster:reading\", \"cluster:site+season\"]},"
            + "{\"name\": \"f\", \"kind\": \"absorb\", \"alternatives\": [{\"label\": \"zone and season\","
            + "  \"columns\": [\"zone\", \"season\"]}, {\"label\": \"zone, season and shift\","
            + "  \"columns\": [\"zone\", \"season\", \"shift\"]}]},"
            + "{\"name\": \"w\", \"kind\": \"weights\", \"alternatives\": [{\"label\": \"unweighted\"},"
            + "  {\"label\": \"volume\", \"column\": \"volume\"}]}]}";
    private static final String[] ERRORS = {"HC0", "HC1", "cluster:site", "cluster:reading", "cluster:site+season"};

    /** The stations with the season of each reading, the reading's own code and the water volume sampled. */
    static Table stations(double gap) {
        Table t = NearCopyExactArithmeticTest.stations(NearCopyExactArithmeticTest.ROWS, gap, 41);
        SplittableRandom r = new SplittableRandom(11);
        // the shifts from a stream of their own, so that the seasons and volumes stay those the other tests of
        // these stations (WeightedRoutesExactArithmeticTest) were written for
        SplittableRandom shifts = new SplittableRandom(13);
        int rows = t.rowCount();
        int[] season = new int[rows];
        int[] reading = new int[rows];
        int[] shift = new int[rows];
        double[] volume = new double[rows];
        List<String> seasons = new ArrayList<>();
        for (int s = 0; s < SEASONS; s++) {
            seasons.add("q" + s);
        }
        List<String> readings = new ArrayList<>();
        for (int i = 0; i < rows; i++) {
            season[i] = r.nextInt(SEASONS);
            reading[i] = i;
            readings.add(String.format("r%03d", i));
            volume[i] = 0.25 + 3 * r.nextDouble();
            shift[i] = shifts.nextInt(SHIFTS);
        }
        List<Column> columns = new ArrayList<>(t.columns());
        columns.add(new CategoricalColumn("season", season, seasons));
        columns.add(new CategoricalColumn("reading", reading, readings));
        columns.add(new CategoricalColumn("shift", shift, List.of("early", "midday", "late")));
        columns.add(new NumericColumn("volume", volume));
        return new Table("stations", columns);
    }

    @ParameterizedTest(name = "gap {0}")
    @ValueSource(doubles = {1e-1, 1e-3, 1e-5, 1e-6, 3e-7})
    void rowFreeRoutesMatchExactArithmetic(double gap) {
        Table t = stations(gap);
        Plan plan = new PlanReader(false).read(PLAN, Path.of("."));
        SpecificationModels models = new SpecificationModels(plan, t);
        int[] zone = NearCopyExactArithmeticTest.codes(t, "zone");
        int[] season = NearCopyExactArithmeticTest.codes(t, "season");
        int[] site = NearCopyExactArithmeticTest.codes(t, "site");
        int[] reading = NearCopyExactArithmeticTest.codes(t, "reading");
        int[] shift = NearCopyExactArithmeticTest.codes(t, "shift");
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
        Map<String, Double> worstByRoute = new java.util.TreeMap<>();
        for (int v = 0; v < models.variantCount(); v++) {
            DataVariant variant = models.variant(models.variantKey(v));
            variant.expect(many, Map.of("site", many, "reading", many, "season", many,
                    "site" + ClusterComponents.JOIN + "season", many), 3, null);
            assertTrue(variant.useFourthMoments, "fourth moments of the demeaned rows built");
            assertTrue(variant.usesClusterMoments("site") && variant.usesClusterMoments("season"), "cells built");
            assertTrue(variant.clustersServedByFourthMoments("reading"), "one row per cluster: the fourth moments");
            double[] weight = variant.weight == null ? null : volume;
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
                String type = ERRORS[(int) choices[3]];
                // the second absorb alternative adds the shift: three crossed columns, every set of dummies explicit
                int[][] more = choices[4] == 0 ? new int[][] {season} : new int[][] {season, shift};
                ExactLeastSquares.KeyResult exact = ExactLeastSquares.fitWithEffects(x, y, weight, zone, more,
                        type.equals("cluster:reading") ? reading : site);
                double expected = exact.stdError(type);
                if (type.equals("cluster:site+season")) {
                    double variance = exact.cr1Variance()
                            + ExactLeastSquares.fitWithEffects(x, y, weight, zone, more, season).cr1Variance()
                            - ExactLeastSquares.fitWithEffects(x, y, weight, zone, more, siteSeason).cr1Variance();
                    expected = Math.sqrt(variance);
                }
                boolean nearCopies = (choices[2] & 3) == 3;
                SpecificationModel model = models.model(choices);
                for (SpecificationFitter fitter : new SpecificationFitter[] {fast, rowPass}) {
                    KeyFit fit = fitter.fit(variant, model);
                    String where = String.format("gap %.0e, specification %d (%s, controls %s, %s, route %s%s)", gap,
                            index + 1, type, Long.toBinaryString(choices[2]), weight == null ? "unweighted"
                                    : "weighted", fit.route(), fit.refitByQr() ? ", refit by QR" : "");
                    assertEquals(FitStatus.OK, fit.status(), where);
                    assertEquals(exact.k(), fit.nParams(), where);
                    if (fitter == fast) {
                        fastRoutes.merge(fit.route(), 1, Integer::sum);
                        if (!nearCopies) {
                            assertTrue(fit.route() != VarianceRoute.ROW_PASS, where + ": a row-free route serves it");
                        } else if (fit.route() == VarianceRoute.ROW_PASS) {
                            declinedNearCopies++;
                        }
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
        }
        AgreementReport.write(String.format("within-rows-gap-%.0e.txt", gap), String.format("largest relative error "
                + "of estimate or standard error against 90-digit arithmetic beside two and three absorbed columns, "
                + "near-copy gap %.0e, by route", gap), worstByRoute);
        assertTrue(worst <= NearCopyExactArithmeticTest.RELATIVE, String.format("worst relative error %.2e at %s; "
                + "tolerance 1e-9 (exact 90-digit arithmetic on the same doubles)", worst, worstAt));
        // 6 subsets without both near-copies, 2 weightings: HC0 and HC1 and one-row clusters by fourth moments
        assertTrue(fastRoutes.getOrDefault(VarianceRoute.FOURTH_MOMENTS, 0) >= 36, "fourth moments: " + fastRoutes);
        assertTrue(fastRoutes.getOrDefault(VarianceRoute.CLUSTER_CELLS, 0) >= 24, "cluster cells: " + fastRoutes);
        if (gap <= 1e-5) {
            assertTrue(declinedNearCopies > 0, "the guard declines near-copies this close: " + fastRoutes);
        }
    }
}
