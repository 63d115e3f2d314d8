package org.forkscape.web.figure;

import java.nio.charset.StandardCharsets;
import org.forkscape.InputException;
import org.forkscape.report.CurveFigure;
import org.forkscape.report.FigureFiles;
import org.forkscape.report.FigureSize;
import org.forkscape.run.StoredAnalysis;
import org.forkscape.run.StoredRun;
import org.forkscape.web.explore.ExploreService;
import org.forkscape.web.explore.RankedRun;
import org.forkscape.web.explore.ShownSet;
import org.forkscape.web.system.Lookup;
import org.springframework.http.ContentDisposition;
import org.springframework.http.HttpHeaders;
import org.springframework.http.MediaType;
import org.springframework.http.ResponseEntity;
import org.springframework.web.bind.annotation.GetMapping;
import org.springframework.web.bind.annotation.PathVariable;
import org.springframework.web.bind.annotation.RequestParam;
import org.springframework.web.bind.annotation.RestController;

/**
 * The explorer's export of the current view for print: the figure the batch command's {@code report}
 * draws ({@link CurveFigure}), of the set the curve request with the same {@code drop}, {@code sort},
 * {@code scale} and {@code group} shows, coloured by {@code colour} (a factor id, or none), as SVG, PDF or
 * PNG at a column's or a page's width.
 */
@RestController
class FigureController {
    private final ExploreService explore;
    private final Lookup lookup;

    FigureController(ExploreService explore, Lookup lookup) {
        this.explore = explore;
        this.lookup = lookup;
    }

    @GetMapping("/api/analyses/{analysis}/runs/{run}/figure")
    ResponseEntity<byte[]> figure(@PathVariable String analysis, @PathVariable String run,
            @RequestParam(name = "format", defaultValue = "svg") String format,
            @RequestParam(name = "drop", defaultValue = "") String drop,
            @RequestParam(name = "sort", defaultValue = "estimate") String sort,
            @RequestParam(name = "scale", defaultValue = "fitted") String scale,
            @RequestParam(name = "group", defaultValue = "") String group,
            @RequestParam(name = "colour", defaultValue = "") String colour,
            @RequestParam(name = "size", defaultValue = "column") String size) {
        StoredAnalysis a = lookup.analysis(analysis);
        StoredRun r = lookup.run(a, run);
        FigureFiles.Format f = FigureFiles.Format.named(format);
        if (f == null) {
            throw new InputException("format", "\"" + format.strip() + "\" is not a figure format; use svg, pdf or png");
        }
        FigureSize figureSize = FigureSize.named(size, "size");
        RankedRun ranked = explore.ranked(a, r, ShownSet.scaleOf(scale));
        ShownSet shown = explore.shown(a, r, ranked, drop, sort, group);
        CurveFigure figure = CurveFigure.of(ranked, shown, colourFactor(colour), figureSize,
                "run " + r.id() + " of analysis \"" + a.title() + "\" (" + a.id() + ")");
        String name = "specification-curve-" + a.id() + "-run-" + r.id() + "-" + shown.scale().word() + "."
                + f.word();
        return ResponseEntity.ok().contentType(MediaType.parseMediaType(f.mediaType()))
                .header(HttpHeaders.CONTENT_DISPOSITION, ContentDisposition.attachment()
                        .filename(name, StandardCharsets.UTF_8).build().toString())
                .body(FigureFiles.write(figure, f));
    }

    private static int colourFactor(String colour) {
        if (colour.isBlank() || colour.strip().equals("none")) {
            return -1;
        }
        try {
            return Integer.parseInt(colour.strip());
        } catch (NumberFormatException e) {
            throw new InputException("colour", "\"" + colour.strip() + "\" is not a factor id; use a whole number, "
                    + "or none");
        }
    }
}
