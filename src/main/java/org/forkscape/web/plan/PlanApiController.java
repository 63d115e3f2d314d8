package org.forkscape.web.plan;

import java.util.List;
import java.util.Map;
import org.forkscape.InputException;
import org.forkscape.run.Json;
import org.forkscape.run.StoredAnalysis;
import org.forkscape.run.Workspace;
import org.forkscape.web.system.Lookup;
import org.springframework.web.bind.annotation.GetMapping;
import org.springframework.web.bind.annotation.PathVariable;
import org.springframework.web.bind.annotation.PostMapping;
import org.springframework.web.bind.annotation.PutMapping;
import org.springframework.web.bind.annotation.RequestBody;
import org.springframework.web.bind.annotation.RequestMapping;
import org.springframework.web.bind.annotation.RequestParam;
import org.springframework.web.bind.annotation.RestController;
import tools.jackson.databind.JsonNode;

/** The JSON face of the plan page: read, check, save and lock an analysis's plan. */
@RestController
@RequestMapping("/api/analyses/{analysis}/plan")
class PlanApiController {
    private final PlanService plans;
    private final Workspace workspace;
    private final Lookup lookup;

    PlanApiController(PlanService plans, Workspace workspace, Lookup lookup) {
        this.plans = plans;
        this.workspace = workspace;
        this.lookup = lookup;
    }

    /**
     * @param plan  the plan as a JSON value (the text itself is what {@code PUT} saves)
     * @param saved    whether it was saved (otherwise it is the starting point of a new plan)
     * @param defaults the value of each top-level setting the plan leaves out
     */
    record PlanView(JsonNode plan, boolean saved, PlanCheck check, PlanDefaults defaults) {
    }

    /**
     * One saved version: {@code version}, {@code saved}, {@code sha256}, {@code restoredFrom} (0 when none),
     * {@code runs} (the ids of the runs that ran it), {@code working} (the plan being edited).
     */
    record VersionView(int version, String saved, String sha256, int restoredFrom, List<String> runs,
            boolean working) {
    }

    /** The plan's saved versions, newest first. */
    @GetMapping("/versions")
    List<VersionView> versions(@PathVariable String analysis) {
        StoredAnalysis a = lookup.analysis(analysis);
        return PlanVersions.of(workspace, a).stream().map(r -> new VersionView(r.version().version(),
                r.version().saved().toString(), r.version().sha256(), r.version().restoredFrom(), r.runs(),
                r.working())).toList();
    }

    @GetMapping
    PlanView get(@PathVariable String analysis) {
        StoredAnalysis a = lookup.analysis(analysis);
        String text = plans.current(a);
        return new PlanView(Json.MAPPER.readTree(text), plans.saved(a), plans.check(a, text), PlanDefaults.READER);
    }

    /** Saves the plan text as sent; 400 with the JSON path of the problem when it cannot run. */
    @PutMapping(consumes = "application/json")
    PlanCheck save(@PathVariable String analysis, @RequestBody(required = false) String plan) {
        return plans.save(lookup.analysis(analysis), plan);
    }

    /**
     * The time and memory a run of the plan would take on this server, measured on a few of its
     * specifications; 400 with the problem's JSON path when the plan cannot run.
     */
    @PostMapping(path = "/estimate", consumes = "application/json")
    PlanService.RunEstimate estimate(@PathVariable String analysis, @RequestBody(required = false) String plan) {
        return plans.estimate(lookup.analysis(analysis), plan == null ? "" : plan);
    }

    /**
     * @param lock the saved plan's lock as a run records it ({@code fingerprint}, {@code locked},
     *             {@code plan_matches}, {@code data_matches}), or null when the plan is not locked
     */
    record LockView(Map<String, Object> lock) {
    }

    @GetMapping("/lock")
    LockView lock(@PathVariable String analysis) {
        return new LockView(plans.lockStatus(lookup.analysis(analysis)).map(s -> s.toJson()).orElse(null));
    }

    /**
     * Locks the saved plan; 400 when none is saved, it cannot run, or it is locked already and
     * {@code replace} is not {@code yes}.
     */
    @PostMapping("/lock")
    LockView lock(@PathVariable String analysis, @RequestParam(defaultValue = "no") String replace) {
        if (!replace.equals("yes") && !replace.equals("no")) {
            throw new InputException("replace", "must be yes or no; found " + InputException.quoted(replace));
        }
        StoredAnalysis a = lookup.analysis(analysis);
        plans.lock(a, replace.equals("yes"));
        return lock(analysis);
    }

    /** Checks without saving; always 200, the answer says whether the plan is valid. */
    @PostMapping(path = "/check", consumes = "application/json")
    PlanCheck check(@PathVariable String analysis, @RequestBody(required = false) String plan) {
        return plans.check(lookup.analysis(analysis), plan == null ? "" : plan);
    }
}
