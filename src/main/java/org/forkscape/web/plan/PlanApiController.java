package org.forkscape.web.plan;

import org.forkscape.run.Json;
import org.forkscape.run.StoredAnalysis;
import org.forkscape.web.system.Lookup;
import org.springframework.web.bind.annotation.GetMapping;
import org.springframework.web.bind.annotation.PathVariable;
import org.springframework.web.bind.annotation.PostMapping;
import org.springframework.web.bind.annotation.PutMapping;
import org.springframework.web.bind.annotation.RequestBody;
import org.springframework.web.bind.annotation.RequestMapping;
import org.springframework.web.bind.annotation.RestController;
import tools.jackson.databind.JsonNode;

/** The JSON face of the plan page: read, check and save an analysis's plan. */
@RestController
@RequestMapping("/api/analyses/{analysis}/plan")
class PlanApiController {
    private final PlanService plans;
    private final Lookup lookup;

    PlanApiController(PlanService plans, Lookup lookup) {
        this.plans = plans;
        this.lookup = lookup;
    }

    /**
     * @param plan  the plan as a JSON value (the text itself is what {@code PUT} saves)
     * @param saved    whether it was saved (otherwise it is the starting point of a new plan)
     * @param defaults the value of each top-level setting the plan leaves out
     */
    record PlanView(JsonNode plan, boolean saved, PlanCheck check, PlanDefaults defaults) {
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

    /** Checks without saving; always 200, the answer says whether the plan is valid. */
    @PostMapping(path = "/check", consumes = "application/json")
    PlanCheck check(@PathVariable String analysis, @RequestBody(required = false) String plan) {
        return plans.check(lookup.analysis(analysis), plan == null ? "" : plan);
    }
}
