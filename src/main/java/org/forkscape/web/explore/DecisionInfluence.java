package org.forkscape.web.explore;

import java.util.ArrayList;
import java.util.List;
import org.forkscape.infer.InfluenceReport;
import org.forkscape.infer.SpecificationGrid;
import org.forkscape.plan.Factor;

/**
 * The influence panel from the inference package's {@link org.forkscape.infer.Influence} (variance shares,
 * level means, the share significant in the dominant sign and the sentence, exactly as summary.json
 * reports them for the whole run), fed from the ranked columns without decoding any specification, plus
 * the quartiles of the estimates at each level for the panel's chart, in one more pass per factor.
 * Quartiles interpolate between order statistics (Hyndman &amp; Fan 1996, "Sample quantiles in
 * statistical packages", The American Statistician 50(4), definition 7).
 */
public final class DecisionInfluence implements InfluenceAnalysis {
    /**
     * Specifications times factor pairs up to which pairs of levels are searched for the sentence (about
     * 60 ms on this machine); above it the sentence says they were not, so a filter on a million
     * specifications still answers at once.
     */
    public static final long PAIR_WORK = 20_000_000L;

    private final long maxPairWork;

    public DecisionInfluence() {
        this(PAIR_WORK);
    }

    /** @param maxPairWork specifications times factor pairs up to which pairs are searched */
    public DecisionInfluence(long maxPairWork) {
        this.maxPairWork = maxPairWork;
    }

    @Override
    public Influence of(RankedRun run, int[] kept) {
        List<Factor> factors = run.factors();
        int n = kept.length;
        double[] estimates = run.estimates();
        double[] estimate = new double[n];
        double[] p = new double[n];
        for (int i = 0; i < n; i++) {
            estimate[i] = estimates[kept[i]];
            p[i] = run.pValue(kept[i]);
        }
        int[][] levelOf = new int[factors.size()][n];
        for (Factor f : factors) {
            int[] level = run.levels(f.id());
            int[] out = levelOf[f.id()];
            for (int i = 0; i < n; i++) {
                out[i] = level[kept[i]];
            }
        }
        InfluenceReport report = org.forkscape.infer.Influence.of(new SpecificationGrid(factors, levelOf, estimate,
                p, run.run().plan().alpha()), maxPairWork);
        List<Influence.FactorInfluence> out = new ArrayList<>();
        for (int f = 0; f < factors.size() && !report.factors().isEmpty(); f++) {
            Factor factor = factors.get(f);
            InfluenceReport.FactorInfluence r = report.factors().get(f);
            double[][] quartiles = quartiles(estimates, kept, run.levels(f), r.count());
            List<Influence.LevelEstimates> stats = new ArrayList<>();
            for (int l = 0; l < factor.levels().size(); l++) {
                stats.add(new Influence.LevelEstimates(l, factor.levels().get(l), r.count()[l], r.mean()[l],
                        quartiles[l][0], quartiles[l][1], quartiles[l][2], r.shareSignificant()[l]));
            }
            out.add(new Influence.FactorInfluence(f, factor.name(), factor.decision(), r.varianceShare(), stats));
        }
        String sentence = report.sentence();
        return new Influence(out, report.interactionsShare(), report.dominantSign() > 0 ? "positive" : "negative",
                report.shareSignificant(), Character.toUpperCase(sentence.charAt(0)) + sentence.substring(1) + ".");
    }

    /**
     * Per level: lower quartile, median, upper quartile, from the kept ranks' ascending estimates. The
     * order statistics each quantile needs are known from the level counts, so one pass picks them: per
     * level, the next position wanted is compared with the level's running count.
     */
    static double[][] quartiles(double[] e, int[] kept, int[] level, int[] count) {
        int levels = count.length;
        double[] p = {0.25, 0.5, 0.75};
        // the order statistics wanted, ascending per level: floor(h) and floor(h) + 1 for each quantile
        int[][] wanted = new int[levels][];
        double[][] value = new double[levels][];
        for (int l = 0; l < levels; l++) {
            java.util.TreeSet<Integer> positions = new java.util.TreeSet<>();
            for (double q : p) {
                int lo = (int) Math.floor((count[l] - 1) * q);
                positions.add(lo);
                positions.add(Math.min(lo + 1, Math.max(0, count[l] - 1)));
            }
            wanted[l] = positions.stream().mapToInt(Integer::intValue).toArray();
            value[l] = new double[wanted[l].length];
        }
        int[] seen = new int[levels];
        int[] next = new int[levels];
        for (int k : kept) {
            int l = level[k];
            int i = seen[l]++;
            int w = next[l];
            if (w < wanted[l].length && wanted[l][w] == i) {
                value[l][w] = e[k];
                next[l] = w + 1;
            }
        }
        double[][] q = new double[levels][3];
        for (int l = 0; l < levels; l++) {
            for (int j = 0; j < 3; j++) {
                if (count[l] == 0) {
                    q[l][j] = Double.NaN;
                    continue;
                }
                double h = (count[l] - 1) * p[j];
                int lo = (int) Math.floor(h);
                int hi = Math.min(lo + 1, count[l] - 1);
                double a = value[l][java.util.Arrays.binarySearch(wanted[l], lo)];
                double b = value[l][java.util.Arrays.binarySearch(wanted[l], hi)];
                q[l][j] = a + (h - lo) * (b - a);
            }
        }
        return q;
    }
}
