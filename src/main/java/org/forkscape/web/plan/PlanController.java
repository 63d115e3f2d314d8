package org.forkscape.web.plan;

import org.forkscape.InputException;
import org.forkscape.run.StoredAnalysis;
import org.forkscape.run.Workspace;
import org.forkscape.web.system.Lookup;
import org.forkscape.web.system.NotFoundException;
import org.springframework.http.ContentDisposition;
import org.springframework.http.HttpHeaders;
import org.springframework.http.MediaType;
import org.springframework.http.ResponseEntity;
import org.springframework.stereotype.Controller;
import org.springframework.ui.Model;
import org.springframework.web.bind.annotation.GetMapping;
import org.springframework.web.bind.annotation.PathVariable;
import org.springframework.web.bind.annotation.PostMapping;
import org.springframework.web.bind.annotation.RequestParam;
import org.springframework.web.bind.annotation.ResponseBody;
import org.springframework.web.servlet.ModelAndView;

/**
 * The plan page. The form is drawn in the browser from the plan JSON; without scripts the page still
 * edits the plan as JSON text through {@link #save}.
 */
@Controller
class PlanController {

    private final PlanService plans;
    private final Workspace workspace;
    private final Lookup lookup;

    PlanController(PlanService plans, Workspace workspace, Lookup lookup) {
        this.plans = plans;
        this.workspace = workspace;
        this.lookup = lookup;
    }

    @GetMapping("/analyses/{analysis}/plan")
    String edit(@PathVariable String analysis, @RequestParam(name = "saved", required = false) String saved,
            @RequestParam(name = "restored", required = false) String restored, Model model) {
        StoredAnalysis a = lookup.analysis(analysis);
        String text = plans.current(a);
        model.addAttribute("analysis", a);
        model.addAttribute("dataFile", workspace.dataFile(a.id()).getFileName().toString());
        model.addAttribute("planText", text);
        model.addAttribute("check", plans.check(a, text));
        model.addAttribute("saved", saved != null);
        model.addAttribute("restored", restored == null ? "" : restored);
        model.addAttribute("runs", workspace.runs(a.id()));
        model.addAttribute("versions", PlanVersions.of(workspace, a));
        return PlanPage.VIEW;
    }

    /** One saved version of the plan, as it was saved, shown in the browser (not as a download). */
    @GetMapping(path = "/analyses/{analysis}/plan/versions/{version}", produces = "application/json")
    @ResponseBody
    ResponseEntity<String> version(@PathVariable String analysis, @PathVariable String version) {
        StoredAnalysis a = lookup.analysis(analysis);
        int n = PlanVersions.number(version);
        String text = workspace.planVersion(a.id(), n).orElseThrow(() -> new NotFoundException(
                "the plan has no version " + n));
        return ResponseEntity.ok().contentType(MediaType.APPLICATION_JSON)
                .header(HttpHeaders.CONTENT_DISPOSITION, ContentDisposition.inline()
                        .filename(a.id() + "-plan-version-" + n + ".json").build().toString())
                .body(text);
    }

    /** Makes a saved version the plan being edited again (a new version of the history says so). */
    @PostMapping("/analyses/{analysis}/plan/versions/{version}/restore")
    String restore(@PathVariable String analysis, @PathVariable String version) {
        StoredAnalysis a = lookup.analysis(analysis);
        int n = PlanVersions.number(version);
        if (workspace.planVersion(a.id(), n).isEmpty()) {
            throw new NotFoundException("the plan has no version " + n);
        }
        workspace.restorePlanVersion(a.id(), n);
        return "redirect:/analyses/" + a.id() + "/plan?restored=" + n;
    }

    @PostMapping("/analyses/{analysis}/plan")
    ModelAndView save(@PathVariable String analysis, @RequestParam(name = "plan", defaultValue = "") String plan) {
        StoredAnalysis a = lookup.analysis(analysis);
        try {
            plans.save(a, plan);
            return new ModelAndView("redirect:/analyses/" + a.id() + "/plan?saved");
        } catch (InputException e) {
            return PlanPage.withProblem(a, plan, plans, workspace);
        }
    }
}
