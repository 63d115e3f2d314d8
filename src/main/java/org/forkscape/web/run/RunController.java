package org.forkscape.web.run;

import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import java.util.Map;
import java.util.Optional;
import org.forkscape.InputException;
import org.forkscape.Version;
import org.forkscape.check.ReleaseCheck;
import org.forkscape.infer.NullDrawsCsv;
import org.forkscape.infer.OverfittingCsv;
import org.forkscape.run.Json;
import org.forkscape.run.PlanLock;
import org.forkscape.run.RunOutputs;
import org.forkscape.run.RunState;
import org.forkscape.run.StoredAnalysis;
import org.forkscape.run.StoredRun;
import org.forkscape.run.Workspace;
import org.forkscape.web.check.ReleaseCheckPanel;
import org.forkscape.web.plan.PlanPage;
import org.forkscape.web.plan.PlanService;
import org.forkscape.web.plan.PlanVersions;
import org.forkscape.web.system.Lookup;
import org.forkscape.web.system.NotFoundException;
import org.springframework.core.io.FileSystemResource;
import org.springframework.core.io.Resource;
import org.springframework.http.ContentDisposition;
import org.springframework.http.HttpHeaders;
import org.springframework.http.MediaType;
import org.springframework.http.ResponseEntity;
import org.springframework.stereotype.Controller;
import org.springframework.ui.Model;
import org.springframework.web.bind.annotation.GetMapping;
import org.springframework.web.bind.annotation.PathVariable;
import org.springframework.web.bind.annotation.PostMapping;
import org.springframework.web.servlet.ModelAndView;

/**
 * A run's page: its progress while it is queued or computing, the explorer once it has finished, what
 * happened otherwise; and its files for download.
 */
@Controller
class RunController {
    static final String PROGRESS = "run/progress";
    static final String EXPLORE = "explore/explore";

    /** The files a run may offer, with their types; nothing else in a run folder is served. */
    private static final MediaType CSV = MediaType.parseMediaType("text/csv;charset=UTF-8");
    private static final Map<String, MediaType> FILES = Map.of(
            RunOutputs.SPECIFICATIONS, CSV,
            RunOutputs.SUMMARY, MediaType.APPLICATION_JSON,
            RunOutputs.PLAN, MediaType.APPLICATION_JSON,
            NullDrawsCsv.FILE, CSV,
            OverfittingCsv.FILE, CSV,
            ReleaseCheck.FILE, MediaType.APPLICATION_JSON,
            Workspace.LOG, MediaType.parseMediaType("text/plain;charset=UTF-8"));
    /** Files of the inference stage, offered beside the explorer's exports when the run wrote them. */
    private static final List<String> MORE_FILES = List.of(NullDrawsCsv.FILE, OverfittingCsv.FILE, ReleaseCheck.FILE, Workspace.LOG);

    private final RunQueue queue;
    private final PlanService plans;
    private final Workspace workspace;
    private final Lookup lookup;

    RunController(RunQueue queue, PlanService plans, Workspace workspace, Lookup lookup) {
        this.queue = queue;
        this.plans = plans;
        this.workspace = workspace;
        this.lookup = lookup;
    }

    /** Runs the saved plan. */
    @PostMapping("/analyses/{analysis}/runs")
    ModelAndView start(@PathVariable String analysis) {
        StoredAnalysis a = lookup.analysis(analysis);
        String plan = workspace.plan(a.id()).orElse(null);
        if (plan == null) {
            throw new InputException("plan", "save the plan before running it");
        }
        try {
            StoredRun run = queue.submit(a, plan);
            return new ModelAndView("redirect:/analyses/" + a.id() + "/runs/" + run.id());
        } catch (InputException e) {
            return PlanPage.withProblem(a, plan, plans, workspace);
        }
    }

    @GetMapping("/analyses/{analysis}/runs/{run}")
    String show(@PathVariable String analysis, @PathVariable String run, Model model) {
        StoredAnalysis a = lookup.analysis(analysis);
        StoredRun r = lookup.run(a, run);
        model.addAttribute("analysis", a);
        model.addAttribute("run", r);
        if (r.state() == RunState.FINISHED) {
            Path folder = workspace.runFolder(a.id(), r.id());
            model.addAttribute("moreFiles", MORE_FILES.stream().filter(f -> Files.isRegularFile(folder.resolve(f))).toList());
            model.addAttribute("downloadPrefix", DownloadNames.prefix(a, r));
            model.addAttribute("version", Version.current());
            model.addAttribute("planLock", recordedLock(folder).orElse(null));
            model.addAttribute("releaseCheck", ReleaseCheckPanel.of(folder));
            model.addAttribute("planVersion", PlanVersions.ranVersion(workspace, r).orElse(null));
            return EXPLORE;
        }
        model.addAttribute("status", queue.status(a.id(), r.id()).orElseThrow());
        return PROGRESS;
    }

    /** What the run recorded about its plan's lock (summary.json's {@code provenance.lock}). */
    private static Optional<PlanLock.Status> recordedLock(Path folder) {
        return PlanLock.Status.recorded(Json.MAPPER.readTree(folder.resolve(RunOutputs.SUMMARY).toFile())
                .path("provenance"));
    }

    @PostMapping("/analyses/{analysis}/runs/{run}/cancel")
    String cancel(@PathVariable String analysis, @PathVariable String run) {
        StoredAnalysis a = lookup.analysis(analysis);
        StoredRun r = lookup.run(a, run);
        queue.cancel(a.id(), r.id());
        return "redirect:/analyses/" + a.id() + "/runs/" + r.id();
    }

    /** Runs the plan of an earlier run again (after an interruption, a cancel or a failure). */
    @PostMapping("/analyses/{analysis}/runs/{run}/again")
    String again(@PathVariable String analysis, @PathVariable String run) {
        StoredAnalysis a = lookup.analysis(analysis);
        StoredRun r = lookup.run(a, run);
        StoredRun next = queue.submit(a, workspace.runPlan(a.id(), r.id()));
        return "redirect:/analyses/" + a.id() + "/runs/" + next.id();
    }

    @GetMapping("/analyses/{analysis}/runs/{run}/files/{name}")
    ResponseEntity<Resource> file(@PathVariable String analysis, @PathVariable String run, @PathVariable String name) {
        StoredAnalysis a = lookup.analysis(analysis);
        StoredRun r = lookup.run(a, run);
        MediaType type = FILES.get(name);
        Path file = type == null ? null : workspace.runFolder(a.id(), r.id()).resolve(name);
        if (file == null || !Files.isRegularFile(file)) {
            throw new NotFoundException("run " + r.id() + " has no file of that name; its files are "
                    + String.join(", ", FILES.keySet().stream().sorted().toList()) + " (once written)");
        }
        return ResponseEntity.ok().contentType(type)
                .header(HttpHeaders.CONTENT_DISPOSITION, ContentDisposition.attachment()
                        .filename(DownloadNames.of(a, r, name)).build().toString())
                .body(new FileSystemResource(file));
    }
}
