package org.forkscape.report;

import java.awt.Color;

/**
 * The explorer's palette (frontend/js/helpers.js, {@code PALETTE}, {@code ALTERNATIVE_COLOURS},
 * {@code SIGNIFICANCE}) for the print figure, so that a printed figure looks like the screen's. The curve
 * is one ink; significance is fill and interval weight, never hue, so the figure reads in greyscale. Keep
 * the two in step.
 */
final class FigurePalette {
    static final Color CURVE = new Color(0x2A3440);
    static final Color INK = new Color(0x1F1F1F);
    static final Color INK_SOFT = new Color(0x4A4A4A);
    static final Color RULE = new Color(0xC8C8C2);
    static final Color PAPER = Color.WHITE;
    /** rgba(120, 104, 72, 0.07): the shade behind every other decision of the grid. */
    static final Color DECISION_SHADE = new Color(120, 104, 72, Math.round(0.07f * 255));
    /** Any two differ by at least 6 in CIE L*, so they stay apart in greyscale (AlternativePaletteTest). */
    static final Color[] ALTERNATIVES = {new Color(0x1A2A4F), new Color(0xE3B23C), new Color(0x2F7F8F),
        new Color(0x8C3B12), new Color(0x6FA8D6), new Color(0x4E3A6E)};
    /** Interval opacity of a significant and of a not significant specification. */
    static final float SIGNIFICANT_ALPHA = 0.75f;
    static final float NOT_SIGNIFICANT_ALPHA = 0.35f;

    private FigurePalette() {
    }

    static Color withAlpha(Color c, double alpha) {
        return new Color(c.getRed(), c.getGreen(), c.getBlue(), (int) Math.round(Math.max(0, Math.min(1, alpha)) * 255));
    }
}
