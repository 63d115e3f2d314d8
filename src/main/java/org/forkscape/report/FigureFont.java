package org.forkscape.report;

import java.awt.Font;
import java.awt.FontFormatException;
import java.io.IOException;
import java.io.InputStream;
import java.io.UncheckedIOException;

/**
 * The figure's one typeface, DejaVu Sans (Bitstream Vera licence, which allows bundling and embedding; the
 * licence is beside the font file), loaded from the jar so that the SVG, the PDF (which embeds it) and the
 * PNG are drawn with the same glyphs and metrics on any machine.
 */
final class FigureFont {
    static final String RESOURCE = "DejaVuSans.ttf";
    private static final Font BASE = load();

    private FigureFont() {
    }

    static Font of(float size) {
        return BASE.deriveFont(size);
    }

    /** The font file's bytes, for a PDF to embed. */
    static InputStream open() {
        InputStream in = FigureFont.class.getResourceAsStream(RESOURCE);
        if (in == null) {
            throw new IllegalStateException("the figure font " + RESOURCE + " is missing from the jar");
        }
        return in;
    }

    private static Font load() {
        try (InputStream in = open()) {
            return Font.createFont(Font.TRUETYPE_FONT, in);
        } catch (IOException e) {
            throw new UncheckedIOException("cannot read the figure font: " + e.getMessage(), e);
        } catch (FontFormatException e) {
            throw new IllegalStateException("the figure font cannot be read: " + e.getMessage(), e);
        }
    }
}
