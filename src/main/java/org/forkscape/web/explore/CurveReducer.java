package org.forkscape.web.explore;

import java.util.Arrays;
import java.util.List;
import org.forkscape.plan.Factor;

/**
 * Shapes a set of specifications for drawing. Up to {@link #POINT_LIMIT} specifications are sent one by
 * one; above that the curve is cut into as many bins as the plot has pixel columns and each bin is sent
 * as its minimum, median and maximum estimate, its interval envelope, its counts by significance, and per
 * grid row the share of its specifications that use the alternative. The hover and click that follow ask
 * for the exact specification at a position. One pass over the set; callable without HTTP.
 */
public final class CurveReducer {
    /** Beyond this the marks of single specifications merge on any screen. */
    public static final int POINT_LIMIT = 2_500;
    public static final int MIN_WIDTH = 50;
    public static final int MAX_WIDTH = 4_000;

    private CurveReducer() {
    }

    /** @param width the plot's width in pixel columns; clamped to [{@value #MIN_WIDTH}, {@value #MAX_WIDTH}] */
    public static Curve reduce(RankedRun run, DisplayOrder order, int width) {
        int[] ranks = order.ranks();
        int n = ranks.length;
        if (n <= POINT_LIMIT) {
            return new Curve("points", n, points(run, ranks), null);
        }
        return new Curve("bins", n, null, bins(run, ranks, Math.max(MIN_WIDTH, Math.min(MAX_WIDTH, width))));
    }

    private static Curve.Points points(RankedRun run, int[] ranks) {
        int n = ranks.length;
        long[] spec = new long[n];
        double[] estimate = new double[n];
        double[] low = new double[n];
        double[] high = new double[n];
        int[] significance = new int[n];
        int[][] levels = new int[run.factors().size()][n];
        for (int i = 0; i < n; i++) {
            int k = ranks[i];
            spec[i] = run.run().results().specIndex(run.slot(k)) + 1;
            estimate[i] = run.estimate(k);
            low[i] = run.low(k);
            high[i] = run.high(k);
            significance[i] = run.significance(k);
            for (int f = 0; f < levels.length; f++) {
                levels[f][i] = run.level(f, k);
            }
        }
        return new Curve.Points(spec, estimate, low, high, significance, levels);
    }

    private static Curve.Bins bins(RankedRun run, int[] ranks, int width) {
        int n = ranks.length;
        int bins = Math.min(width, n);
        List<RankedRun.GridRow> rows = run.gridRows();
        int factors = run.factors().size();
        // grid row of each (factor, level), -1 for a control's "without" level, which has no row
        int[][] rowOf = new int[factors][];
        for (Factor f : run.factors()) {
            rowOf[f.id()] = new int[f.levels().size()];
            Arrays.fill(rowOf[f.id()], -1);
        }
        for (int r = 0; r < rows.size(); r++) {
            rowOf[rows.get(r).factor()][rows.get(r).level()] = r;
        }
        int[][] level = new int[factors][];
        for (int f = 0; f < factors; f++) {
            level[f] = run.levels(f);
        }
        double[] e = run.estimates();
        byte[] sig = run.significances();
        int[] from = new int[bins];
        int[] to = new int[bins];
        double[] min = new double[bins];
        double[] median = new double[bins];
        double[] max = new double[bins];
        double[] low = new double[bins];
        double[] high = new double[bins];
        int[] sigPositive = new int[bins];
        int[] sigNegative = new int[bins];
        double[] scratch = new double[n / bins + 2];
        for (int b = 0; b < bins; b++) {
            int start = (int) ((long) b * n / bins);
            int end = (int) ((long) (b + 1) * n / bins);
            from[b] = start;
            to[b] = end;
            double lo = Double.POSITIVE_INFINITY;
            double hi = Double.NEGATIVE_INFINITY;
            double envelopeLow = Double.POSITIVE_INFINITY;
            double envelopeHigh = Double.NEGATIVE_INFINITY;
            boolean ascending = true;
            double previous = Double.NEGATIVE_INFINITY;
            for (int i = start; i < end; i++) {
                int k = ranks[i];
                double v = e[k];
                if (v < previous) {
                    ascending = false;
                }
                previous = v;
                lo = Math.min(lo, v);
                hi = Math.max(hi, v);
                envelopeLow = Math.min(envelopeLow, run.low(k));
                envelopeHigh = Math.max(envelopeHigh, run.high(k));
                if (sig[k] > 0) {
                    sigPositive[b]++;
                } else if (sig[k] < 0) {
                    sigNegative[b]++;
                }
            }
            min[b] = lo;
            max[b] = hi;
            low[b] = envelopeLow;
            high[b] = envelopeHigh;
            int size = end - start;
            median[b] = ascending ? middle(e, ranks, start, size) : sortedMiddle(e, ranks, start, size, scratch);
        }
        // the shares, one factor at a time so that each pass reads one level column in order
        double[][] share = new double[rows.size()][bins];
        for (int f = 0; f < factors; f++) {
            int[] column = level[f];
            int[] rowOfLevel = rowOf[f];
            int[] counts = new int[rowOfLevel.length];
            for (int b = 0; b < bins; b++) {
                java.util.Arrays.fill(counts, 0);
                for (int i = from[b]; i < to[b]; i++) {
                    counts[column[ranks[i]]]++;
                }
                double size = to[b] - from[b];
                for (int l = 0; l < counts.length; l++) {
                    if (rowOfLevel[l] >= 0) {
                        share[rowOfLevel[l]][b] = counts[l] / size;
                    }
                }
            }
        }
        return new Curve.Bins(from, to, min, median, max, low, high, sigPositive, sigNegative, share);
    }

    private static double middle(double[] e, int[] ranks, int start, int size) {
        int m = start + size / 2;
        return size % 2 == 1 ? e[ranks[m]] : (e[ranks[m - 1]] + e[ranks[m]]) / 2;
    }

    /** A bin that straddles two groups of a grouped curve is not in estimate order: sort a copy. */
    private static double sortedMiddle(double[] e, int[] ranks, int start, int size, double[] scratch) {
        for (int i = 0; i < size; i++) {
            scratch[i] = e[ranks[start + i]];
        }
        Arrays.sort(scratch, 0, size);
        int m = size / 2;
        return size % 2 == 1 ? scratch[m] : (scratch[m - 1] + scratch[m]) / 2;
    }
}
