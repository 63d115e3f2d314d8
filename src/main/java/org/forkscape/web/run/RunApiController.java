package org.forkscape.web.run;

import java.util.List;
import org.forkscape.InputException;
import org.forkscape.run.StoredAnalysis;
import org.forkscape.run.StoredRun;
import org.forkscape.run.Workspace;
import org.forkscape.web.system.Lookup;
import org.springframework.http.HttpStatus;
import org.springframework.web.bind.annotation.GetMapping;
import org.springframework.web.bind.annotation.PathVariable;
import org.springframework.web.bind.annotation.PostMapping;
import org.springframework.web.bind.annotation.RequestBody;
import org.springframework.web.bind.annotation.RequestMapping;
import org.springframework.web.bind.annotation.ResponseStatus;
import org.springframework.web.bind.annotation.RestController;

/** The JSON face of runs: start, follow, cancel. */
@RestController
@RequestMapping("/api/analyses/{analysis}/runs")
class RunApiController {
    private final RunQueue queue;
    private final Workspace workspace;
    private final Lookup lookup;

    RunApiController(RunQueue queue, Workspace workspace, Lookup lookup) {
        this.queue = queue;
        this.workspace = workspace;
        this.lookup = lookup;
    }

    @GetMapping
    List<RunStatus> list(@PathVariable String analysis) {
        StoredAnalysis a = lookup.analysis(analysis);
        return workspace.runs(a.id()).stream().map(r -> queue.status(a.id(), r.id()).orElseThrow()).toList();
    }

    /** Starts a run of the plan in the body, or of the saved plan when the body is empty. */
    @PostMapping
    @ResponseStatus(HttpStatus.ACCEPTED)
    RunStatus start(@PathVariable String analysis, @RequestBody(required = false) String plan) {
        StoredAnalysis a = lookup.analysis(analysis);
        String text = plan == null || plan.isBlank() ? workspace.plan(a.id()).orElse(null) : plan;
        if (text == null) {
            throw new InputException("plan", "send a plan in the body or save one first");
        }
        StoredRun run = queue.submit(a, text);
        return queue.status(a.id(), run.id()).orElseThrow();
    }

    @GetMapping("/{run}")
    RunStatus status(@PathVariable String analysis, @PathVariable String run) {
        StoredAnalysis a = lookup.analysis(analysis);
        return queue.status(a.id(), lookup.run(a, run).id()).orElseThrow();
    }

    @PostMapping("/{run}/cancel")
    RunStatus cancel(@PathVariable String analysis, @PathVariable String run) {
        StoredAnalysis a = lookup.analysis(analysis);
        return queue.cancel(a.id(), lookup.run(a, run).id()).orElseThrow();
    }
}
