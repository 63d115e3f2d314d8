package org.forkscape.infer;

import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import org.forkscape.run.ResultTable;
import org.forkscape.run.RunResult;
import org.forkscape.run.Scale;
import org.forkscape.run.UnitGroups;

/**
 * summary.json's {@code by_scale}: the inference that the whole-run sections compute over every
 * specification as fitted, computed instead within each comparable group as fitted (one set of units) and on
 * the unit-free scales: the smallest-p specification with its min-p adjustment (Westfall &amp; Young 1993,
 * Resampling-Based Multiple Testing) over the same specifications in each draw, the variance shares of the
 * decisions ({@link Influence}), and the null draws' joint tests and rank-by-rank band (Simonsohn, Simmons
 * &amp; Nelson 2020, "Specification curve analysis", Nature Human Behaviour 4, 1208-1214; see
 * {@link ScaleCurves}).
 */
final class ScaleSections {
    /** Said under {@code by_scale}. */
    static final String NOTE = "The whole-run sections null, influence and influence_overall pool every estimate "
            + "as fitted; when the plan has several outcome alternatives, key-predictor codings or models, those "
            + "estimates are in different units. Here the same statistics are computed within each comparable group "
            + "as fitted (one outcome alternative, one key-predictor alternative and, with a model decision, one "
            + "model) and on the unit-free scales. The null draws re-estimate coefficients and standard errors "
            + "only, so their tests and bands exist as fitted per group, on the t statistic and on the partial "
            + "correlation, not on the standardized scale. The smallest p of the whole run (section best) compares "
            + "p-values, which have no unit; per group it is the smallest p within the group, adjusted over the "
            + "group's smallest p in each draw.";

    private ScaleSections() {
    }

    static Map<String, Object> of(RunResult run, int[] all, NullDrawResult draws) {
        ResultTable r = run.results();
        UnitGroups units = UnitGroups.of(run);
        List<List<Integer>> byGroup = new ArrayList<>();
        units.groups().forEach(g -> byGroup.add(new ArrayList<>()));
        for (int slot : all) {
            if (r.fitted(slot)) {
                byGroup.get(units.groupOf(slot)).add(slot);
            }
        }
        Map<String, Object> m = new LinkedHashMap<>();
        m.put("note", NOTE);
        List<Map<String, Object>> groups = new ArrayList<>();
        for (UnitGroups.Group g : units.groups()) {
            int[] slots = byGroup.get(g.id()).stream().mapToInt(Integer::intValue).toArray();
            if (slots.length == 0) {
                continue;
            }
            Map<String, Object> e = new LinkedHashMap<>();
            e.put("group", g.id());
            e.put("outcome", g.outcome());
            e.put("predictor", g.predictor());
            if (g.model() != null) {
                e.put("model", g.model().spelling());
            }
            e.put("unit", units.unit(Scale.AS_FITTED, g));
            e.put("specifications", slots.length);
            int curve = draws == null ? -1 : draws.curveOfGroup(g.id());
            BestSpecification best = BestSpecification.within(r, slots,
                    curve < 0 ? null : p -> draws.minPAdjustedTally(curve, p));
            Map<String, Object> bestJson = best.toJson();
            if (curve >= 0) {
                bestJson.put("adjustment", "min-p over the null draws, against the group's smallest p in each draw "
                        + "(Westfall & Young 1993)");
            }
            e.put("best", bestJson);
            putInfluence(e, Influence.of(SpecificationGrid.of(run, slots, Scale.AS_FITTED)));
            if (curve >= 0) {
                e.put("null", draws.curveJson(curve));
            }
            groups.add(e);
        }
        m.put("groups", groups);
        for (Scale scale : List.of(Scale.STANDARDIZED, Scale.PARTIAL_CORRELATION, Scale.T_STATISTIC)) {
            Map<String, Object> e = new LinkedHashMap<>();
            e.put("unit", units.unit(scale, null));
            SpecificationGrid grid = SpecificationGrid.of(run, all, scale);
            e.put("specifications", grid.size());
            putInfluence(e, Influence.of(grid));
            int curve = draws == null ? -1 : draws.curveOfScale(scale);
            if (curve >= 0) {
                e.put("null", draws.curveJson(curve));
            }
            m.put(scale.name().toLowerCase(java.util.Locale.ROOT), e);
        }
        return m;
    }

    private static void putInfluence(Map<String, Object> e, InfluenceReport report) {
        e.put("influence", report.factorsJson());
        e.put("influence_overall", report.overallJson());
    }
}
