package org.forkscape.report;

import java.awt.BasicStroke;
import java.awt.Color;
import java.awt.Font;
import java.awt.FontMetrics;
import java.awt.Graphics2D;
import java.awt.RenderingHints;
import java.awt.Shape;
import java.awt.geom.Ellipse2D;
import java.awt.geom.Line2D;
import java.awt.geom.Path2D;
import java.awt.geom.Rectangle2D;
import java.awt.image.BufferedImage;
import java.util.ArrayList;
import java.util.List;
import org.forkscape.plan.Factor;
import org.forkscape.text.HumanNumbers;
import org.forkscape.web.explore.Curve;
import org.forkscape.web.explore.DisplayOrder;
import org.forkscape.web.explore.RankedRun;
import org.jfree.svg.SVGHints;

/**
 * Paints the figure, curve above and choice grid below on the same horizontal positions, with a caption,
 * on any {@link Graphics2D}: JFreeSVG's for SVG, PDFBox's for PDF, an image's for PNG, so the three formats
 * are one drawing. Units are points. The look is the explorer's: one ink, significance by fill (filled or
 * hollow diamond) and by the weight of the interval bar, a solid zero line and a dashed median, the
 * grid's decisions on alternating shade; colouring by a decision gives its alternatives the explorer's
 * colours and shapes. Each mark (a specification, or a bin of a large set) is one SVG group with the id
 * {@code spec-N} or {@code bin-B}; other formats ignore that hint.
 */
public final class CurvePainter {
    private static final double PAD = 4;
    private static final double LABEL_SHARE = 0.36;
    /**
     * Text is set to this share of the width it may take: an SVG or PDF viewer's text can come out a few
     * per cent wider than Java's metrics measured it (hinting, rounding).
     */
    private static final double TEXT_SLACK = 0.96;
    private static final String[] SHAPES = {"circle", "rect", "triangle", "diamond"};

    private final CurveFigure figure;
    private final FigureSize size;
    private final Font font;
    private final FontMetrics metrics;
    private final double left;
    private final double plotWidth;
    private final double curveTop;
    private final double curveBottom;
    private final double gridTop;
    private final List<String> captionLines;
    private final List<String> axisLines;
    private final double legendTop;
    private final double captionTop;
    private final double height;
    private final double low;
    private final double high;

    public CurvePainter(CurveFigure figure) {
        this.figure = figure;
        this.size = figure.size();
        this.font = FigureFont.of(size.fontSize());
        this.metrics = measuring().getFontMetrics(font);
        double width = size.width();
        double labels = 0;
        for (RankedRun.GridRow row : figure.ranked().gridRows()) {
            labels = Math.max(labels, metrics.stringWidth(row.label()) + 2 * PAD);
        }
        this.left = Math.min(width * LABEL_SHARE, Math.max(labels, metrics.stringWidth("-0.0000") + 2 * PAD));
        this.plotWidth = width - left - PAD;
        double line = lineHeight();
        this.axisLines = wrap(figure.axisLabel(), (width - 2 * PAD) * TEXT_SLACK);
        this.curveTop = PAD + line * (axisLines.size() + 0.4) + (figure.shown().grouped() ? line : 0);
        this.curveBottom = curveTop + size.curveHeight();
        this.gridTop = curveBottom + PAD;
        double gridHeight = 0;
        for (Block b : blocks()) {
            gridHeight += line + b.rows.size() * size.rowHeight();
        }
        this.legendTop = gridTop + gridHeight + PAD;
        double legendHeight = figure.colourFactor() < 0 ? 0 : legendLines() * line + PAD;
        this.captionTop = legendTop + legendHeight;
        this.captionLines = wrap(String.join(" ", figure.caption()), (width - 2 * PAD) * TEXT_SLACK);
        this.height = captionTop + captionLines.size() * line + PAD;
        double[] range = range();
        this.low = range[0];
        this.high = range[1];
    }

    /** The plot's width for a size before the labels are measured, for choosing the number of bins. */
    static double plotWidthEstimate(FigureSize size) {
        return size.width() * (1 - LABEL_SHARE / 2);
    }

    /** The figure's height in points. */
    public double height() {
        return height;
    }

    /** The figure's width in points. */
    public double width() {
        return size.width();
    }

