package org.forkscape.web.analysis;

import java.util.ArrayList;
import java.util.Comparator;
import java.util.List;
import org.forkscape.data.CategoricalColumn;
import org.forkscape.data.CsvTableReader;
import org.forkscape.data.Column;
import org.forkscape.data.NumericColumn;
import org.forkscape.data.Table;
import org.forkscape.text.HumanNumbers;

/**
 * What the data page shows of one column: its type, how many cells are missing, the usual summaries for a
 * numeric column (mean, standard deviation with n - 1, minimum, maximum), the levels of a categorical one,
 * and a small histogram. Undefined numbers are NaN.
 *
 * @param levels     for a categorical column, the most frequent levels (at most {@value #SHOWN_LEVELS}),
 *                   most frequent first
 * @param levelCount for a categorical column, the number of distinct levels
 * @param bars       the histogram: equal-width bins for a numeric column, the shown levels otherwise
 * @param strayText  for a categorical column that is mostly numbers, the few cells that are not (which make it
 *                   text: often a missing cell written another way); empty otherwise
 */
public record ColumnOverview(String name, String type, int missing, double mean, double sd, double min, double max,
        List<Level> levels, int levelCount, List<Bar> bars, List<String> strayText) {

    static final int SHOWN_LEVELS = 12;
    static final int BINS = 16;

    public record Level(String label, int count) {
    }

    /**
     * One histogram bar in a 100 x 30 box (origin top left), with its range or level and count for the
     * tooltip.
     */
    public record Bar(double x, double y, double width, double height, String label, int count) {
    }

    /**
     * The data page's warning for a column of numbers that reads as text because of a few cells, naming them
     * and the fix; empty when there is none.
     */
    public String strayTextWarning() {
        if (strayText.isEmpty()) {
            return "";
        }
        return "Reads as text because of the value" + (strayText.size() == 1 ? " " : "s ")
                + String.join(", ", strayText.stream().map(v -> "\"" + ShownText.of(v) + "\"").toList())
                + "; if these mark missing cells, write them as " + CsvTableReader.MISSING_SPELLINGS
                + " and upload the file again, so that the column is numeric.";
    }

    /** A name or level as the data page shows it, cut to {@value ShownText#MAX} characters (see {@link ShownText}). */
    public String shown(String text) {
        return ShownText.of(text);
    }

    /** Whether the data page cuts this column's name or one of its shown levels. */
    public boolean hasCutText() {
        return name.length() > ShownText.MAX || levels.stream().anyMatch(l -> l.label().length() > ShownText.MAX)
                || strayText.stream().anyMatch(t -> t.length() > ShownText.MAX);
    }

    /** One of this column's summaries for the page (see {@link HumanNumbers#number}); empty when undefined. */
    public String text(double summary) {
        return Double.isNaN(summary) ? "" : HumanNumbers.number(summary);
    }

    public static List<ColumnOverview> of(Table table) {
        return of(table, table.columns().size());
    }

    /** The overviews of the first {@code max} columns (the data page's, which lists no more). */
    public static List<ColumnOverview> of(Table table, int max) {
        List<ColumnOverview> out = new ArrayList<>();
        for (Column c : table.columns().subList(0, Math.min(max, table.columns().size()))) {
            out.add(c instanceof NumericColumn n ? numeric(n) : categorical((CategoricalColumn) c));
        }
        return out;
    }

    private static ColumnOverview numeric(NumericColumn c) {
        double[] x = c.values();
        int n = 0;
        double mean = 0;
        double m2 = 0;
        double min = Double.POSITIVE_INFINITY;
        double max = Double.NEGATIVE_INFINITY;
        for (double v : x) {
            if (Double.isNaN(v)) {
                continue;
            }
            // Welford's update (Welford 1962, Technometrics 4(3)): one pass without cancellation
            n++;
            double d = v - mean;
            mean += d / n;
            m2 += d * (v - mean);
            min = Math.min(min, v);
            max = Math.max(max, v);
        }
        int missing = x.length - n;
        if (n == 0) {
            return new ColumnOverview(c.name(), "numeric", missing, Double.NaN, Double.NaN, Double.NaN, Double.NaN,
                    List.of(), 0, List.of(), List.of());
        }
        int[] counts = new int[BINS];
        double width = (max - min) / BINS;
        for (double v : x) {
            if (!Double.isNaN(v)) {
                int b = width > 0 ? (int) ((v - min) / width) : 0;
                counts[Math.min(BINS - 1, b)]++;
            }
        }
        List<String> labels = new ArrayList<>();
        for (int b = 0; b < BINS; b++) {
            labels.add(width > 0
                    ? HumanNumbers.number(min + b * width) + " to " + HumanNumbers.number(min + (b + 1) * width)
                    : HumanNumbers.number(min));
        }
        return new ColumnOverview(c.name(), "numeric", missing, mean, n > 1 ? Math.sqrt(m2 / (n - 1)) : Double.NaN,
                min, max, List.of(), 0, bars(counts, labels), List.of());
    }

    private static ColumnOverview categorical(CategoricalColumn c) {
        int[] counts = c.levelCounts();
        List<Level> levels = new ArrayList<>();
        for (int k = 0; k < counts.length; k++) {
            levels.add(new Level(c.levels().get(k), counts[k]));
        }
        levels.sort(Comparator.comparingInt(Level::count).reversed());
        List<Level> shown = List.copyOf(levels.subList(0, Math.min(SHOWN_LEVELS, levels.size())));
        int[] shownCounts = shown.stream().mapToInt(Level::count).toArray();
        return new ColumnOverview(c.name(), "categorical", c.missingCount(), Double.NaN, Double.NaN, Double.NaN,
                Double.NaN, shown, counts.length, bars(shownCounts, shown.stream().map(Level::label).toList()),
                c.strayTextLevels());
    }

    private static List<Bar> bars(int[] counts, List<String> labels) {
        int top = 0;
        for (int c : counts) {
            top = Math.max(top, c);
        }
        List<Bar> out = new ArrayList<>();
        double w = 100.0 / Math.max(1, counts.length);
        for (int b = 0; b < counts.length; b++) {
            double h = top == 0 ? 0 : 30.0 * counts[b] / top;
            out.add(new Bar(b * w + 0.5, 30 - h, Math.max(0.5, w - 1), h, labels.get(b), counts[b]));
        }
        return out;
    }
}
