package org.forkscape.web.explore;

import java.util.ArrayList;
import java.util.Arrays;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import org.forkscape.plan.Factor;
import org.forkscape.plan.SpecificationSpace;
import org.forkscape.run.ResultTable;
import org.forkscape.run.RunResult;
import org.forkscape.run.Scale;
import org.forkscape.run.UnitGroups;

/**
 * A run's fitted specifications in order of their key estimate on one {@link Scale}, column by column,
 * built once per run and scale so that every filter, summary and reduction afterwards is a sequential pass
 * over primitive arrays (no object per specification). Position {@code r} in these arrays is the
 * specification's <em>rank</em>; ties keep the run's order. "Estimate" below means the value on the
 * ranking's scale, and the interval is that scale's (NaN on the t scale). A fitted specification without a
 * value on the scale (a generalized linear model on the standardized or partial-correlation scale) has no
 * rank; {@link #leftOut()} counts them. Immutable after construction and safe to share between requests.
 */
public final class RankedRun {
    private final RunResult run;
    private final Scale scale;
    private final UnitGroups units;
    private final int size;
    private final int[] slot;
    private final double[] estimate;
    private final double[] low;
    private final double[] high;
    private final double[] p;
    /** +1 significant and positive, -1 significant and negative, 0 otherwise, at the plan's level. */
    private final byte[] significance;
    private final List<Factor> factors;
    private final int[][] level;
    private final List<GridRow> gridRows;
    private final Map<String, Integer> unfittedReasons;
    private final int leftOut;

    /**
     * A row of the choice grid: one alternative of a decision, or one optional control (marked where it
     * is in).
     */
    public record GridRow(int factor, int level, String label, String group) {
    }

    private RankedRun(RunResult run, Scale scale) {
        this.run = run;
        this.scale = scale;
        this.units = UnitGroups.of(run, scale.unitFree() ? Scale.AS_FITTED : scale);
        ResultTable r = run.results();
        double confidence = run.plan().confidence();
        double alpha = run.plan().alpha();
        int fitted = 0;
        int undefined = 0;
        Map<String, Integer> reasons = new LinkedHashMap<>();
        for (int s = 0; s < r.size(); s++) {
            if (ranked(r, s, scale)) {
                fitted++;
            } else if (r.fitted(s)) {
                undefined++;
            } else {
                reasons.merge(r.status(s), 1, Integer::sum);
            }
        }
        this.unfittedReasons = java.util.Collections.unmodifiableMap(reasons);
        this.leftOut = undefined;
        this.size = fitted;
        this.slot = rankOrder(r, fitted, scale);
        estimate = new double[size];
        low = new double[size];
        high = new double[size];
        p = new double[size];
        significance = new byte[size];
        for (int k = 0; k < size; k++) {
            int s = slot[k];
            double b = scale.value(r, s);
            estimate[k] = b;
            low[k] = scale.low(r, s, confidence);
            high[k] = scale.high(r, s, confidence);
            p[k] = r.pValue(s);
            significance[k] = (byte) (p[k] < alpha ? (b > 0 ? 1 : b < 0 ? -1 : 0) : 0);
        }
        this.factors = Factor.listOf(run.plan());
        this.level = new int[factors.size()][size];
        SpecificationSpace space = run.models().space();
        long[] choices = new long[space.decisionCount()];
        for (int k = 0; k < size; k++) {
            space.decode(r.specIndex(slot[k]), choices);
            for (Factor f : factors) {
                level[f.id()][k] = f.levelOf(choices);
            }
        }
        List<GridRow> rows = new ArrayList<>();
        for (Factor f : factors) {
            if (f.isControl()) {
                rows.add(new GridRow(f.id(), 1, f.control(), f.decision()));
            } else {
                for (int l = 0; l < f.levels().size(); l++) {
                    rows.add(new GridRow(f.id(), l, f.levels().get(l), f.decision()));
                }
            }
        }
        this.gridRows = List.copyOf(rows);
    }

    /** Ranked by the estimates as fitted. */
    public static RankedRun of(RunResult run) {
        return new RankedRun(run, Scale.AS_FITTED);
    }

    public static RankedRun of(RunResult run, Scale scale) {
        return new RankedRun(run, scale);
    }

    /**
     * Fitted slots in order of their value on the scale. Sorting the values and placing each slot at its
     * value's first position plus the ties already placed gives a stable order without boxing a million
     * indices.
     */
    private static int[] rankOrder(ResultTable r, int fitted, Scale scale) {
        double[] sorted = new double[fitted];
        int m = 0;
        for (int s = 0; s < r.size(); s++) {
            if (ranked(r, s, scale)) {
                sorted[m++] = scale.value(r, s);
            }
        }
        Arrays.sort(sorted);
        int[] placed = new int[fitted];
        int[] order = new int[fitted];
        for (int s = 0; s < r.size(); s++) {
            if (ranked(r, s, scale)) {
                int first = firstAtLeast(sorted, scale.value(r, s));
                order[first + placed[first]++] = s;
            }
        }
        return order;
    }

    /** Whether a slot has a rank: fitted, with a value on the scale. */
    private static boolean ranked(ResultTable r, int slot, Scale scale) {
        return r.fitted(slot) && scale.defined(r, slot);
    }

    private static int firstAtLeast(double[] sorted, double v) {
        int lo = 0;
        int hi = sorted.length;
        while (lo < hi) {
            int mid = (lo + hi) >>> 1;
            if (Double.compare(sorted[mid], v) < 0) {
                lo = mid + 1;
            } else {
                hi = mid;
            }
        }
        return lo;
    }

    public RunResult run() {
        return run;
    }

    /** The scale of the estimates and intervals of this ranking. */
    public Scale scale() {
        return scale;
    }

    /**
     * The comparable groups of the ranking's scale: as fitted or of the average marginal effects; on a
     * unit-free scale, those as fitted (for their words only).
     */
    public UnitGroups units() {
        return units;
    }

    /** Fitted specifications without a value on this scale, and so without a rank. */
    public int leftOut() {
        return leftOut;
    }

    /** Number of fitted specifications with a value on the scale (the ranks are 0..size-1). */
    public int size() {
        return size;
    }

    /** The result-table slot of the specification at a rank. */
    public int slot(int rank) {
        return slot[rank];
    }

    public double estimate(int rank) {
        return estimate[rank];
    }

    public double low(int rank) {
        return low[rank];
    }

    public double high(int rank) {
        return high[rank];
    }

    /** Two-sided p-value of the key estimate. */
    public double pValue(int rank) {
        return p[rank];
    }

    /** +1 significant positive, -1 significant negative, 0 not significant. */
    public int significance(int rank) {
        return significance[rank];
    }

    public List<Factor> factors() {
        return factors;
    }

    /** The level of factor {@code f} at each rank; shared, do not modify. */
    int[] levels(int f) {
        return level[f];
    }

    public int level(int f, int rank) {
        return level[f][rank];
    }

    public List<GridRow> gridRows() {
        return gridRows;
    }

    /** Specifications that could not be fitted, counted by reason. */
    public Map<String, Integer> unfittedReasons() {
        return unfittedReasons;
    }

    double[] estimates() {
        return estimate;
    }

    byte[] significances() {
        return significance;
    }
}
