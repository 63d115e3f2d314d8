package org.forkscape.run;

import java.util.LinkedHashMap;
import java.util.Locale;
import java.util.Map;

/**
 * Assembles summary.json: the run's headline numbers, then how it was run, then any sections that
 * later stages add (joint inference, influence), each under its own documented key.
 */
public final class SummaryJson {
    private SummaryJson() {
    }

    public static Map<String, Object> of(RunResult run, Map<String, Object> sections) {
        Map<String, Object> m = new LinkedHashMap<>(RunSummary.of(run.results(), run.plan().alpha()).toJson());
        m.put("confidence", run.plan().confidence());
        long inPlan = run.models().space().size();
        m.put("specifications_in_plan", inPlan);
        m.put("sampled", run.results().size() < inPlan);
        if (run.results().size() < inPlan) {
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
        m.putAll(sections);
        return m;
    }
}
