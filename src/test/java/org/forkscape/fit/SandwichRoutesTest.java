package org.forkscape.fit;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.SplittableRandom;
import org.forkscape.data.CategoricalColumn;
import org.forkscape.data.Column;
import org.forkscape.data.NumericColumn;
import org.forkscape.data.Table;
import org.forkscape.plan.Plan;
import org.forkscape.plan.PlanReader;
import org.forkscape.run.MultiverseRunner;
import org.forkscape.run.ResultTable;
import org.forkscape.run.RunResult;
import org.forkscape.run.RunProgress;
import org.junit.jupiter.api.Test;

/**
 * The row-free sandwich routes (fourth moments for HC0/HC1, per-cluster cross-products for CR1) must
 * give the one-row-pass values, which the R reference tests hold against R's sandwich package. Tolerance
 * 1e-11 relative: both routes sum the same products in a different order, and a route is declined
 * where its rounding error bound could cost more digits (held to exact arithmetic by
 * {@link NearCopyExactArithmeticTest}).
 */
class SandwichRoutesTest {
    private static Table table(int rows, long seed) {
        SplittableRandom r = new SplittableRandom(seed);
        double[] y = new double[rows];
        double[] x = new double[rows];
        double[] c1 = new double[rows];
        double[] c2 = new double[rows];
        double[] c3 = new double[rows];
        int[] region = new int[rows];
        int[] cluster = new int[rows];
        for (int i = 0; i < rows; i++) {
            region[i] = r.nextInt(4);
            cluster[i] = r.nextInt(12);
            x[i] = r.nextGaussian() + 0.3 * region[i];
            c1[i] = 0.5 * x[i] + r.nextGaussian();
            c2[i] = r.nextDouble() < 0.1 ? Double.NaN : r.nextGaussian();
            c3[i] = r.nextDouble() < 0.05 ? Double.NaN : r.nextGaussian() - 0.2 * x[i];
            y[i] = 0.4 * x[i] + 0.3 * c1[i] - 0.2 * (Double.isNaN(c2[i]) ? 0 : c2[i]) + region[i] * 0.5
                    + Math.sin(cluster[i]) + r.nextGaussian() * (1 + Math.abs(x[i]));
        }
        List<Column> cols = new ArrayList<>();
        cols.add(new NumericColumn("y", y));
        cols.add(new NumericColumn("x", x));
        cols.add(new NumericColumn("c1", c1));
        cols.add(new NumericColumn("c2", c2));
        cols.add(new NumericColumn("c3", c3));
        cols.add(new CategoricalColumn("region", region, List.of("a", "b", "c", "d")));
        cols.add(new CategoricalColumn("cluster", cluster, List.of("k00", "k01", "k02", "k03", "k04", "k05", "k06",
                "k07", "k08", "k09", "k10", "k11")));
        return new Table("generated", cols);
    }

    private static final String PLAN = "{\"data\": \"unused.csv\", \"decisions\": ["
            + "{\"name\": \"o\", \"kind\": \"outcome\", \"alternatives\": [{\"label\": \"y\", \"column\": \"y\"}]},"
            + "{\"name\": \"k\", \"kind\": \"predictor\", \"alternatives\": [{\"label\": \"x\", \"column\": \"x\"},"
            + "  {\"label\": \"xs\", \"column\": \"x\", \"transform\": \"standardize\"}]},"
            + "{\"name\": \"c\", \"kind\": \"controls\", \"optional\": [\"c1\", \"c2\", \"c3\", \"region\"]},"
            + "{\"name\": \"e\", \"kind\": \"errors\", \"alternatives\": [\"HC0\", \"HC1\", \"cluster:cluster\"]},"
            + "{\"name\": \"s\", \"kind\": \"sample\", \"alternatives\": [{\"label\": \"all\"},"
            + "  {\"label\": \"part\", \"keep\": \"c1 > -1\"}]},"
            + "{\"name\": \"f\", \"kind\": \"absorb\", \"alternatives\": [{\"label\": \"none\", \"columns\": []},"
            + "  {\"label\": \"region\", \"columns\": [\"region\"]}]}]}";

