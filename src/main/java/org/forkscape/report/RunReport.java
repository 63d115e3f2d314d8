package org.forkscape.report;

import java.nio.file.Path;
import java.util.List;
import java.util.Optional;
import org.forkscape.check.ReleaseCheck;
import org.forkscape.run.AtomicFiles;
import org.forkscape.web.explore.RankedRun;
import org.forkscape.web.explore.ShownSet;
import tools.jackson.databind.JsonNode;

/**
 * Everything for print from one finished run: the figure in three formats, the headline table in LaTeX
 * and Markdown, the methods paragraph and the self-contained HTML report, written into one folder.
 */
public final class RunReport {
    /** The files a report writes, in this order. */
    public static final List<String> FILES = List.of("figure.svg", "figure.pdf", "figure.png", "table.tex",
            "table.md", "methods.md", "report.html");

    private RunReport() {
    }

    /**
     * @param ranked   the run ranked on the report's scale
     * @param summary  the run's summary.json
     * @param group    the comparable group of the figure on a scale with units, blank for the first fitted
     * @param check    the release check recorded in the run folder (its check.json), if one was run
     * @param runWords the run in words for captions ("run folder results")
     */
    public static void write(Path out, RankedRun ranked, JsonNode summary, Optional<ReleaseCheck> check,
            String group, FigureSize size, String title, String runWords) {
        ShownSet shown = ShownSet.of(ranked, "", "estimate", group);
        CurveFigure figure = CurveFigure.of(ranked, shown, -1, size, runWords);
        String svg = FigureFiles.svg(figure);
        HeadlineTable table = HeadlineTable.of(summary, ranked);
        String methods = MethodsText.of(ranked.run().plan(), summary, ranked.scale());
        AtomicFiles.writeString(out.resolve("figure.svg"), svg);
        AtomicFiles.write(out.resolve("figure.pdf"), out2 -> out2.write(FigureFiles.pdf(figure)));
        AtomicFiles.write(out.resolve("figure.png"), out2 -> out2.write(FigureFiles.png(figure)));
        AtomicFiles.writeString(out.resolve("table.tex"), LatexTable.of(table, runWords));
        AtomicFiles.writeString(out.resolve("table.md"), MarkdownTable.of(table, runWords));
        AtomicFiles.writeString(out.resolve("methods.md"), methods);
        AtomicFiles.writeString(out.resolve("report.html"), HtmlReport.of(title, svg, table, methods, summary,
                check, runWords));
    }
}
