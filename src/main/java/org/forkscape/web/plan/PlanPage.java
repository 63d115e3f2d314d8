package org.forkscape.web.plan;

import org.forkscape.run.StoredAnalysis;
import org.forkscape.run.Workspace;
import org.springframework.http.HttpStatus;
import org.springframework.web.servlet.ModelAndView;

/** The plan page shown again with a plan that cannot run, its problem beside the JSON. */
public final class PlanPage {
    public static final String VIEW = "plan/edit";

    private PlanPage() {
    }

    public static ModelAndView withProblem(StoredAnalysis analysis, String planText, PlanService plans,
            Workspace workspace) {
        ModelAndView page = new ModelAndView(VIEW);
        page.setStatus(HttpStatus.BAD_REQUEST);
        page.addObject("analysis", analysis);
        page.addObject("planText", planText);
        page.addObject("check", plans.check(analysis, planText));
        page.addObject("saved", false);
        page.addObject("restored", "");
        page.addObject("runs", workspace.runs(analysis.id()));
        page.addObject("versions", PlanVersions.of(workspace, analysis));
        return page;
    }
}
