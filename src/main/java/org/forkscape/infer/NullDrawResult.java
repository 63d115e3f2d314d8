package org.forkscape.infer;

import java.util.LinkedHashMap;
import java.util.Map;
import org.apache.commons.math3.stat.descriptive.rank.Percentile;
import org.forkscape.run.Json;

/**
 * The null draws of a run: the observed curve's statistics, each draw's, and the p-values. A p-value
 * is the share of draws whose statistic is at least as extreme as the observed one, over the draws in
 * which at least one specification could be fitted; a share of 0 is reported as below 1 / (draws + 1)
 * (see {@link DrawTally}). Because the dominant sign is read from the data rather than declared in
 * advance, each statistic is computed the same way on every draw (its own median, its own dominant sign)
 * and the median and the mean score are compared in absolute value: the tests are two-sided and keep
 * their level.
 */
public final class NullDrawResult {
    private final NullDrawSettings settings;
    private final String warning;
    private final CurveStatistics observed;
    private final CurveStatistics[] draws;
    private final ScaleCurves curves;
    private final ScaleCurves.DrawCurve[] observedCurves;
    private final ScaleCurves.DrawCurve[][] drawCurves;
    private final long failedFits;
    private final double seconds;

    NullDrawResult(NullDrawSettings settings, String warning, CurveStatistics observed, CurveStatistics[] draws,
            ScaleCurves curves, ScaleCurves.DrawCurve[] observedCurves, ScaleCurves.DrawCurve[][] drawCurves,
            long failedFits, double seconds) {
        this.settings = settings;
        this.warning = warning;
        this.observed = observed;
        this.draws = draws.clone();
        this.curves = curves;
        this.observedCurves = observedCurves;
        this.drawCurves = drawCurves;
        this.failedFits = failedFits;
        this.seconds = seconds;
    }

    public NullDrawSettings settings() {
        return settings;
    }

    /**
     * One sentence when the draws split up clusters that the plan's standard errors use (see
     * {@link IgnoredClustering}), otherwise {@code null}.
     */
    public String warning() {
        return warning;
    }

    public CurveStatistics observed() {
        return observed;
    }

    public int drawCount() {
        return draws.length;
    }

    /** The statistics of draw {@code d} (0-based). */
    public CurveStatistics draw(int d) {
        return draws[d];
    }

    /** Specification fits that failed in some draw (too few distinct rows, a constant key predictor...). */
    public long failedFits() {
        return failedFits;
    }

    /** Draws in which no specification could be fitted; they are left out of the p-values. */
    public int emptyDraws() {
        int empty = 0;
        for (CurveStatistics c : draws) {
            if (c.fitted() == 0) {
                empty++;
            }
        }
        return empty;
    }

    public double seconds() {
        return seconds;
    }

    /** Share of draws with |median| at least the observed |median|. */
    public double pMedian() {
        return medianTally().p();
    }

    /** The draws behind {@link #pMedian}. */
    public DrawTally medianTally() {
        return tally(c -> Math.abs(c.median()) >= Math.abs(observed.median()));
    }

    /** Share of draws with at least the observed share significant in the dominant sign. */
    public double pShareSignificant() {
        return shareSignificantTally().p();
    }

    /** The draws behind {@link #pShareSignificant}. */
    public DrawTally shareSignificantTally() {
        return tally(c -> c.shareSignificant() >= observed.shareSignificant());
    }

    /** Share of draws with |mean z| at least the observed |mean z|. */
    public double pStouffer() {
        return stoufferTally().p();
    }

    /** The draws behind {@link #pStouffer}. */
    public DrawTally stoufferTally() {
        return tally(c -> Math.abs(c.meanZ()) >= Math.abs(observed.meanZ()));
    }

    /**
     * The min-p adjusted p-value of a nominal p (Westfall &amp; Young 1993, Resampling-Based Multiple
     * Testing, algorithm 2.8): the share of draws whose smallest p is at most it.
     */
    public double minPAdjusted(double nominal) {
        return minPAdjustedTally(nominal).p();
    }

    /** The draws behind {@link #minPAdjusted}. */
    public DrawTally minPAdjustedTally(double nominal) {
        return tally(c -> c.minP() <= nominal);
    }

    private DrawTally tally(java.util.function.Predicate<CurveStatistics> extreme) {
        return tally(draws, extreme);
    }

