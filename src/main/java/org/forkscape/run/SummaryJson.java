package org.forkscape.run;

import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import org.forkscape.plan.SpecificationSpace;

/**
 * Assembles summary.json: the run's headline numbers, then how it was run, then any sections that
 * later stages add (joint inference, influence), each under its own documented key, and last the run's
 * {@code provenance}.
 */
public final class SummaryJson {
    private SummaryJson() {
    }

    /** Said under {@code scales}. */
    public static final String SCALES_NOTE = "Estimates as fitted are in units of their outcome per unit of their "
            + "key predictor, on their model's link scale, so they are summarised per comparable group (one outcome "
            + "alternative with one key-predictor alternative and, when the plan has a model decision, one model); "
            + "average marginal effects are in units of the outcome itself whatever the model, so they are "
            + "summarised per outcome and key-predictor alternative; across groups only the unit-free scales "
            + "compare. The standardized coefficient and the partial correlation are defined for least squares "
            + "only: generalized linear models are left out of them and counted under left_out. Shares positive "
            + "and significant are the same on every scale.";

    public static Map<String, Object> of(RunResult run, Map<String, Object> sections, Provenance provenance) {
        UnitGroups units = UnitGroups.of(run);
        Map<String, Object> m = new LinkedHashMap<>();
        RunSummary.of(run.results(), run.plan().alpha()).toJson().forEach((key, value) -> {
            m.put(key, value);
            if (key.equals("median_estimate")) {
                m.put("median_mixes_units", units.unitsDiffer());
            }
        });
        m.put("confidence", run.plan().confidence());
        SpecificationSpace space = run.models().space();
        // beyond a long, the exact count as decimal text: a JSON number would lose its digits in most readers
        m.put("specifications_in_plan", space.beyondLong() ? space.count().toString() : (Object) space.size());
        boolean sampled = run.results().size() < space.size();
        m.put("sampled", sampled);
        if (sampled) {
            m.put("sample_seed", run.plan().seed());
        }
        m.put("data_rows", run.table().rowCount());
        m.put("refit_by_qr", run.refitByQr());
        if (!run.routes().isEmpty()) {
            Map<String, Long> routes = new LinkedHashMap<>();
            run.routes().forEach((route, count) -> routes.put(route.name().toLowerCase(Locale.ROOT), count));
            m.put("standard_error_routes", routes);
        }
        m.put("seconds", Math.round(run.seconds() * 1000) / 1000.0);
        Map<String, Object> scales = scales(run, units);
        m.put("scales", scales);
        if (run.plan().reported() != null) {
            m.put("reported", ReportedPosition.toJson(run));
        }
        m.putAll(sections);
        if (units.unitsDiffer()) {
            scales.put("pooled_as_fitted", POOLED.stream().filter(m::containsKey).toList());
        }
        m.put("provenance", provenance.toJson());
        return m;
    }

    /**
     * The sections that summarise estimates as fitted over every specification: when the units differ
     * they pool them, and {@code scales.pooled_as_fitted} names those present, so that no statistic
     * mixes units without saying so.
     */
    static final List<String> POOLED = List.of("median_estimate", "null", "best", "interval_bounds", "influence",
            "influence_overall");

    /**
     * The section {@code scales}: the headline numbers per comparable group as fitted, per group of the
     * average marginal effects, and on each unit-free scale.
     */
    static Map<String, Object> scales(RunResult run, UnitGroups units) {
        ResultTable r = run.results();
        double alpha = run.plan().alpha();
        List<Integer> all = new ArrayList<>();
        for (int slot = 0; slot < r.size(); slot++) {
            if (r.fitted(slot)) {
                all.add(slot);
            }
        }
        Map<String, Object> m = new LinkedHashMap<>();
        m.put("note", SCALES_NOTE);
        m.put("groups", groups(r, units, Scale.AS_FITTED, all, alpha));
        m.put("average_marginal_effect", groups(r, UnitGroups.of(run, Scale.AVERAGE_MARGINAL_EFFECT),
                Scale.AVERAGE_MARGINAL_EFFECT, all, alpha));
        int[] fitted = slots(all);
        for (Scale scale : List.of(Scale.STANDARDIZED, Scale.PARTIAL_CORRELATION, Scale.T_STATISTIC)) {
            Map<String, Object> e = new LinkedHashMap<>();
            e.put("unit", units.unit(scale, null));
            e.putAll(ScaleSummary.of(r, fitted, scale, alpha).toJson());
            m.put(scale.name().toLowerCase(Locale.ROOT), e);
        }
        return m;
    }

    /** One entry per group of a scale with units, in group order, each with its numbers on the scale. */
    private static List<Map<String, Object>> groups(ResultTable r, UnitGroups units, Scale scale, List<Integer> fitted,
            double alpha) {
        List<List<Integer>> byGroup = new ArrayList<>();
        units.groups().forEach(g -> byGroup.add(new ArrayList<>()));
        for (int slot : fitted) {
            byGroup.get(units.groupOf(slot)).add(slot);
        }
        List<Map<String, Object>> out = new ArrayList<>();
        for (UnitGroups.Group g : units.groups()) {
            Map<String, Object> e = new LinkedHashMap<>();
            e.put("group", g.id());
            e.put("outcome", g.outcome());
            e.put("predictor", g.predictor());
            if (g.model() != null) {
                e.put("model", g.model().spelling());
            }
            e.put("unit", units.unit(scale, g));
            e.putAll(ScaleSummary.of(r, slots(byGroup.get(g.id())), scale, alpha).toJson());
            out.add(e);
        }
        return out;
    }

    private static int[] slots(List<Integer> list) {
        return list.stream().mapToInt(Integer::intValue).toArray();
    }
}