    /** Paints the whole figure into {@code [0, width) x [0, height)} of {@code g} (modified: its state is left as painted). */
    public void paint(Graphics2D g) {
        g.setRenderingHint(RenderingHints.KEY_ANTIALIASING, RenderingHints.VALUE_ANTIALIAS_ON);
        g.setRenderingHint(RenderingHints.KEY_TEXT_ANTIALIASING, RenderingHints.VALUE_TEXT_ANTIALIAS_ON);
        g.setRenderingHint(RenderingHints.KEY_STROKE_CONTROL, RenderingHints.VALUE_STROKE_PURE);
        g.setFont(font);
        g.setColor(FigurePalette.PAPER);
        g.fill(new Rectangle2D.Double(0, 0, width(), height));
        g.setColor(FigurePalette.INK);
        for (int i = 0; i < axisLines.size(); i++) {
            g.drawString(axisLines.get(i), (float) PAD, (float) (PAD + metrics.getAscent() + i * lineHeight()));
        }
        paintAxis(g);
        paintGroups(g);
        paintMarks(g);
        paintGrid(g);
        paintLegend(g);
        g.setColor(FigurePalette.INK_SOFT);
        double y = captionTop + metrics.getAscent();
        for (String text : captionLines) {
            g.drawString(text, (float) PAD, (float) y);
            y += lineHeight();
        }
    }

    private void paintAxis(Graphics2D g) {
        double[] ticks = ticks(low, high);
        g.setStroke(new BasicStroke(0.4f));
        for (double t : ticks) {
            double y = y(t);
            g.setColor(FigurePalette.RULE);
            g.draw(new Line2D.Double(left, y, left + plotWidth, y));
            g.setColor(FigurePalette.INK_SOFT);
            String text = HumanNumbers.number(t);
            g.drawString(text, (float) (left - PAD - metrics.stringWidth(text)), (float) (y + metrics.getAscent() / 2.5));
        }
        g.setColor(FigurePalette.INK);
        g.draw(new Line2D.Double(left, curveTop, left, curveBottom));
        if (low <= 0 && 0 <= high) {
            g.setStroke(new BasicStroke(0.8f));
            g.draw(new Line2D.Double(left, y(0), left + plotWidth, y(0)));
        }
        double median = figure.summary().median();
        if (Double.isFinite(median)) {
            g.setColor(FigurePalette.INK_SOFT);
            g.setStroke(new BasicStroke(0.8f, BasicStroke.CAP_BUTT, BasicStroke.JOIN_MITER, 10, new float[] {3, 2}, 0));
            g.draw(new Line2D.Double(left, y(median), left + plotWidth, y(median)));
            g.drawString("median " + HumanNumbers.number(median), (float) (left + PAD), (float) (y(median) - 1.5));
        }
    }

    /** In a grouped order, a dotted rule between groups and each group's label above the plot. */
    private void paintGroups(Graphics2D g) {
        if (!figure.shown().grouped()) {
            return;
        }
        int n = Math.max(1, figure.curve().count());
        List<DisplayOrder.Group> groups = figure.shown().order().groups();
        for (int i = 0; i < groups.size(); i++) {
            DisplayOrder.Group group = groups.get(i);
            double from = left + plotWidth * group.from() / n;
            double to = left + plotWidth * group.to() / n;
            if (i > 0) {
                g.setColor(FigurePalette.INK_SOFT);
                g.setStroke(new BasicStroke(0.5f, BasicStroke.CAP_BUTT, BasicStroke.JOIN_MITER, 10, new float[] {1, 1.5f}, 0));
                g.draw(new Line2D.Double(from, curveTop, from, curveBottom));
            }
            g.setColor(FigurePalette.INK);
            String text = clip(group.label(), to - from - 2);
            g.drawString(text, (float) ((from + to - metrics.stringWidth(text)) / 2), (float) (curveTop - 2));
        }
    }

