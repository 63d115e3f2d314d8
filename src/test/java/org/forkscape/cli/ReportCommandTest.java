package org.forkscape.cli;

import static org.forkscape.cli.CommandLineTest.run;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.junit.jupiter.api.Assumptions.assumeTrue;

import java.io.ByteArrayInputStream;
import java.io.File;
import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.concurrent.TimeUnit;
import javax.xml.parsers.DocumentBuilderFactory;
import org.apache.pdfbox.Loader;
import org.apache.pdfbox.cos.COSName;
import org.apache.pdfbox.pdmodel.PDDocument;
import org.apache.pdfbox.pdmodel.PDPage;
import org.apache.pdfbox.pdmodel.PDResources;
import org.apache.pdfbox.pdmodel.font.PDFont;
import org.apache.pdfbox.pdmodel.graphics.PDXObject;
import org.apache.pdfbox.pdmodel.graphics.form.PDFormXObject;
import org.forkscape.cli.CommandLineTest.Outcome;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.w3c.dom.Document;
import org.w3c.dom.Element;
import org.w3c.dom.NodeList;
import tools.jackson.databind.JsonNode;
import tools.jackson.databind.json.JsonMapper;

/**
 * {@code report RUN_DIR --out DIR}: every file is read back by a parser that is not the project's (the
 * JDK's XML parser, PDFBox's loader, ImageIO) and its numbers are compared with the run's summary.json.
 */
class ReportCommandTest {
    private static final double MM = 72 / 25.4;
    @TempDir
    static Path dir;
    static Path runFolder;
    static Path out;
    static JsonNode summary;

    @BeforeAll
    static void runAndReport() throws IOException {
        runFolder = ReportFixture.runFolder(dir, ReportFixture.ONE_GROUP, "--null-draws", "19", "--seed", "5");
        out = dir.resolve("report");
        Outcome o = ReportFixture.report(runFolder, out);
        assertTrue(o.out().startsWith("report of 32 specifications on the as fitted scale in "), o.out());
        summary = JsonMapper.builder().build().readTree(runFolder.resolve("summary.json").toFile());
    }

    @Test
    void writesEveryFile() {
        for (String name : List.of("figure.svg", "figure.pdf", "figure.png", "table.tex", "table.md", "methods.md",
                "report.html")) {
            assertTrue(Files.isRegularFile(out.resolve(name)), name);
        }
    }

    /** One mark (an SVG group with the id spec-N) per fitted specification, each of the run's numbers once. */
    @Test
    void theSvgIsWellFormedWithOneMarkPerSpecification() throws Exception {
        Document svg = parse(out.resolve("figure.svg"));
        List<String> marks = ids(svg, "spec-");
        assertEquals(summary.path("fitted").asInt(), marks.size());
        assertEquals(32, marks.size());
        for (int s = 1; s <= 32; s++) {
            assertTrue(marks.contains("spec-" + s), "spec-" + s);
        }
        assertEquals(List.of(), ids(svg, "bin-"));
        Element root = svg.getDocumentElement();
        assertEquals(89 * MM, Double.parseDouble(root.getAttribute("width").replace("pt", "")), 1e-6);
        assertTrue(text(svg).contains("A robust curve is not proof of a causal effect"), text(svg));
    }

    /** One page of 89 mm by the SVG's height, every font embedded (PDFBox's own reading of the file). */
    @Test
    void thePdfHasOnePageOfTheColumnWidthWithEmbeddedFonts() throws Exception {
        double svgHeight = Double.parseDouble(parse(out.resolve("figure.svg")).getDocumentElement()
                .getAttribute("height").replace("pt", ""));
        try (PDDocument pdf = Loader.loadPDF(out.resolve("figure.pdf").toFile())) {
            assertEquals(1, pdf.getNumberOfPages());
            PDPage page = pdf.getPage(0);
            assertEquals(89 * MM, page.getMediaBox().getWidth(), 0.01);
            assertEquals(svgHeight, page.getMediaBox().getHeight(), 0.01);
            List<PDFont> fonts = new ArrayList<>();
            fonts(page.getResources(), fonts);
            assertFalse(fonts.isEmpty(), "the figure's text should use a font");
            for (PDFont f : fonts) {
                assertTrue(f.isEmbedded(), f.getName() + " is not embedded");
                assertTrue(f.getName().contains("DejaVuSans"), f.getName());
            }
        }
    }

