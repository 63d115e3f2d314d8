package org.forkscape.fit;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Path;
import java.util.List;
import java.util.SplittableRandom;
import org.forkscape.data.CategoricalColumn;
import org.forkscape.data.NumericColumn;
import org.forkscape.data.Table;
import org.forkscape.plan.Plan;
import org.forkscape.plan.PlanChecker;
import org.forkscape.plan.PlanReader;
import org.junit.jupiter.api.Test;

/**
 * A generalized linear fit that starts from its parent's estimate takes the parent's information at that
 * estimate and sums only its new column's cross-products ({@link Irls.Information}): an engine property,
 * checked against the same fits with every start's information summed in full, which must agree to the
 * last bit in every reported number (the numbers themselves are held to R in reference.RGlmReferenceTest
 * and its siblings). Invented data: whether a household joined a community composting scheme (logit,
 * probit), and how many drop-offs it made (Poisson), by the hours of outreach it had, with household
 * attributes as controls, a district to absorb and survey weights.
 */
class GlmParentInformationTest {
    private static Table households() {
        SplittableRandom r = new SplittableRandom(2026);
        int n = 1_500;
        double[] joined = new double[n];
        double[] dropOffs = new double[n];
        double[] outreach = new double[n];
        double[][] attributes = new double[5][n];
        double[] weight = new double[n];
        int[] district = new int[n];
        for (int i = 0; i < n; i++) {
            int d = r.nextInt(7);
            district[i] = d;
            outreach[i] = 2 * r.nextDouble() + 0.2 * d;
            double eta = -0.8 + 0.6 * outreach[i] + 0.1 * d;
            for (int j = 0; j < attributes.length; j++) {
                attributes[j][i] = 0.4 * outreach[i] + r.nextGaussian();
                eta += (j % 2 == 0 ? 0.3 : -0.2) * attributes[j][i];
            }
            joined[i] = r.nextDouble() < 1 / (1 + Math.exp(-eta)) ? 1 : 0;
            dropOffs[i] = GlmStatusTest.poisson(r, Math.exp(0.3 * eta));
            weight[i] = 0.5 + r.nextDouble();
        }
        return new Table("households.csv", List.of(new NumericColumn("joined", joined),
                new NumericColumn("drop_offs", dropOffs), new NumericColumn("outreach", outreach),
                new NumericColumn("size", attributes[0]), new NumericColumn("age", attributes[1]),
                new NumericColumn("garden", attributes[2]), new NumericColumn("distance", attributes[3]),
                new NumericColumn("tenure", attributes[4]), new NumericColumn("design_weight", weight),
                new CategoricalColumn("district", district, List.of("north", "east", "south", "west", "harbour",
                        "hills", "old town"))));
    }

    private static String plan(String outcome, String models) {
        return """
                {"data": "households.csv", "decisions": [
                  {"name": "outcome", "kind": "outcome", "alternatives": [{"label": "y", "column": "%s"}]},
                  {"name": "key", "kind": "predictor", "alternatives": [{"label": "outreach", "column": "outreach"}]},
                  {"name": "controls", "kind": "controls", "optional": ["size", "age", "garden", "distance", "tenure"]},
                  {"name": "model", "kind": "model", "alternatives": [%s]},
                  {"name": "absorb", "kind": "absorb", "alternatives": [
                    {"label": "none", "columns": []}, {"label": "district", "columns": ["district"]}]},
                  {"name": "weights", "kind": "weights", "alternatives": [
                    {"label": "unweighted"}, {"label": "survey", "column": "design_weight"}]},
                  {"name": "errors", "kind": "errors", "alternatives": ["classical", "HC1", "cluster:district"]}]}
                """.formatted(outcome, models);
    }

    @Test
    void aLogitOrProbitStartFromTheParentsInformationGivesTheSameBitsAsSummingItInFull() {
        sameBits(plan("joined", "\"logit\", \"probit\""), 2);
    }

    @Test
    void aPoissonStartFromTheParentsInformationGivesTheSameBitsAsSummingItInFull() {
        sameBits(plan("drop_offs", "\"poisson\""), 1);
    }

    private static void sameBits(String json, int models) {
        Table table = households();
        Plan plan = new PlanReader(false).read(json, Path.of("."));
        PlanChecker.check(plan, table);
        SpecificationModels reusing = new SpecificationModels(plan, table);
        SpecificationModels summing = new SpecificationModels(plan, table);
        GeneralizedLinear fast = new GeneralizedLinear();
        GeneralizedLinear full = new GeneralizedLinear(Irls.MAX_ITERATIONS, false);
        long[] choices = new long[reusing.space().decisionCount()];
        int compared = 0;
        int fromParent = 0;
        for (long index = 0; index < reusing.space().size(); index++) {
            reusing.space().decode(index, choices);
            KeyFit a = fast.fit(reusing.model(choices), new ObservedRows().of(reusing.variant(reusing.variantKey(
                    reusing.variantOrdinal(choices)))));
            if (fast.startedFromParentInformation()) {
                fromParent++;
            }
            KeyFit b = full.fit(summing.model(choices), new ObservedRows().of(summing.variant(summing.variantKey(
                    summing.variantOrdinal(choices)))));
            assertTrue(!full.startedFromParentInformation(), "the full route took the parent's information");
            assertEquals(b, a, "specification " + (index + 1));
            assertTrue(a.ok(), "specification " + (index + 1) + ": " + a.statusText());
            compared++;
        }
        assertEquals(32 * models * 2 * 2 * 3, compared);
        // every specification with a control starts from its parent's estimate (its ancestors are fitted on
        // the way when they have not been): the route under test was taken for most of them
        assertTrue(fromParent > compared / 2, fromParent + " of " + compared + " started from the parent's information");
    }
}