    private static DrawTally tally(CurveStatistics[] draws, java.util.function.Predicate<CurveStatistics> extreme) {
        int valid = 0;
        int hits = 0;
        for (CurveStatistics c : draws) {
            if (c.fitted() == 0) {
                continue;
            }
            valid++;
            if (extreme.test(c)) {
                hits++;
            }
        }
        return new DrawTally(hits, valid);
    }

    /** The 2.5, 50 and 97.5 percentiles of a statistic over the draws (R type 7: Hyndman &amp; Fan 1996). */
    Map<String, Object> quantiles(java.util.function.ToDoubleFunction<CurveStatistics> statistic) {
        return quantiles(draws, statistic);
    }

    private static Map<String, Object> quantiles(CurveStatistics[] draws,
            java.util.function.ToDoubleFunction<CurveStatistics> statistic) {
        double[] values = java.util.Arrays.stream(draws).filter(c -> c.fitted() > 0).mapToDouble(statistic).toArray();
        Map<String, Object> q = new LinkedHashMap<>();
        Percentile percentile = new Percentile().withEstimationType(Percentile.EstimationType.R_7);
        for (double at : new double[] {2.5, 50, 97.5}) {
            q.put(at == 50 ? "50" : Double.toString(at), values.length == 0 ? null
                    : Json.number(percentile.evaluate(values, at)));
        }
        return q;
    }

    /**
     * Whether the whole run's median test pools estimates in different units: fitted specifications in more
     * than one comparable group as fitted. Its per-group and unit-free versions are {@link #curveJson}.
     */
    public boolean mixesUnits() {
        return curves.curves().stream().filter(c -> c.group() != null).count() > 1;
    }

    /** The index of a comparable group's curve as fitted ({@link org.forkscape.run.UnitGroups.Group#id()}), -1 when none. */
    public int curveOfGroup(int group) {
        return curves.curveOfGroup(group);
    }

    /** The index of the curve on a unit-free scale (t statistic, partial correlation), -1 when there is none. */
    public int curveOfScale(org.forkscape.run.Scale scale) {
        for (int c = 0; c < curves.curves().size(); c++) {
            if (curves.curves().get(c).group() == null && curves.curves().get(c).scale() == scale) {
                return c;
            }
        }
        return -1;
    }

    /** The curves the draws are judged on, per comparable group and unit-free scale. */
    public int curveCount() {
        return curves.curves().size();
    }

    /** Curve {@code c} of draw {@code d}: its statistics and its sorted values at the kept ranks. */
    ScaleCurves.DrawCurve drawCurve(int d, int c) {
        return drawCurves[d][c];
    }

    /** Curve {@code c}'s statistics in each draw. */
    private CurveStatistics[] drawsOf(int c) {
        CurveStatistics[] out = new CurveStatistics[drawCurves.length];
        for (int d = 0; d < drawCurves.length; d++) {
            out[d] = drawCurves[d][c].statistics();
        }
        return out;
    }

    /** The observed statistics of curve {@code c}. */
    public CurveStatistics observedOf(int c) {
        return observedCurves[c].statistics();
    }

    /** The draws with |median| on curve {@code c} at least its observed |median|. */
    public DrawTally medianTally(int c) {
        double at = Math.abs(observedOf(c).median());
        return tally(drawsOf(c), s -> Math.abs(s.median()) >= at);
    }

    /** The min-p adjustment of a nominal p within curve {@code c}: draws whose smallest p on it is at most it. */
    public DrawTally minPAdjustedTally(int c, double nominal) {
        return tally(drawsOf(c), s -> s.minP() <= nominal);
    }