    @Test
    void rowFreeRoutesMatchTheRowPass() {
        Table t = table(3000, 11);
        Plan plan = new PlanReader(false).read(PLAN, Path.of("."));
        RunResult fastRun = new MultiverseRunner(2, true).run(plan, t, RunProgress.SILENT, null);
        RunResult rowRun = new MultiverseRunner(2, false).run(plan, t, RunProgress.SILENT, null);
        ResultTable fast = fastRun.results();
        ResultTable rows = rowRun.results();
        assertTrue(fastRun.routes().getOrDefault(VarianceRoute.FOURTH_MOMENTS, 0L) > 100, "routes " + fastRun.routes());
        assertTrue(fastRun.routes().getOrDefault(VarianceRoute.CLUSTER_CELLS, 0L) > 100, "routes " + fastRun.routes());
        assertEquals(java.util.Set.of(VarianceRoute.ROW_PASS), rowRun.routes().keySet());
        int compared = 0;
        for (int i = 0; i < fast.size(); i++) {
            assertEquals(rows.status(i), fast.status(i));
            if (!rows.fitted(i)) {
                continue;
            }
            assertEquals(rows.estimate(i), fast.estimate(i), 1e-13 * Math.abs(rows.estimate(i)));
            assertEquals(rows.stdError(i), fast.stdError(i), 1e-11 * rows.stdError(i), "specification " + (i + 1));
            assertEquals(rows.df(i), fast.df(i));
            compared++;
        }
        assertTrue(compared > 300, "compared " + compared);
    }

    @Test
    void routesAreUsedWhereTheyPay() {
        Table t = table(3000, 12);
        Plan plan = new PlanReader(false).read(PLAN, Path.of("."));
        SpecificationModels models = new SpecificationModels(plan, t);
        DataVariant plain = models.variant(models.variantKey(0));
        plain.expect(1000, java.util.Map.of("cluster", 1000L), 4, null);
        assertTrue(plain.useFourthMoments, "many HC1 specifications on 3,000 rows: fourth moments pay");
        assertTrue(plain.usesClusterMoments("cluster"));
        DataVariant absorbed = models.variant(models.variantKey(1));
        absorbed.expect(1000, java.util.Map.of(), 4, null);
        assertTrue(!absorbed.useFourthMoments, "absorbed fixed effects keep the row pass for HC");
    }

    /**
     * One specification's standard error does not depend on the rest of the plan: alone, eight HC1
     * specifications are too few for the fourth-moment route to pay and the row pass serves them; among
     * 64 HC0 and HC1 specifications the route is built and serves them, except where near-copy controls
     * (gap 1e-5) make its guard decline. Tolerance 1e-10 relative: the bound the route's guard keeps (see
     * {@link SandwichRoute#MAX_AMPLIFICATION}).
     */
    @Test
    void aSpecificationsNumbersDoNotDependOnTheRestOfThePlan() {
        Table t = NearCopyExactArithmeticTest.stations(2000, 1e-5, 43);
        String controls = "{\"name\": \"c\", \"kind\": \"controls\", \"optional\": [\"a\", \"b\", \"c\"]},";
        Plan alone = new PlanReader(false).read("{\"data\": \"unused.csv\", \"decisions\": ["
                + "{\"name\": \"o\", \"kind\": \"outcome\", \"alternatives\": [{\"label\": \"y\", \"column\": \"y\"}]},"
                + "{\"name\": \"k\", \"kind\": \"predictor\", \"alternatives\": [{\"label\": \"x\", \"column\": \"x\"}]},"
                + controls + "{\"name\": \"e\", \"kind\": \"errors\", \"alternatives\": [\"HC1\"]}]}", Path.of("."));
        Plan many = new PlanReader(false).read("{\"data\": \"unused.csv\", \"decisions\": ["
                + "{\"name\": \"o\", \"kind\": \"outcome\", \"alternatives\": [{\"label\": \"y\", \"column\": \"y\"},"
                + "  {\"label\": \"ys\", \"column\": \"y\", \"transform\": \"standardize\"}]},"
                + "{\"name\": \"k\", \"kind\": \"predictor\", \"alternatives\": [{\"label\": \"x\", \"column\": \"x\"},"
                + "  {\"label\": \"xs\", \"column\": \"x\", \"transform\": \"standardize\"}]},"
                + controls + "{\"name\": \"e\", \"kind\": \"errors\", \"alternatives\": [\"HC0\", \"HC1\"]}]}",
                Path.of("."));
        RunResult a = new MultiverseRunner(1).run(alone, t, RunProgress.SILENT, null);
        RunResult b = new MultiverseRunner(1).run(many, t, RunProgress.SILENT, null);
        assertEquals(java.util.Map.of(VarianceRoute.ROW_PASS, 8L), a.routes(), "eight HC1 specifications alone");
        assertTrue(b.routes().getOrDefault(VarianceRoute.FOURTH_MOMENTS, 0L) > 0, "64 HC specifications: " + b.routes());
        assertTrue(b.routes().getOrDefault(VarianceRoute.ROW_PASS, 0L) > 0, "near-copies declined: " + b.routes());
        for (int i = 0; i < a.results().size(); i++) {
            int j = i * 2 + 1;
            assertEquals(b.results().estimate(j), a.results().estimate(i), 0.0, "estimate, specification " + (i + 1));
            assertEquals(b.results().stdError(j), a.results().stdError(i), 1e-10 * b.results().stdError(j),
                    "HC1 standard error, specification " + (i + 1));
        }
    }
}
