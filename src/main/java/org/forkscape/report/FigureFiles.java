package org.forkscape.report;

import de.rototor.pdfbox.graphics2d.PdfBoxGraphics2D;
import de.rototor.pdfbox.graphics2d.PdfBoxGraphics2DFontTextDrawer;
import java.awt.Graphics2D;
import java.awt.image.BufferedImage;
import java.io.ByteArrayOutputStream;
import java.io.IOException;
import java.io.InputStream;
import java.io.UncheckedIOException;
import java.nio.charset.StandardCharsets;
import javax.imageio.ImageIO;
import org.apache.pdfbox.pdmodel.PDDocument;
import org.apache.pdfbox.pdmodel.PDDocumentInformation;
import org.apache.pdfbox.pdmodel.PDPage;
import org.apache.pdfbox.pdmodel.PDPageContentStream;
import org.apache.pdfbox.pdmodel.common.PDRectangle;
import org.forkscape.Version;
import org.jfree.svg.SVGGraphics2D;
import org.jfree.svg.SVGHints;
import org.jfree.svg.SVGUnits;
import org.jfree.svg.ViewBox;

/**
 * The figure in its three formats, each from one {@link CurvePainter}: SVG through JFreeSVG, PDF through
 * PDFBox's Graphics2D adapter (one page the figure's size, the font embedded as a subset), PNG through an
 * image at {@value #PNG_DPI} dots per inch, the resolution journals ask of line art in halftone figures
 * (common practice).
 */
public final class FigureFiles {
    public static final int PNG_DPI = 300;

    /** The formats, by the file extension and request word. */
    public enum Format {
        SVG("svg", "image/svg+xml"),
        PDF("pdf", "application/pdf"),
        PNG("png", "image/png");

        private final String word;
        private final String mediaType;

        Format(String word, String mediaType) {
            this.word = word;
            this.mediaType = mediaType;
        }

        public String word() {
            return word;
        }

        public String mediaType() {
            return mediaType;
        }

        /** The format a word names, or {@code null}. */
        public static Format named(String word) {
            for (Format f : values()) {
                if (f.word.equalsIgnoreCase(word == null ? "" : word.strip())) {
                    return f;
                }
            }
            return null;
        }
    }

    private FigureFiles() {
    }

    public static byte[] write(CurveFigure figure, Format format) {
        return switch (format) {
            case SVG -> svg(figure).getBytes(StandardCharsets.UTF_8);
            case PDF -> pdf(figure);
            case PNG -> png(figure);
        };
    }

    /** A standalone SVG document, sized in points, text as text in the figure's font family. */
    public static String svg(CurveFigure figure) {
        CurvePainter painter = new CurvePainter(figure);
        SVGGraphics2D g = new SVGGraphics2D(painter.width(), painter.height(), SVGUnits.PT);
        g.setRenderingHint(SVGHints.KEY_DRAW_STRING_TYPE, SVGHints.VALUE_DRAW_STRING_TYPE_STANDARD);
        painter.paint(g);
        // the view box lets a page scale the figure (report.html draws it at the page's width)
        return "<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n" + g.getSVGElement("forkscape-figure", true,
                new ViewBox(0, 0, painter.width(), painter.height()), null, null)
                + "\n";
    }

    public static byte[] pdf(CurveFigure figure) {
        CurvePainter painter = new CurvePainter(figure);
        float width = (float) painter.width();
        float height = (float) painter.height();
        try (PDDocument document = new PDDocument();
                PdfBoxGraphics2DFontTextDrawer fonts = new PdfBoxGraphics2DFontTextDrawer();
                InputStream font = FigureFont.open()) {
            fonts.registerFont(FigureFont.of(1).getFontName(), font);
            PDPage page = new PDPage(new PDRectangle(width, height));
            document.addPage(page);
            PdfBoxGraphics2D g = new PdfBoxGraphics2D(document, width, height);
            g.setFontTextDrawer(fonts);
            painter.paint(g);
            g.dispose();
            try (PDPageContentStream content = new PDPageContentStream(document, page)) {
                content.drawForm(g.getXFormObject());
            }
            PDDocumentInformation info = document.getDocumentInformation();
            info.setTitle(figure.axisLabel());
            info.setCreator("Forkscape " + Version.current());
            ByteArrayOutputStream out = new ByteArrayOutputStream();
            document.save(out);
            return out.toByteArray();
        } catch (IOException e) {
            throw new UncheckedIOException("cannot write the figure as PDF: " + e.getMessage(), e);
        }
    }

    public static byte[] png(CurveFigure figure) {
        CurvePainter painter = new CurvePainter(figure);
        double scale = PNG_DPI / 72.0;
        BufferedImage image = new BufferedImage((int) Math.ceil(painter.width() * scale),
                (int) Math.ceil(painter.height() * scale), BufferedImage.TYPE_INT_RGB);
        Graphics2D g = image.createGraphics();
        g.scale(scale, scale);
        painter.paint(g);
        g.dispose();
        ByteArrayOutputStream out = new ByteArrayOutputStream();
        try {
            ImageIO.write(image, "png", out);
        } catch (IOException e) {
            throw new UncheckedIOException("cannot write the figure as PNG: " + e.getMessage(), e);
        }
        return out.toByteArray();
    }
}
