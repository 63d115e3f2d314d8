package org.forkscape.web.analysis;

import java.io.IOException;
import java.io.InputStream;
import java.util.List;
import org.forkscape.data.DataException;
import org.forkscape.data.Table;
import org.forkscape.run.StoredAnalysis;
import org.forkscape.run.Workspace;
import org.forkscape.web.system.Lookup;
import org.forkscape.web.system.MemoryBudgetException;
import org.springframework.http.HttpStatus;
import org.springframework.stereotype.Controller;
import org.springframework.ui.Model;
import org.springframework.web.bind.annotation.GetMapping;
import org.springframework.web.bind.annotation.PathVariable;
import org.springframework.web.bind.annotation.PostMapping;
import org.springframework.web.bind.annotation.RequestParam;
import org.springframework.web.multipart.MultipartFile;
import org.springframework.web.servlet.ModelAndView;

/** The home page (analyses, upload, the demo) and an analysis's data page. */
@Controller
class HomeController {
    static final String HOME = "home/index";
    static final String DATA = "data/overview";
    /** Columns the data page lists (with {@link ShownText}'s cut, at most some 2.5 MB of page); the JSON has all. */
    static final int SHOWN_COLUMNS = 1_000;

    private final AnalysisService analyses;
    private final Workspace workspace;
    private final Lookup lookup;

    HomeController(AnalysisService analyses, Workspace workspace, Lookup lookup) {
        this.analyses = analyses;
        this.workspace = workspace;
        this.lookup = lookup;
    }

    @GetMapping("/")
    String home(Model model) {
        model.addAttribute("cards", cards());
        model.addAttribute("archived", archived());
        return HOME;
    }

    @PostMapping("/analyses")
    ModelAndView upload(@RequestParam(name = "file", required = false) MultipartFile file,
            @RequestParam(name = "title", required = false) String title) throws IOException {
        if (AnalysisService.noFileChosen(file)) {
            return homeWithProblem(title, "Choose a CSV or Parquet file to upload.", HttpStatus.BAD_REQUEST);
        }
        try (InputStream in = file.getInputStream()) {
            StoredAnalysis a = analyses.create(title, file.getOriginalFilename(), in, false);
            return new ModelAndView("redirect:/analyses/" + a.id());
        } catch (DataException e) {
            return homeWithProblem(title, e.getMessage(), HttpStatus.BAD_REQUEST);
        } catch (MemoryBudgetException e) {
            return homeWithProblem(title, e.getMessage(), e.overLimit() ? HttpStatus.INSUFFICIENT_STORAGE
                    : HttpStatus.SERVICE_UNAVAILABLE);
        }
    }

    @GetMapping("/analyses/{analysis}")
    String data(@PathVariable String analysis, Model model) {
        StoredAnalysis a = lookup.analysis(analysis);
        model.addAttribute("analysis", a);
        Table table = analyses.table(a);
        List<ColumnOverview> shown = ColumnOverview.of(table, SHOWN_COLUMNS);
        model.addAttribute("columns", shown);
        model.addAttribute("textCut", shown.stream().anyMatch(ColumnOverview::hasCutText));
        model.addAttribute("hiddenColumns", table.columns().size() - shown.size());
        model.addAttribute("runs", workspace.runs(a.id()));
        return DATA;
    }

    private ModelAndView homeWithProblem(String title, String problem, HttpStatus status) {
        ModelAndView page = new ModelAndView(HOME);
        page.setStatus(status);
        page.addObject("cards", cards());
        page.addObject("archived", archived());
        page.addObject("uploadProblem", problem);
        page.addObject("uploadTitle", title);
        return page;
    }

    /** The analyses in use, with their runs (archived runs are left out of the cards' tables). */
    private List<AnalysisCard> cards() {
        return analyses.all().stream().filter(a -> !a.archived())
                .map(a -> new AnalysisCard(a, workspace.runs(a.id()))).toList();
    }

    /** The archived analyses, listed apart. */
    private List<StoredAnalysis> archived() {
        return analyses.all().stream().filter(StoredAnalysis::archived).toList();
    }
}
