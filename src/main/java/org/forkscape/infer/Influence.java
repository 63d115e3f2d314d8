package org.forkscape.infer;

import java.util.ArrayList;
import java.util.Arrays;
import java.util.Comparator;
import java.util.List;
import org.forkscape.plan.Factor;
import org.forkscape.run.RunResult;
import org.forkscape.text.HumanNumbers;

/**
 * Which decisions move the estimate: for each factor, the mean estimate and the share significant in
 * the dominant sign at each level, and its variance share, the between-level sum of squares of the
 * estimates divided by their total sum of squares (a one-way analysis of variance of the estimates on
 * the factor; in a full factorial of specifications these are the orthogonal main effects, Scheffe 1959,
 * The Analysis of Variance, section 4.1, and what they leave is the interactions). Then the plainest
 * restriction that turns the headline around: single levels first, then pairs of levels of two factors,
 * that bring the share significant in the dominant sign below one half (or, when it is below half
 * overall, up to at least half).
 *
 * <p>A service over any subset of a run's specifications, so the explorer can call it after filters.
 */
public final class Influence {
    /** Restrictions listed in the output at most; the sentence names at most {@link #IN_SENTENCE}. */
    static final int LISTED = 20;
    static final int IN_SENTENCE = 3;

    private Influence() {
    }

    /** The influence of the decisions over the fitted specifications among {@code slots}. */
    public static InfluenceReport of(RunResult run, int[] slots) {
        return of(SpecificationGrid.of(run, slots));
    }

    public static InfluenceReport of(SpecificationGrid grid) {
        return of(grid, Long.MAX_VALUE);
    }

    /**
     * As {@link #of(SpecificationGrid)}, but pairs of levels are searched only while the specifications
     * times the pairs of factors stay within {@code maxPairWork}: the explorer recomputes this on every
     * filter and must answer at once on a million specifications; the sentence then says the pairs were
     * not searched.
     */
    public static InfluenceReport of(SpecificationGrid grid, long maxPairWork) {
        int n = grid.size();
        List<Factor> factors = grid.factors();
        if (n == 0) {
            return new InfluenceReport(List.of(), Double.NaN, Double.NaN, 0, 1, Double.NaN, List.of(), 0,
                    "no specification has an estimate");
        }
        double[] sorted = new double[n];
        double mean = 0;
        for (int i = 0; i < n; i++) {
            sorted[i] = grid.estimate(i);
            mean += sorted[i];
        }
        mean /= n;
        Arrays.sort(sorted);
        int sign = CurveStatistics.median(sorted, n) >= 0 ? 1 : -1;
        boolean[] significant = new boolean[n];
        int significantCount = 0;
        double total = 0;
        for (int i = 0; i < n; i++) {
            double b = grid.estimate(i);
            significant[i] = grid.pValue(i) < grid.alpha() && (sign > 0 ? b > 0 : b < 0);
            if (significant[i]) {
                significantCount++;
            }
            total += (b - mean) * (b - mean);
        }
        double overall = (double) significantCount / n;

        List<InfluenceReport.FactorInfluence> out = new ArrayList<>();
        double mainEffects = 0;
        for (int f = 0; f < factors.size(); f++) {
            int levels = factors.get(f).levels().size();
            double[] sum = new double[levels];
            int[] count = new int[levels];
            int[] sig = new int[levels];
            for (int i = 0; i < n; i++) {
                int l = grid.level(f, i);
                sum[l] += grid.estimate(i);
                count[l]++;
                if (significant[i]) {
                    sig[l]++;
                }
            }
            double[] levelMean = new double[levels];
            double[] levelShare = new double[levels];
            double between = 0;
            for (int l = 0; l < levels; l++) {
                levelMean[l] = count[l] == 0 ? Double.NaN : sum[l] / count[l];
                levelShare[l] = count[l] == 0 ? Double.NaN : (double) sig[l] / count[l];
                if (count[l] > 0) {
                    between += count[l] * (levelMean[l] - mean) * (levelMean[l] - mean);
                }
            }
            double share = total > 0 ? between / total : Double.NaN;
            mainEffects += share;
            out.add(new InfluenceReport.FactorInfluence(factors.get(f), levelMean, count, levelShare, share));
        }
        boolean below = overall >= 0.5;
        List<InfluenceReport.Restriction> found = singles(grid, significant, below);
        int level = 1;
        long factorPairs = (long) factors.size() * (factors.size() - 1) / 2;
        if (found.isEmpty() && factorPairs > 0 && n > maxPairWork / factorPairs) {
            level = -1;
        } else if (found.isEmpty()) {
            found = pairs(grid, significant, below);
            level = found.isEmpty() ? 0 : 2;
        }
        Comparator<InfluenceReport.Restriction> order = Comparator.comparingDouble(InfluenceReport.Restriction::share);
        found.sort(below ? order : order.reversed());
        String sentence = sentence(sign, overall, n, below, level, found);
        List<InfluenceReport.Restriction> listed = found.size() > LISTED ? found.subList(0, LISTED) : found;
        return new InfluenceReport(out, mainEffects, total > 0 ? 1 - mainEffects : Double.NaN, n, sign, overall,
                List.copyOf(listed), found.size(), sentence);
    }

