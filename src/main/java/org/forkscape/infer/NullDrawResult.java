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
    private final long failedFits;
    private final double seconds;

    NullDrawResult(NullDrawSettings settings, String warning, CurveStatistics observed, CurveStatistics[] draws,
            long failedFits, double seconds) {
        this.settings = settings;
        this.warning = warning;
        this.observed = observed;
        this.draws = draws.clone();
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
        double[] values = java.util.Arrays.stream(draws).filter(c -> c.fitted() > 0).mapToDouble(statistic).toArray();
        Map<String, Object> q = new LinkedHashMap<>();
        Percentile percentile = new Percentile().withEstimationType(Percentile.EstimationType.R_7);
        for (double at : new double[] {2.5, 50, 97.5}) {
            q.put(at == 50 ? "50" : Double.toString(at), values.length == 0 ? null
                    : Json.number(percentile.evaluate(values, at)));
        }
        return q;
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