    private void paintMarks(Graphics2D g) {
        Curve curve = figure.curve();
        if (curve.mode().equals("points")) {
            Curve.Points p = curve.points();
            int n = p.estimate().length;
            double step = plotWidth / Math.max(1, n);
            double r = Math.max(0.6, Math.min(size.fontSize() * 0.3, step * 0.45));
            for (int i = 0; i < n; i++) {
                boolean significant = p.significance()[i] != 0;
                Color colour = colourAt(p.levels(), i);
                g.setRenderingHint(SVGHints.KEY_BEGIN_GROUP, "spec-" + p.spec()[i]);
                double x = x(i + 0.5, n);
                if (Double.isFinite(p.low()[i]) && Double.isFinite(p.high()[i])) {
                    g.setColor(FigurePalette.withAlpha(colour, significant ? FigurePalette.SIGNIFICANT_ALPHA
                            : FigurePalette.NOT_SIGNIFICANT_ALPHA));
                    g.setStroke(new BasicStroke((float) Math.max(0.2, Math.min(significant ? 1.0 : 0.45,
                            step * (significant ? 0.6 : 0.3)))));
                    g.draw(new Line2D.Double(x, y(p.low()[i]), x, y(p.high()[i])));
                }
                mark(g, shapeAt(p.levels(), i), significant, colour, x, y(p.estimate()[i]), r);
                g.setRenderingHint(SVGHints.KEY_END_GROUP, "true");
            }
            return;
        }
        Curve.Bins b = curve.bins();
        int bins = b.from().length;
        double step = plotWidth / bins;
        for (int k = 0; k < bins; k++) {
            double x = x((b.from()[k] + b.to()[k]) / 2.0, curve.count());
            int count = b.to()[k] - b.from()[k];
            boolean significant = 2 * (b.significantPositive()[k] + b.significantNegative()[k]) > count;
            Color colour = binColour(b, k);
            g.setRenderingHint(SVGHints.KEY_BEGIN_GROUP, "bin-" + k);
            g.setStroke(new BasicStroke((float) Math.max(0.2, step)));
            if (Double.isFinite(b.low()[k]) && Double.isFinite(b.high()[k])) {
                g.setColor(FigurePalette.withAlpha(colour, 0.18));
                g.draw(new Line2D.Double(x, y(b.low()[k]), x, y(b.high()[k])));
            }
            g.setColor(FigurePalette.withAlpha(colour, significant ? FigurePalette.SIGNIFICANT_ALPHA
                    : FigurePalette.NOT_SIGNIFICANT_ALPHA));
            g.draw(new Line2D.Double(x, y(b.min()[k]), x, y(b.max()[k])));
            mark(g, "diamond", significant, colour, x, y(b.median()[k]), Math.max(0.5, Math.min(1.2, step * 0.6)));
            g.setRenderingHint(SVGHints.KEY_END_GROUP, "true");
        }
    }

    private void paintGrid(Graphics2D g) {
        Curve curve = figure.curve();
        int n = Math.max(1, curve.count());
        double line = lineHeight();
        double y = gridTop;
        List<Block> blocks = blocks();
        for (int d = 0; d < blocks.size(); d++) {
            Block block = blocks.get(d);
            double blockHeight = line + block.rows.size() * size.rowHeight();
            if (d % 2 == 1) {
                g.setColor(FigurePalette.DECISION_SHADE);
                g.fill(new Rectangle2D.Double(0, y, size.width(), blockHeight));
            }
            g.setColor(FigurePalette.INK);
            g.drawString(clip(block.decision, size.width() - 2 * PAD), (float) PAD, (float) (y + metrics.getAscent()));
            y += line;
            for (int row : block.rows) {
                RankedRun.GridRow gridRow = figure.ranked().gridRows().get(row);
                g.setColor(FigurePalette.INK_SOFT);
                String label = clip(gridRow.label(), left - 2 * PAD);
                g.drawString(label, (float) (left - PAD - metrics.stringWidth(label)),
                        (float) (y + (size.rowHeight() + metrics.getAscent()) / 2 - 0.5));
                double top = y + size.rowHeight() * 0.15;
                double tall = size.rowHeight() * 0.7;
                Color colour = gridRow.factor() == figure.colourFactor()
                        ? FigurePalette.ALTERNATIVES[gridRow.level() % FigurePalette.ALTERNATIVES.length]
                        : FigurePalette.CURVE;
                if (curve.mode().equals("points")) {
                    int[] levels = curve.points().levels()[gridRow.factor()];
                    Path2D.Double ticks = new Path2D.Double();
                    for (int i = 0; i < levels.length; i++) {
                        if (levels[i] == gridRow.level()) {
                            double x = x(i + 0.5, n);
                            ticks.moveTo(x, top);
                            ticks.lineTo(x, top + tall);
                        }
                    }
                    g.setColor(colour);
                    g.setStroke(new BasicStroke((float) Math.max(0.2, Math.min(0.8, plotWidth / n * 0.5))));
                    g.draw(ticks);
                } else {
                    Curve.Bins b = curve.bins();
                    double[] share = b.share()[row];
                    for (int k = 0; k < share.length; k++) {
                        if (share[k] > 0) {
                            double x0 = left + plotWidth * b.from()[k] / n;
                            double x1 = left + plotWidth * b.to()[k] / n;
                            g.setColor(FigurePalette.withAlpha(colour, share[k]));
                            g.fill(new Rectangle2D.Double(x0, top, x1 - x0, tall));
                        }
                    }
                }
                y += size.rowHeight();
            }
        }
    }