    @Test
    void thePngIsThreeHundredDotsPerInchOfTheColumn() throws IOException {
        var image = javax.imageio.ImageIO.read(out.resolve("figure.png").toFile());
        assertEquals(Math.ceil(89 * MM * 300 / 72), image.getWidth(), 0.5);
    }

    @Test
    void thePageSizeIsOneHundredAndEightyThreeMillimetresWide() throws Exception {
        Path page = dir.resolve("page");
        ReportFixture.report(runFolder, page, "--size", "page");
        try (PDDocument pdf = Loader.loadPDF(page.resolve("figure.pdf").toFile())) {
            assertEquals(183 * MM, pdf.getPage(0).getMediaBox().getWidth(), 0.01);
        }
    }

    /** The LaTeX table's cells against summary.json: scales.groups, interval_bounds, null.tests. */
    @Test
    void theLatexTableHoldsSummaryJsonsNumbers() throws IOException {
        String tex = Files.readString(out.resolve("table.tex"));
        assertTrue(tex.contains("\\toprule") && tex.contains("\\midrule") && tex.contains("\\bottomrule"), tex);
        List<List<String>> rows = latexRows(tex);
        checkHeadline(rows.get(0), "\\%");
        JsonNode tests = summary.path("null").path("tests");
        List<String> keys = List.of("median", "share_significant", "stouffer");
        for (int t = 0; t < 3; t++) {
            List<String> row = rows.get(1 + t);
            assertEquals(tests.path(keys.get(t)).path("exceedances").asInt(), Integer.parseInt(row.get(2)), row.toString());
            assertEquals(19, tests.path(keys.get(t)).path("draws").asInt());
            assertEquals("19", row.get(3));
        }
        assertEquals(4, rows.size());
    }

    /** Compiled by pdflatex when a TeX installation is on the PATH. */
    @Test
    void theLatexTableCompiles() throws Exception {
        assumeTrue(onPath("pdflatex"), "pdflatex is not installed on this machine (no TeX installation), so the "
                + "table's compilation cannot be checked here");
        Path tex = dir.resolve("latex");
        Files.createDirectories(tex);
        Files.writeString(tex.resolve("doc.tex"), "\\documentclass{article}\n\\usepackage[T1]{fontenc}\n"
                + "\\usepackage[utf8]{inputenc}\n\\usepackage{booktabs}\n\\usepackage{graphicx}\n"
                + "\\begin{document}\n\\input{" + out.resolve("table.tex").toAbsolutePath() + "}\n\\end{document}\n");
        Process p = new ProcessBuilder("pdflatex", "-interaction=nonstopmode", "-halt-on-error", "doc.tex")
                .directory(tex.toFile()).redirectErrorStream(true).redirectOutput(tex.resolve("log.txt").toFile())
                .start();
        assertTrue(p.waitFor(120, TimeUnit.SECONDS));
        assertEquals(0, p.exitValue(), Files.readString(tex.resolve("log.txt")));
        assertTrue(Files.size(tex.resolve("doc.pdf")) > 0);
    }

    @Test
    void theMarkdownTableHoldsSummaryJsonsNumbers() throws IOException {
        List<List<String>> rows = new ArrayList<>();
        for (String line : Files.readAllLines(out.resolve("table.md"))) {
            if (line.startsWith("| ")) {
                List<String> cells = Arrays.stream(line.substring(1, line.length() - 1).split(" \\| "))
                        .map(String::strip).toList();
                rows.add(cells);
            }
        }
        assertTrue(Files.readString(out.resolve("table.md")).contains("Unit: turnout per unit of outreach (hours)."));
        assertEquals("Comparable group", rows.get(0).get(0));
        checkHeadline(rows.get(1), "%");
        assertEquals("Joint test", rows.get(2).get(0));
        assertEquals(6, rows.size());
    }

