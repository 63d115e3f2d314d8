package org.forkscape.web.run;

import org.forkscape.run.StoredAnalysis;
import org.forkscape.run.StoredRun;
import org.forkscape.run.Workspace;
import org.forkscape.web.analysis.AnalysisService;
import org.forkscape.web.system.Lookup;
import org.springframework.stereotype.Controller;
import org.springframework.ui.Model;
import org.springframework.web.bind.annotation.GetMapping;
import org.springframework.web.bind.annotation.PathVariable;
import org.springframework.web.bind.annotation.PostMapping;
import org.springframework.web.bind.annotation.RequestParam;

/**
 * Renaming, archiving and deleting an analysis and its runs. Deleting asks first, on a page of its own
 * (a plain form, so it works without scripts); the changes are POSTs, which the security filter refuses
 * from another origin as it does every change. A queued or running run cannot be renamed, archived or
 * deleted, nor can its analysis be deleted: the workspace refuses, and the page says why.
 */
@Controller
class ManageController {
    static final String MANAGE = "manage/manage";
    static final String CONFIRM = "manage/confirm-delete";

    private final AnalysisService analyses;
    private final Workspace workspace;
    private final Lookup lookup;

    ManageController(AnalysisService analyses, Workspace workspace, Lookup lookup) {
        this.analyses = analyses;
        this.workspace = workspace;
        this.lookup = lookup;
    }

    @GetMapping("/analyses/{analysis}/manage")
    String manage(@PathVariable String analysis, Model model) {
        StoredAnalysis a = lookup.analysis(analysis);
        model.addAttribute("analysis", a);
        model.addAttribute("runs", workspace.runs(a.id()));
        return MANAGE;
    }

    @PostMapping("/analyses/{analysis}/rename")
    String rename(@PathVariable String analysis, @RequestParam(defaultValue = "") String title) {
        StoredAnalysis a = lookup.analysis(analysis);
        analyses.relabel(a, title, a.archived());
        return redirectToManage(a);
    }

    @PostMapping("/analyses/{analysis}/archive")
    String archive(@PathVariable String analysis, @RequestParam boolean archived) {
        StoredAnalysis a = lookup.analysis(analysis);
        analyses.relabel(a, a.title(), archived);
        return redirectToManage(a);
    }

    @GetMapping("/analyses/{analysis}/delete")
    String confirmAnalysis(@PathVariable String analysis, Model model) {
        StoredAnalysis a = lookup.analysis(analysis);
        model.addAttribute("analysis", a);
        model.addAttribute("runs", workspace.runs(a.id()));
        return CONFIRM;
    }

    @PostMapping("/analyses/{analysis}/delete")
    String deleteAnalysis(@PathVariable String analysis) {
        analyses.delete(lookup.analysis(analysis));
        return "redirect:/";
    }

    @PostMapping("/analyses/{analysis}/runs/{run}/rename")
    String renameRun(@PathVariable String analysis, @PathVariable String run,
            @RequestParam(defaultValue = "") String name) {
        StoredAnalysis a = lookup.analysis(analysis);
        StoredRun r = lookup.run(a, run);
        workspace.updateRunLabels(r.labelled(AnalysisService.runName(name), r.archived()));
        return redirectToManage(a);
    }

    @PostMapping("/analyses/{analysis}/runs/{run}/archive")
    String archiveRun(@PathVariable String analysis, @PathVariable String run, @RequestParam boolean archived) {
        StoredAnalysis a = lookup.analysis(analysis);
        StoredRun r = lookup.run(a, run);
        workspace.updateRunLabels(r.labelled(r.name(), archived));
        return redirectToManage(a);
    }

    @GetMapping("/analyses/{analysis}/runs/{run}/delete")
    String confirmRun(@PathVariable String analysis, @PathVariable String run, Model model) {
        StoredAnalysis a = lookup.analysis(analysis);
        model.addAttribute("analysis", a);
        model.addAttribute("run", lookup.run(a, run));
        return CONFIRM;
    }

    @PostMapping("/analyses/{analysis}/runs/{run}/delete")
    String deleteRun(@PathVariable String analysis, @PathVariable String run) {
        StoredAnalysis a = lookup.analysis(analysis);
        workspace.deleteRun(a.id(), lookup.run(a, run).id());
        return redirectToManage(a);
    }

    private static String redirectToManage(StoredAnalysis a) {
        return "redirect:/analyses/" + a.id() + "/manage";
    }
}
