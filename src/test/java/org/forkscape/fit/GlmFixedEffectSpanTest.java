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
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.ValueSource;

/**
 * A control that is a function of the absorbed levels up to noise of 1e-9 of its spread (a zone's value
 * recorded with a rounding error) is dropped as collinear with the fixed effects in every model, by the
 * rule of least squares' QR refit (within sum of squares below 1e-14 of the total; common practice for
 * rank decisions, as R's lm tol = 1e-7 on the norm): a logit or Poisson fit then equals the fit without
 * it, as least squares does. Judged against its within spread alone, the column would keep a coefficient
 * of noise.
 */
class GlmFixedEffectSpanTest {
    private static Table zones() {
        SplittableRandom r = new SplittableRandom(41);
        int n = 2_000;
        String[] names = {"east", "north", "river", "south", "west"};
        double[] value = {0.13, 1.7, -0.4, 2.9, 0.77};
        double[] y = new double[n];
        double[] count = new double[n];
        double[] key = new double[n];
        double[] other = new double[n];
        double[] zoneValue = new double[n];
        int[] zone = new int[n];
        for (int i = 0; i < n; i++) {
            zone[i] = r.nextInt(names.length);
            double z = value[zone[i]];
            key[i] = r.nextGaussian() + z;
            other[i] = r.nextGaussian();
            zoneValue[i] = 1.1 * z + 0.3 + 1e-9 * r.nextGaussian();
            double eta = 0.3 * key[i] + 0.2 * other[i] + z / 3;
            y[i] = r.nextDouble() < 1 / (1 + Math.exp(-eta)) ? 1 : 0;
            count[i] = Math.floor(Math.exp(eta / 2) * 2 * r.nextDouble());
        }
        return new Table("zones.csv", List.of(new NumericColumn("y", y), new NumericColumn("count", count),
                new NumericColumn("key", key), new NumericColumn("other", other),
                new NumericColumn("zone_value", zoneValue), new CategoricalColumn("zone", zone, List.of(names))));
    }

    @ParameterizedTest
    @ValueSource(strings = {"logit", "poisson", "ols"})
    void aControlTheLevelsSpanUpToRoundingIsDroppedInEveryModel(String model) {
        Table table = zones();
        String outcome = model.equals("poisson") ? "count" : "y";
        KeyFit with = fit(table, outcome, model, "[\"other\", \"zone_value\"]");
        KeyFit without = fit(table, outcome, model, "[\"other\"]");
        assertTrue(with.ok(), with.statusText());
        assertTrue(with.statusText().contains("dropped zone_value: collinear with the fixed effects"),
                model + ": " + with.statusText());
        assertEquals(without.estimate(), with.estimate(), 1e-9 * Math.abs(without.estimate()), model);
        assertEquals(without.stdError(), with.stdError(), 1e-9 * without.stdError(), model);
    }

    private static KeyFit fit(Table table, String outcome, String model, String controls) {
        String json = """
                {"data": "zones.csv", "decisions": [
                  {"name": "o", "kind": "outcome", "alternatives": [{"label": "y", "column": "%s"}]},
                  {"name": "k", "kind": "predictor", "alternatives": [{"label": "x", "column": "key"}]},
                  {"name": "c", "kind": "controls", "required": %s},
                  {"name": "e", "kind": "errors", "alternatives": ["HC1"]},
                  {"name": "f", "kind": "absorb", "alternatives": [{"label": "zone", "columns": ["zone"]}]},
                  {"name": "m", "kind": "model", "alternatives": ["%s"]}]}
                """.formatted(outcome, controls, model);
        Plan plan = new PlanReader(false).read(json, Path.of("."));
        PlanChecker.check(plan, table);
        SpecificationModels models = new SpecificationModels(plan, table);
        long[] choices = new long[models.space().decisionCount()];
        models.space().decode(0, choices);
        DataVariant variant = models.variant(models.variantKey(models.variantOrdinal(choices)));
        return new ModelDispatch(true).fit(models.model(choices), new ObservedRows().of(variant));
    }
}