    @Test
    void theMethodsNameTheSourcesOfWhatTheRunUsed() throws IOException {
        String methods = Files.readString(out.resolve("methods.md"));
        assertTrue(methods.contains("White 1980"), methods);
        assertTrue(methods.contains("Simonsohn, Simmons & Nelson 2020"), methods);
        assertTrue(methods.contains("19 null draws"), methods);
        assertTrue(methods.contains("Leamer 1983"), methods);
        assertFalse(methods.contains("MacKinnon & White 1985"), "the run used no HC2 or HC3: " + methods);
        assertFalse(methods.contains("Cameron & Miller 2015"), "the run used no cluster errors: " + methods);
        assertTrue(methods.contains("Forkscape " + org.forkscape.Version.current()), methods);
    }

    /** A set above 2,500 specifications is drawn in bins: each bin one mark, the bins together the whole set. */
    @Test
    void aLargeSetOnAUnitFreeScaleIsDrawnInBins() throws Exception {
        Path large = dir.resolve("large");
        Files.createDirectories(large);
        Path folder = ReportFixture.runFolder(large, ReportFixture.LARGE);
        JsonNode s = JsonMapper.builder().build().readTree(folder.resolve("summary.json").toFile());
        Path report = large.resolve("report");
        ReportFixture.report(folder, report, "--scale", "t");
        Document svg = parse(report.resolve("figure.svg"));
        List<String> bins = ids(svg, "bin-");
        assertEquals(List.of(), ids(svg, "spec-"));
        assertTrue(bins.size() >= 50 && bins.size() < s.path("fitted").asInt(), bins.size() + " bins");
        for (int b = 0; b < bins.size(); b++) {
            assertTrue(bins.contains("bin-" + b), "bin-" + b);
        }
        assertTrue(text(svg).contains("T statistic: t statistic of outreach"), text(svg));
        // the t scale is unit-free: one row over every group, its count summary.json's
        String md = Files.readString(report.resolve("table.md"));
        assertTrue(md.contains("| every specification | " + String.format("%,d",
                s.path("scales").path("t_statistic").path("specifications").asInt()) + " |"), md);
        // as fitted the two outcomes are two groups: two rows, and the figure shows group 1 alone
        Path fitted = large.resolve("fitted");
        ReportFixture.report(folder, fitted, "--group", "1");
        String table = Files.readString(fitted.resolve("table.md"));
        assertTrue(table.contains("| turnout on hours | ") && table.contains("| turnout change on hours | "), table);
        assertTrue(table.contains("Units (estimates of different rows are not comparable): turnout on hours: turnout "
                + "per unit of outreach (hours); turnout change on hours: turnout change per unit of outreach (hours)."),
                table);
        String caption = text(parse(fitted.resolve("figure.svg")));
        assertTrue(caption.contains("comparable group turnout change on hours"), caption);
    }

    @Test
    void aMissingRunFolderIsOneLineAndExitCodeTwo() {
        Outcome o = run("report", dir.resolve("nowhere").toString(), "--out", dir.resolve("x").toString());
        assertEquals(2, o.code());
        assertTrue(o.line().startsWith("forkscape: run folder ") && o.line().contains("is not a folder"), o.err());
        assertFalse(Files.exists(dir.resolve("x")));
    }

    @Test
    void anUnknownScaleSizeOrGroupIsOneLineAndExitCodeTwo() {
        Outcome scale = run("report", runFolder.toString(), "--out", dir.resolve("y").toString(), "--scale", "logodds");
        assertEquals(2, scale.code());
        assertEquals("forkscape: --scale \"logodds\" is not a scale; use fitted, effect, standardized, partial or t",
                scale.line());
        Outcome size = run("report", runFolder.toString(), "--out", dir.resolve("y").toString(), "--size", "poster");
        assertEquals(2, size.code());
        assertTrue(size.line().startsWith("forkscape: --size: \"poster\" is not a figure size"), size.err());
        Outcome group = run("report", runFolder.toString(), "--out", dir.resolve("y").toString(), "--group", "4");
        assertEquals(2, group.code());
        assertTrue(group.line().startsWith("forkscape: --group \"4\" is not a comparable group"), group.err());
        Outcome noOut = run("report", runFolder.toString());
        assertEquals(2, noOut.code());
        assertTrue(noOut.line().startsWith("forkscape: report needs --out DIR"), noOut.err());
        assertFalse(Files.exists(dir.resolve("y")));
    }

