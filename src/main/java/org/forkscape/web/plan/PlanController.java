package org.forkscape.web.plan;

import org.forkscape.InputException;
import org.forkscape.run.StoredAnalysis;
import org.forkscape.run.Workspace;
import org.forkscape.web.system.Lookup;
import org.springframework.stereotype.Controller;
import org.springframework.ui.Model;
import org.springframework.web.bind.annotation.GetMapping;
import org.springframework.web.bind.annotation.PathVariable;
import org.springframework.web.bind.annotation.PostMapping;
import org.springframework.web.bind.annotation.RequestParam;
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
            Model model) {
        StoredAnalysis a = lookup.analysis(analysis);
        String text = plans.current(a);
        model.addAttribute("analysis", a);
        model.addAttribute("dataFile", workspace.dataFile(a.id()).getFileName().toString());
        model.addAttribute("planText", text);
        model.addAttribute("check", plans.check(a, text));
        model.addAttribute("saved", saved != null);
        model.addAttribute("runs", workspace.runs(a.id()));
        return PlanPage.VIEW;
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
