package org.forkscape.web.check;

import java.nio.file.Path;
import org.forkscape.InputException;
import org.forkscape.check.ReleaseCheck;
import org.forkscape.run.StoredAnalysis;
import org.forkscape.run.StoredRun;
import org.forkscape.run.Workspace;
import org.forkscape.web.system.Lookup;
import org.springframework.stereotype.Controller;
import org.springframework.web.bind.annotation.PathVariable;
import org.springframework.web.bind.annotation.PostMapping;
import org.springframework.web.bind.annotation.RequestParam;
import org.springframework.web.servlet.mvc.support.RedirectAttributes;

/**
 * The explore page's release check: the policy typed in its form, checked by the same {@link ReleaseCheck}
 * as the batch command's {@code check}, written to the run folder's check.json, then back to the page
 * (redirect after post), which shows the rules; a bad policy comes back as one sentence with its JSON path.
 */
@Controller
class ReleaseCheckController {
    /** How messages name the policy typed in the page. */
    static final String FIELD = "policy";

    private final Workspace workspace;
    private final Lookup lookup;

    ReleaseCheckController(Workspace workspace, Lookup lookup) {
        this.workspace = workspace;
        this.lookup = lookup;
    }

    @PostMapping("/analyses/{analysis}/runs/{run}/check")
    String check(@PathVariable String analysis, @PathVariable String run,
            @RequestParam(name = "policy", defaultValue = "") String policy, RedirectAttributes flash) {
        StoredAnalysis a = lookup.analysis(analysis);
        StoredRun r = lookup.run(a, run);
        Path folder = workspace.runFolder(a.id(), r.id());
        flash.addFlashAttribute("policyText", policy);
        try {
            ReleaseCheck.of(folder, policy, FIELD).write(folder, "typed on the explore page");
        } catch (InputException e) {
            flash.addFlashAttribute("checkProblem", e.getMessage());
        }
        return "redirect:/analyses/" + a.id() + "/runs/" + r.id() + "#release-check";
    }
}
