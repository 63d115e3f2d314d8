package org.forkscape.report;

import java.util.ArrayList;
import java.util.List;
import org.forkscape.InputException;
import org.forkscape.Version;
import org.forkscape.run.UnitGroups;
import org.forkscape.text.HumanNumbers;
import org.forkscape.web.explore.Curve;
import org.forkscape.web.explore.CurveReducer;
import org.forkscape.web.explore.CurveSummary;
import org.forkscape.web.explore.RankedRun;
import org.forkscape.web.explore.ShownSet;

/**
 * What the print figure draws: the set a view of the explorer shows ({@link ShownSet}, by the explorer's
 * rules on scales), reduced as the explorer reduces it ({@link CurveReducer}: every specification up to
 * {@value CurveReducer#POINT_LIMIT}, else one bin per half point of the plot's width), the colouring, and
 * the caption. One drawing serves every format ({@link CurvePainter}).
 *
 * @param colourFactor the factor whose alternatives colour the marks, -1 for the one ink
 * @param axisLabel    the scale and its unit, above the vertical axis
 * @param caption      the caption's sentences: the set, its scale, filter and order, how to read the marks,
 *                     the run and the version
 */
public record CurveFigure(RankedRun ranked, ShownSet shown, Curve curve, CurveSummary summary, int colourFactor,
        FigureSize size, String axisLabel, List<String> caption) {

    /** Bins per point of plot width above {@link CurveReducer#POINT_LIMIT}: finer than any print resolves. */
    private static final int BINS_PER_POINT = 2;

    /**
     * @param colourFactor a factor id of the ranking, or -1
     * @param runWords     the run in words for the caption ("run 3 of analysis civic-demo", a folder name)
     */
    public static CurveFigure of(RankedRun r, ShownSet shown, int colourFactor, FigureSize size, String runWords) {
        if (colourFactor < -1 || colourFactor >= r.factors().size()) {
            throw new InputException("colour", "there is no factor " + colourFactor + " in this run; use a number "
                    + "from 0 to " + (r.factors().size() - 1) + ", or none");
        }
        int bins = (int) Math.round(CurvePainter.plotWidthEstimate(size) * BINS_PER_POINT);
        Curve curve = CurveReducer.reduce(r, shown.order(), bins);
        CurveSummary summary = CurveSummary.of(r, shown.kept());
        UnitGroups.Group group = shown.groupShown(r);
        String axis = capitalised(r.scale().title()) + (group == null ? "" : ", " + group.title()) + ": "
                + shown.unit();
        return new CurveFigure(r, shown, curve, summary, colourFactor, size, axis,
                caption(r, shown, curve, colourFactor, runWords));
    }

    private static List<String> caption(RankedRun r, ShownSet shown, Curve curve, int colourFactor, String runWords) {
        List<String> lines = new ArrayList<>();
        UnitGroups.Group group = shown.groupShown(r);
        String scale = r.scale().title() + " scale" + (group == null ? " (unit-free: every comparable group)"
                : ", comparable group " + group.title());
        lines.add(HumanNumbers.count(curve.count()) + " specifications, " + scale + "; vertical axis: "
                + shown.unit() + ".");
        if (r.leftOut() > 0) {
            // as the explorer's note: a scale not defined for a model leaves its specifications out, never at 0
            lines.add("The scale is defined for least squares only: " + HumanNumbers.count(r.leftOut())
                    + " logit, probit or Poisson specifications of the run are left out.");
        }
        List<String> filter = shown.filterWords(r);
        lines.add("Filter: " + (filter.isEmpty() ? "none (every fitted specification" + (group == null ? "" : " of the group") + ")"
                : String.join("; ", filter)) + ". Order: " + shown.orderWords(r) + ".");
        double confidence = r.run().plan().confidence();
        String level = HumanNumbers.number(100 * confidence) + "%";
        String p = HumanNumbers.number(r.run().plan().alpha());
        String bars = r.scale().hasInterval() ? "bars: " + level + " confidence intervals" : "no intervals on the "
                + "t scale";
        if (curve.mode().equals("points")) {
            lines.add("Filled mark, heavy bar: significant at p < " + p + "; hollow mark, light bar: not; " + bars
                    + ". Solid line: zero; dashed line: median of the set.");
        } else {
            lines.add("The " + HumanNumbers.count(curve.count()) + " specifications in "
                    + HumanNumbers.count(curve.bins().from().length) + " columns: a line from the lowest to the "
                    + "highest estimate, a mark at the median (filled when most are significant at p < " + p
                    + "), a light band for the " + (r.scale().hasInterval() ? level + " intervals' envelope" : "range")
                    + "; grid shade: share of the column using the alternative. Solid line: zero; dashed: median.");
        }
        if (colourFactor >= 0) {
            lines.add("Coloured by " + r.factors().get(colourFactor).name() + " (legend above).");
        }
        lines.add("A robust curve is not proof of a causal effect; the set of specifications must be decided in "
                + "advance.");
        lines.add(capitalised(runWords) + ". Forkscape " + Version.current() + ".");
        return List.copyOf(lines);
    }

    /** The number of marks the painter draws: one per specification, or one per bin of a large set. */
    public int marks() {
        return curve.mode().equals("points") ? curve.count() : curve.bins().from().length;
    }

    private static String capitalised(String s) {
        return s.isEmpty() ? s : Character.toUpperCase(s.charAt(0)) + s.substring(1);
    }
}