    /**
     * The null band of curve {@code c}: at each kept rank of the observed curve, the 2.5%, 50% and 97.5%
     * quantiles (R type 7) over the draws of the draw's sorted values at that rank, over the draws in which
     * something of the curve was fitted.
     */
    Map<String, Object> envelope(int c) {
        int[] ranks = curves.curves().get(c).ranks();
        Percentile percentile = new Percentile().withEstimationType(Percentile.EstimationType.R_7);
        java.util.List<Object> low = new java.util.ArrayList<>();
        java.util.List<Object> middle = new java.util.ArrayList<>();
        java.util.List<Object> high = new java.util.ArrayList<>();
        double[] values = new double[drawCurves.length];
        for (int k = 0; k < ranks.length; k++) {
            int n = 0;
            for (ScaleCurves.DrawCurve[] draw : drawCurves) {
                if (draw[c].statistics().fitted() > 0) {
                    values[n++] = draw[c].atRanks()[k];
                }
            }
            percentile.setData(values, 0, n);
            low.add(n == 0 ? null : Json.number(percentile.evaluate(2.5)));
            middle.add(n == 0 ? null : Json.number(percentile.evaluate(50)));
            high.add(n == 0 ? null : Json.number(percentile.evaluate(97.5)));
        }
        Map<String, Object> m = new LinkedHashMap<>();
        m.put("specifications", curves.curves().get(c).observed());
        m.put("ranks", java.util.Arrays.stream(ranks).boxed().toList());
        m.put("low", low);
        m.put("median", middle);
        m.put("high", high);
        return m;
    }

    /**
     * The null draws on curve {@code c} alone, for summary.json's {@code by_scale}: the three joint tests
     * on it (the median on its own scale; the share significant in its dominant sign and the mean normal
     * score of its specifications), the observed values, the quantiles of the draws' medians and the
     * rank-by-rank band.
     */
    public Map<String, Object> curveJson(int c) {
        CurveStatistics[] of = drawsOf(c);
        CurveStatistics obs = observedOf(c);
        Map<String, Object> m = new LinkedHashMap<>();
        m.put("draws", drawCurves.length);
        Map<String, Object> tests = new LinkedHashMap<>();
        tests.put("median", medianTally(c).toJson());
        tests.put("share_significant", tally(of, s -> s.shareSignificant() >= obs.shareSignificant()).toJson());
        tests.put("stouffer", tally(of, s -> Math.abs(s.meanZ()) >= Math.abs(obs.meanZ())).toJson());
        m.put("tests", tests);
        Map<String, Object> o = new LinkedHashMap<>();
        o.put("median", Json.number(obs.median()));
        o.put("dominant_sign", obs.dominantSignName());
        o.put("share_significant", Json.number(obs.shareSignificant()));
        o.put("mean_z", Json.number(obs.meanZ()));
        m.put("observed", o);
        m.put("null_quantiles_median", quantiles(of, CurveStatistics::median));
        m.put("envelope", envelope(c));
        return m;
    }

    /** The summary.json section {@code null}. */
    public Map<String, Object> toJson() {
        Map<String, Object> m = new LinkedHashMap<>();
        m.put("draws", draws.length);
        m.put("method", settings.method().spelling());
        m.put("seed", settings.seed());
        m.put("cluster", settings.clusterColumn());
        m.put("resampled", settings.clusterColumn() == null ? "rows" : "clusters");
        m.put("warning", warning);
        m.put("specifications", observed.fitted());
        m.put("p_median", Json.number(pMedian()));
        m.put("median_mixes_units", mixesUnits());
        m.put("p_share_significant", Json.number(pShareSignificant()));
        m.put("p_stouffer", Json.number(pStouffer()));
        Map<String, Object> tests = new LinkedHashMap<>();
        tests.put("median", medianTally().toJson());
        tests.put("share_significant", shareSignificantTally().toJson());
        tests.put("stouffer", stoufferTally().toJson());
        m.put("tests", tests);
        Map<String, Object> obs = new LinkedHashMap<>();
        obs.put("median_estimate", Json.number(observed.median()));
        obs.put("dominant_sign", observed.dominantSignName());
        obs.put("significant_in_dominant_sign", observed.significant());
        obs.put("share_significant", Json.number(observed.shareSignificant()));
        obs.put("mean_z", Json.number(observed.meanZ()));
        m.put("observed", obs);
        Map<String, Object> q = new LinkedHashMap<>();
        q.put("median_estimate", quantiles(CurveStatistics::median));
        q.put("share_significant", quantiles(CurveStatistics::shareSignificant));
        q.put("mean_z", quantiles(CurveStatistics::meanZ));
        m.put("null_quantiles", q);
        m.put("failed_fits", failedFits);
        m.put("empty_draws", emptyDraws());
        m.put("seconds", Math.round(seconds * 1000) / 1000.0);
        m.put("file", NullDrawsCsv.FILE);
        return m;
    }
}