    private void paintLegend(Graphics2D g) {
        if (figure.colourFactor() < 0) {
            return;
        }
        Factor f = figure.ranked().factors().get(figure.colourFactor());
        double x = PAD;
        double y = legendTop + lineHeight() / 2;
        g.setColor(FigurePalette.INK);
        String title = f.name() + ":";
        g.drawString(title, (float) x, (float) (y + metrics.getAscent() / 2.5));
        x += metrics.stringWidth(title) + PAD;
        for (int l = 0; l < f.levels().size(); l++) {
            String label = f.isControl() ? f.describe(l) : f.levels().get(l);
            double w = size.fontSize() + metrics.stringWidth(label) + 2 * PAD;
            if (x + w > size.width() - PAD) {
                x = PAD;
                y += lineHeight();
            }
            mark(g, SHAPES[l % SHAPES.length], true, FigurePalette.ALTERNATIVES[l % FigurePalette.ALTERNATIVES.length],
                    x + size.fontSize() * 0.3, y, size.fontSize() * 0.3);
            g.setColor(FigurePalette.INK);
            g.drawString(label, (float) (x + size.fontSize() * 0.8), (float) (y + metrics.getAscent() / 2.5));
            x += w;
        }
    }

    private int legendLines() {
        Factor f = figure.ranked().factors().get(figure.colourFactor());
        double x = PAD + metrics.stringWidth(f.name() + ":") + PAD;
        int lines = 1;
        for (int l = 0; l < f.levels().size(); l++) {
            String label = f.isControl() ? f.describe(l) : f.levels().get(l);
            double w = size.fontSize() + metrics.stringWidth(label) + 2 * PAD;
            if (x + w > size.width() - PAD) {
                x = PAD;
                lines++;
            }
            x += w;
        }
        return lines;
    }

    /** A mark: filled in its colour when significant, else hollow (paper inside, its colour around). */
    private static void mark(Graphics2D g, String shape, boolean filled, Color colour, double x, double y, double r) {
        Shape s = switch (shape) {
            case "circle" -> new Ellipse2D.Double(x - r, y - r, 2 * r, 2 * r);
            case "rect" -> new Rectangle2D.Double(x - r * 0.85, y - r * 0.85, r * 1.7, r * 1.7);
            case "triangle" -> polygon(x, y - r * 1.15, x + r * 1.05, y + r * 0.75, x - r * 1.05, y + r * 0.75);
            default -> polygon(x, y - r * 1.2, x + r * 1.2, y, x, y + r * 1.2, x - r * 1.2, y);
        };
        g.setColor(filled ? colour : FigurePalette.PAPER);
        g.fill(s);
        if (!filled) {
            g.setColor(colour);
            g.setStroke(new BasicStroke((float) Math.max(0.3, r * 0.45)));
            g.draw(s);
        }
    }

    private static Shape polygon(double... xy) {
        Path2D.Double p = new Path2D.Double();
        p.moveTo(xy[0], xy[1]);
        for (int i = 2; i < xy.length; i += 2) {
            p.lineTo(xy[i], xy[i + 1]);
        }
        p.closePath();
        return p;
    }

    private Color colourAt(int[][] levels, int i) {
        int f = figure.colourFactor();
        return f < 0 ? FigurePalette.CURVE : FigurePalette.ALTERNATIVES[levels[f][i] % FigurePalette.ALTERNATIVES.length];
    }

    private String shapeAt(int[][] levels, int i) {
        int f = figure.colourFactor();
        return f < 0 ? "diamond" : SHAPES[levels[f][i] % SHAPES.length];
    }

