package org.forkscape.report;

import java.util.Locale;
import org.forkscape.InputException;

/**
 * The print sizes of the figure: a journal's single column (about 89 mm wide) and its full text width
 * (about 183 mm), the two widths most journals ask figures to be drawn at (common practice; the exact
 * figures vary a little by publisher). Lengths are in PostScript points, 72 to the inch, the unit of PDF
 * and of the SVG's size; the height follows from what the figure holds (the grid has a row per
 * alternative).
 *
 * @param word      the spelling on the command line and in requests
 * @param widthMm   the figure's width in millimetres
 * @param fontSize  the text size in points (captions and labels; 6 to 8 pt is what journals accept), a whole
 *                  number because JFreeSVG writes font sizes as whole numbers
 * @param curveHeight the height of the curve panel in points
 * @param rowHeight the height of one row of the choice grid in points
 */
public enum FigureSize {
    COLUMN("column", 89, 7, 120, 8),
    PAGE("page", 183, 8, 190, 9.5);

    /** PostScript points per millimetre (72 per inch, 25.4 mm per inch). */
    public static final double POINTS_PER_MM = 72 / 25.4;

    private final String word;
    private final double widthMm;
    private final float fontSize;
    private final double curveHeight;
    private final double rowHeight;

    FigureSize(String word, double widthMm, float fontSize, double curveHeight, double rowHeight) {
        this.word = word;
        this.widthMm = widthMm;
        this.fontSize = fontSize;
        this.curveHeight = curveHeight;
        this.rowHeight = rowHeight;
    }

    public String word() {
        return word;
    }

    public double widthMm() {
        return widthMm;
    }

    /** The width in points. */
    public double width() {
        return widthMm * POINTS_PER_MM;
    }

    float fontSize() {
        return fontSize;
    }

    double curveHeight() {
        return curveHeight;
    }

    double rowHeight() {
        return rowHeight;
    }

    /** The size a word names; blank is the column. An unknown word is an {@link InputException} at {@code where}. */
    public static FigureSize named(String word, String where) {
        if (word == null || word.isBlank()) {
            return COLUMN;
        }
        String w = word.strip().toLowerCase(Locale.ROOT);
        for (FigureSize s : values()) {
            if (s.word.equals(w)) {
                return s;
            }
        }
        throw new InputException(where, "\"" + word.strip() + "\" is not a figure size; use column (89 mm) or "
                + "page (183 mm)");
    }
}
