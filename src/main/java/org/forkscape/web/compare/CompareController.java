package org.forkscape.web.compare;

import java.io.IOException;
import java.io.InputStream;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import org.forkscape.InputException;
import org.forkscape.compare.ComparisonFiles;
import org.forkscape.run.RunState;
import org.forkscape.run.StoredAnalysis;
import org.forkscape.run.StoredRun;
import org.forkscape.run.Workspace;
import org.forkscape.web.system.Lookup;
import org.forkscape.web.system.NotFoundException;
import org.springframework.core.io.FileSystemResource;
import org.springframework.core.io.Resource;
import org.springframework.http.ContentDisposition;
import org.springframework.http.HttpHeaders;
import org.springframework.http.HttpStatus;
import org.springframework.http.MediaType;
import org.springframework.http.ResponseEntity;
import org.springframework.stereotype.Controller;
import org.springframework.web.bind.annotation.GetMapping;
import org.springframework.web.bind.annotation.PathVariable;
import org.springframework.web.bind.annotation.PostMapping;
import org.springframework.web.bind.annotation.RequestParam;
import org.springframework.web.multipart.MultipartFile;
import org.springframework.web.servlet.ModelAndView;

/**
 * The compare page: pick two finished runs of an analysis, or one and an uploaded run folder, then see what
 * the second changes (drawn in the browser from {@link CompareApiController}'s JSON), with compare.csv and
 * compare.json for download. A bad choice or upload comes back on the pick page as one sentence.
 */
@Controller
class CompareController {
    static final String PICK = "compare/pick";
    static final String SHOW = "compare/compare";

    private final ComparisonService comparisons;
    private final Workspace workspace;
    private final Lookup lookup;

    CompareController(ComparisonService comparisons, Workspace workspace, Lookup lookup) {
        this.comparisons = comparisons;
        this.workspace = workspace;
        this.lookup = lookup;
    }

    /** The pick page; {@code a} preselects the first run (the explore page links here with its run). */
    @GetMapping("/analyses/{analysis}/compare")
    ModelAndView pick(@PathVariable String analysis, @RequestParam(name = "a", defaultValue = "") String runA) {
        return pickPage(lookup.analysis(analysis), runA, "", null, HttpStatus.OK);
    }

    @PostMapping("/analyses/{analysis}/comparisons")
    ModelAndView compareRuns(@PathVariable String analysis, @RequestParam(name = "a", defaultValue = "") String runA,
            @RequestParam(name = "b", defaultValue = "") String runB) {
        StoredAnalysis a = lookup.analysis(analysis);
        try {
            return shown(a, comparisons.ofRuns(a, runA, runB));
        } catch (InputException e) {
            return pickPage(a, runA, runB, e, HttpStatus.BAD_REQUEST);
        }
    }

    @PostMapping("/analyses/{analysis}/comparisons/upload")
    ModelAndView compareUpload(@PathVariable String analysis, @RequestParam(name = "a", defaultValue = "") String runA,
            @RequestParam(name = "file", required = false) MultipartFile file) throws IOException {
        StoredAnalysis a = lookup.analysis(analysis);
        try {
            if (file == null || file.isEmpty()) {
                throw new InputException("file", "choose a zip of a run folder (its specifications.csv, summary.json "
                        + "and plan.json)");
            }
            try (InputStream in = file.getInputStream()) {
                return shown(a, comparisons.withUpload(a, runA, in, file.getOriginalFilename()));
            }
        } catch (InputException e) {
            return pickPage(a, runA, "", e, HttpStatus.BAD_REQUEST);
        }
    }

    @GetMapping("/analyses/{analysis}/comparisons/{comparison}")
    ModelAndView show(@PathVariable String analysis, @PathVariable String comparison) {
        StoredAnalysis a = lookup.analysis(analysis);
        ComparisonService.Kept kept = comparisons.read(a, comparison);
        ModelAndView page = new ModelAndView(SHOW);
        page.addObject("analysis", a);
        page.addObject("comparison", kept.id());
        page.addObject("runA", kept.record().path("a").path("run").asString(""));
        page.addObject("runB", kept.record().path("b").path("run").asString(""));
        page.addObject("uploadedB", kept.record().path("b").path("uploaded").asString(""));
        return page;
    }

    @GetMapping("/analyses/{analysis}/comparisons/{comparison}/files/{name}")
    ResponseEntity<Resource> file(@PathVariable String analysis, @PathVariable String comparison,
            @PathVariable String name) {
        StoredAnalysis a = lookup.analysis(analysis);
        ComparisonService.Kept kept = comparisons.read(a, comparison);
        // only the two offered names ever reach a path
        if (!ComparisonService.offered(name) || !Files.isRegularFile(kept.folder().resolve(name))) {
            throw new NotFoundException("a comparison offers " + ComparisonFiles.CSV + " and " + ComparisonFiles.JSON);
        }
        Path file = kept.folder().resolve(name);
        MediaType type = name.equals(ComparisonFiles.CSV) ? MediaType.parseMediaType("text/csv;charset=UTF-8")
                : MediaType.APPLICATION_JSON;
        return ResponseEntity.ok().contentType(type)
                .header(HttpHeaders.CONTENT_DISPOSITION, ContentDisposition.attachment()
                        .filename(a.id() + "-comparison-" + kept.id() + "-" + name).build().toString())
                .body(new FileSystemResource(file));
    }

    private static ModelAndView shown(StoredAnalysis a, String id) {
        return new ModelAndView("redirect:/analyses/" + a.id() + "/comparisons/" + id);
    }

    private ModelAndView pickPage(StoredAnalysis a, String runA, String runB, InputException problem,
            HttpStatus status) {
        List<StoredRun> finished = workspace.runs(a.id()).stream().filter(r -> r.state() == RunState.FINISHED)
                .toList();
        ModelAndView page = new ModelAndView(PICK);
        page.setStatus(status);
        page.addObject("analysis", a);
        page.addObject("runs", finished);
        // newest first: by default A is the earlier of the two newest, B the newest
        page.addObject("runA", !runA.isEmpty() ? runA : finished.size() > 1 ? finished.get(1).id()
                : finished.isEmpty() ? "" : finished.get(0).id());
        page.addObject("runB", !runB.isEmpty() ? runB : finished.isEmpty() ? "" : finished.get(0).id());
        page.addObject("problemWhere", problem == null ? "" : problem.where());
        page.addObject("problem", problem == null ? "" : problem.problem());
        return page;
    }
}