    /** A bin's colour: that of the alternative most of its specifications use, as the explorer's median line. */
    private Color binColour(Curve.Bins b, int k) {
        int f = figure.colourFactor();
        if (f < 0) {
            return FigurePalette.CURVE;
        }
        Factor factor = figure.ranked().factors().get(f);
        List<RankedRun.GridRow> rows = figure.ranked().gridRows();
        double best = -1;
        int bestLevel = 0;
        double withShare = 0;
        for (int r = 0; r < rows.size(); r++) {
            if (rows.get(r).factor() == f) {
                double s = b.share()[r][k];
                withShare = s;
                if (s > best) {
                    best = s;
                    bestLevel = rows.get(r).level();
                }
            }
        }
        if (factor.isControl()) {
            bestLevel = withShare >= 0.5 ? 1 : 0;
        }
        return FigurePalette.ALTERNATIVES[bestLevel % FigurePalette.ALTERNATIVES.length];
    }

    /** The grid's rows grouped under their decision, in the ranking's order. */
    private List<Block> blocks() {
        List<Block> blocks = new ArrayList<>();
        List<RankedRun.GridRow> rows = figure.ranked().gridRows();
        for (int r = 0; r < rows.size(); r++) {
            String decision = rows.get(r).group();
            if (blocks.isEmpty() || !blocks.get(blocks.size() - 1).decision.equals(decision)) {
                blocks.add(new Block(decision, new ArrayList<>()));
            }
            blocks.get(blocks.size() - 1).rows.add(r);
        }
        return blocks;
    }

    private record Block(String decision, List<Integer> rows) {
    }

    /** The vertical range: every estimate and interval bound of the set, and zero, with a margin. */
    private double[] range() {
        double lo = 0;
        double hi = 0;
        Curve curve = figure.curve();
        double[][] columns = curve.mode().equals("points")
                ? new double[][] {curve.points().estimate(), curve.points().low(), curve.points().high()}
                : new double[][] {curve.bins().min(), curve.bins().max(), curve.bins().low(), curve.bins().high()};
        for (double[] column : columns) {
            for (double v : column) {
                if (Double.isFinite(v)) {
                    lo = Math.min(lo, v);
                    hi = Math.max(hi, v);
                }
            }
        }
        if (hi - lo == 0) {
            hi = lo + 1;
        }
        double margin = (hi - lo) * 0.05;
        return new double[] {lo - margin, hi + margin};
    }

    /** Ticks at 1, 2 or 5 times a power of ten, about five across the range (common practice). */
    static double[] ticks(double lo, double hi) {
        double raw = (hi - lo) / 5;
        double power = Math.pow(10, Math.floor(Math.log10(raw)));
        double step = raw / power < 1.5 ? power : raw / power < 3.5 ? 2 * power : raw / power < 7.5 ? 5 * power
                : 10 * power;
        List<Double> out = new ArrayList<>();
        for (double t = Math.ceil(lo / step) * step; t <= hi + step * 1e-9; t += step) {
            out.add(Math.abs(t) < step * 1e-9 ? 0 : t);
        }
        return out.stream().mapToDouble(Double::doubleValue).toArray();
    }

    private double x(double position, int n) {
        return left + plotWidth * position / Math.max(1, n);
    }

    private double y(double v) {
        return curveBottom - (v - low) / (high - low) * (curveBottom - curveTop);
    }

    private double lineHeight() {
        return metrics.getHeight();
    }

    private String clip(String text, double width) {
        if (metrics.stringWidth(text) <= width) {
            return text;
        }
        String t = text;
        while (!t.isEmpty() && metrics.stringWidth(t + "…") > width) {
            t = t.substring(0, t.length() - 1);
        }
        return t.isEmpty() ? "" : t + "…";
    }

    private List<String> wrap(String text, double width) {
        List<String> lines = new ArrayList<>();
        StringBuilder line = new StringBuilder();
        for (String word : text.split(" ")) {
            String candidate = line.length() == 0 ? word : line + " " + word;
            if (line.length() > 0 && metrics.stringWidth(candidate) > width) {
                lines.add(line.toString());
                line = new StringBuilder(word);
            } else {
                line = new StringBuilder(candidate);
            }
        }
        if (line.length() > 0) {
            lines.add(line.toString());
        }
        return lines;
    }

    /** A graphics context to measure text with before any output exists (fractional metrics, as in print). */
    private static Graphics2D measuring() {
        Graphics2D g = new BufferedImage(1, 1, BufferedImage.TYPE_INT_ARGB).createGraphics();
        g.setRenderingHint(RenderingHints.KEY_FRACTIONALMETRICS, RenderingHints.VALUE_FRACTIONALMETRICS_ON);
        return g;
    }
}