    private static boolean turns(double share, boolean below) {
        return below ? share < 0.5 : share >= 0.5;
    }

    private static List<InfluenceReport.Restriction> singles(SpecificationGrid grid, boolean[] significant,
            boolean below) {
        List<InfluenceReport.Restriction> found = new ArrayList<>();
        List<Factor> factors = grid.factors();
        for (int f = 0; f < factors.size(); f++) {
            int levels = factors.get(f).levels().size();
            int[] count = new int[levels];
            int[] sig = new int[levels];
            for (int i = 0; i < grid.size(); i++) {
                int l = grid.level(f, i);
                count[l]++;
                if (significant[i]) {
                    sig[l]++;
                }
            }
            for (int l : factors.get(f).reportOrder()) {
                if (count[l] > 0 && count[l] < grid.size() && turns((double) sig[l] / count[l], below)) {
                    found.add(new InfluenceReport.Restriction(List.of(condition(factors.get(f), l)), count[l],
                            (double) sig[l] / count[l]));
                }
            }
        }
        return found;
    }

    private static List<InfluenceReport.Restriction> pairs(SpecificationGrid grid, boolean[] significant,
            boolean below) {
        List<InfluenceReport.Restriction> found = new ArrayList<>();
        List<Factor> factors = grid.factors();
        for (int f = 0; f < factors.size(); f++) {
            int lf = factors.get(f).levels().size();
            for (int g = f + 1; g < factors.size(); g++) {
                int lg = factors.get(g).levels().size();
                int[] count = new int[lf * lg];
                int[] sig = new int[lf * lg];
                for (int i = 0; i < grid.size(); i++) {
                    int cell = grid.level(f, i) * lg + grid.level(g, i);
                    count[cell]++;
                    if (significant[i]) {
                        sig[cell]++;
                    }
                }
                for (int a : factors.get(f).reportOrder()) {
                    for (int b : factors.get(g).reportOrder()) {
                        int cell = a * lg + b;
                        if (count[cell] > 0 && count[cell] < grid.size()
                                && turns((double) sig[cell] / count[cell], below)) {
                            found.add(new InfluenceReport.Restriction(
                                    List.of(condition(factors.get(f), a), condition(factors.get(g), b)),
                                    count[cell], (double) sig[cell] / count[cell]));
                        }
                    }
                }
            }
        }
        return found;
    }

    private static InfluenceReport.Condition condition(Factor factor, int level) {
        return new InfluenceReport.Condition(factor.name(), factor.reportLabel(level));
    }

    private static String sentence(int sign, double overall, int n, boolean below, int level,
            List<InfluenceReport.Restriction> found) {
        StringBuilder s = new StringBuilder("significant in the dominant sign (")
                .append(sign > 0 ? "positive" : "negative").append(") in ").append(percent(overall)).append(" of ")
                .append(HumanNumbers.count(n)).append(n == 1 ? " specification" : " specifications").append("; ");
        String turn = below ? "below half" : "at least half";
        String reach = below ? "brings it below half" : "brings it to half or more";
        if (level == 0) {
            return s.append("no single choice and no pair of choices ").append(reach).toString();
        }
        if (level == -1) {
            return s.append("no single choice ").append(reach)
                    .append(" (pairs of choices are not searched in a set this large)").toString();
        }
        if (level == 2) {
            s.append("no single choice ").append(reach).append("; ");
        }
        s.append(turn).append(" only when ");
        int shown = Math.min(IN_SENTENCE, found.size());
        for (int k = 0; k < shown; k++) {
            if (k > 0) {
                s.append(", or when ");
            }
            InfluenceReport.Restriction r = found.get(k);
            s.append(r.describe()).append(" (").append(percent(r.share())).append(" of ").append(HumanNumbers.count(r.specifications()))
                    .append(')');
        }
        int more = found.size() - shown;
        if (more > 0) {
            s.append(", and under ").append(HumanNumbers.count(more)).append(" more ").append(level == 1 ? "single choice" : "pair")
                    .append(more == 1 ? "" : "s");
        }
        return s.toString();
    }

    /** A share as {@link HumanNumbers#share} writes it; just below one half, with the decimals that keep it below 50%. */
    static String percent(double share) {
        String text = HumanNumbers.share(share);
        if (share < 0.5 && text.equals("50%")) {
            String two = String.format(java.util.Locale.ROOT, "%.2f%%", 100 * share);
            return two.startsWith("50") ? "just under 50%" : two;
        }
        return text;
    }
}
