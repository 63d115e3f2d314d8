package org.forkscape.web.analysis;

import java.io.IOException;
import java.io.InputStream;
import java.util.List;
import org.forkscape.InputException;
import org.forkscape.run.StoredAnalysis;
import org.forkscape.web.system.Lookup;
import org.springframework.http.HttpStatus;
import org.springframework.web.bind.annotation.GetMapping;
import org.springframework.web.bind.annotation.PathVariable;
import org.springframework.web.bind.annotation.PostMapping;
import org.springframework.web.bind.annotation.RequestMapping;
import org.springframework.web.bind.annotation.RequestParam;
import org.springframework.web.bind.annotation.ResponseStatus;
import org.springframework.web.bind.annotation.RestController;
import org.springframework.web.multipart.MultipartFile;

/** The JSON face of the home and data pages. */
@RestController
@RequestMapping("/api/analyses")
class AnalysisApiController {
    private final AnalysisService analyses;
    private final Lookup lookup;

    AnalysisApiController(AnalysisService analyses, Lookup lookup) {
        this.analyses = analyses;
        this.lookup = lookup;
    }

    /** An analysis with its columns. */
    record AnalysisView(StoredAnalysis analysis, List<ColumnOverview> columns) {
    }

    @GetMapping
    List<StoredAnalysis> list() {
        return analyses.all();
    }

    @PostMapping
    @ResponseStatus(HttpStatus.CREATED)
    AnalysisView upload(@RequestParam(name = "file", required = false) MultipartFile file,
            @RequestParam(name = "title", required = false) String title) throws IOException {
        if (AnalysisService.noFileChosen(file)) {
            throw new InputException("file", "send the data file (CSV or Parquet) as the form field \"file\"; it is missing");
        }
        try (InputStream in = file.getInputStream()) {
            StoredAnalysis a = analyses.create(title, file.getOriginalFilename(), in, false);
            return new AnalysisView(a, ColumnOverview.of(analyses.table(a)));
        }
    }

    @GetMapping("/{analysis}")
    AnalysisView get(@PathVariable String analysis) {
        StoredAnalysis a = lookup.analysis(analysis);
        return new AnalysisView(a, ColumnOverview.of(analyses.table(a)));
    }
}