    /**
     * The headline row against summary.json: count, median and quartiles (four significant digits), the shares
     * (percent, one decimal), and the extreme bounds, which for a run of one comparable group are the whole
     * run's interval_bounds.
     */
    private static void checkHeadline(List<String> row, String percent) {
        JsonNode g = summary.path("scales").path("groups").get(0);
        assertEquals("turnout on hours", row.get(0));
        assertEquals(g.path("specifications").asInt(), Integer.parseInt(row.get(1)));
        close(g.path("median").asDouble(), row.get(2));
        close(g.path("lower_quartile").asDouble(), row.get(3));
        close(g.path("upper_quartile").asDouble(), row.get(4));
        share(g.path("share_positive").asDouble(), row.get(5), percent);
        share(g.path("share_significant_positive").asDouble(), row.get(6), percent);
        share(g.path("share_significant_negative").asDouble(), row.get(7), percent);
        close(summary.path("interval_bounds").path("lower").asDouble(), row.get(8));
        close(summary.path("interval_bounds").path("upper").asDouble(), row.get(9));
    }

    /** Four significant digits: within half a unit of the fourth. */
    private static void close(double expected, String cell) {
        double v = Double.parseDouble(cell.replace(",", ""));
        assertEquals(expected, v, Math.abs(expected) * 5e-4 + 1e-300, cell);
    }

    private static void share(double expected, String cell, String percent) {
        assertTrue(cell.endsWith(percent), cell);
        double v = Double.parseDouble(cell.substring(0, cell.length() - percent.length()));
        assertEquals(100 * expected, v, 0.05, cell);
    }

    /** The data rows of every tabular of the fragment, cells unescaped of their row ending. */
    private static List<List<String>> latexRows(String tex) {
        List<List<String>> rows = new ArrayList<>();
        boolean body = false;
        for (String line : tex.split("\n")) {
            if (line.equals("\\midrule")) {
                body = true;
            } else if (line.equals("\\bottomrule")) {
                body = false;
            } else if (body) {
                assertTrue(line.endsWith(" \\\\"), line);
                rows.add(Arrays.stream(line.substring(0, line.length() - 3).split(" & ")).map(String::strip).toList());
            }
        }
        return rows;
    }

    static Document parse(Path file) throws Exception {
        DocumentBuilderFactory f = DocumentBuilderFactory.newInstance();
        f.setNamespaceAware(true);
        return f.newDocumentBuilder().parse(new ByteArrayInputStream(Files.readAllBytes(file)));
    }

    /** The SVG's text elements joined by spaces (a caption wraps onto several). */
    static String text(Document svg) {
        NodeList texts = svg.getElementsByTagNameNS("http://www.w3.org/2000/svg", "text");
        List<String> words = new ArrayList<>();
        for (int i = 0; i < texts.getLength(); i++) {
            words.add(texts.item(i).getTextContent());
        }
        return String.join(" ", words);
    }

    /** The ids of the SVG's groups that start with {@code prefix}. */
    static List<String> ids(Document svg, String prefix) {
        NodeList groups = svg.getElementsByTagNameNS("http://www.w3.org/2000/svg", "g");
        List<String> ids = new ArrayList<>();
        for (int i = 0; i < groups.getLength(); i++) {
            String id = ((Element) groups.item(i)).getAttribute("id");
            if (id.startsWith(prefix)) {
                ids.add(id);
            }
        }
        return ids;
    }

    /** Every font of the resources and of the form XObjects in them (the adapter draws into a form). */
    private static void fonts(PDResources resources, List<PDFont> out) throws IOException {
        if (resources == null) {
            return;
        }
        for (COSName name : resources.getFontNames()) {
            out.add(resources.getFont(name));
        }
        for (COSName name : resources.getXObjectNames()) {
            PDXObject x = resources.getXObject(name);
            if (x instanceof PDFormXObject form) {
                fonts(form.getResources(), out);
            }
        }
    }

    private static boolean onPath(String program) {
        String path = System.getenv("PATH");
        return path != null && Arrays.stream(path.split(File.pathSeparator))
                .anyMatch(d -> Files.isExecutable(Path.of(d, program)));
    }
}
