package org.forkscape.web.explore;

import java.util.ArrayList;
import java.util.Comparator;
import java.util.List;
import java.util.Locale;

/**
 * The influence panel from level statistics, one pass per factor over the kept ranks (two with the
 * quartiles), so that a filter change on a million specifications stays interactive.
 *
 * <p>Variance shares are main-effect sums of squares over the total sum of squares of the estimates, as
 * in a one-way analysis of variance per factor (Fisher 1925, Statistical Methods for Research Workers,
 * chapter VII). The sentence searches single alternatives, then pairs of levels from two factors, for the
 * restrictions under which the share significant in the dominant sign crosses one half.
 */
public final class LevelInfluence implements InfluenceAnalysis {
    /** Above this many (specification x factor pair) steps, pairs are not searched: it would stall the filter. */
    static final long PAIR_WORK = 20_000_000L;
    /** Restrictions named in the sentence. */
    private static final int NAMED = 3;

    private record Restriction(String words, int count, double share) {
    }

    @Override
    public Influence of(RankedRun run, int[] kept) {
        int n = kept.length;
        List<Factor> factors = run.factors();
        if (n == 0) {
            return new Influence(List.of(), Double.NaN, "positive", Double.NaN, "No specification is in the set.");
        }
        double[] e = run.estimates();
        byte[] sig = run.significances();
        double mean = 0;
        int positives = 0;
        int negatives = 0;
        for (int k : kept) {
            mean += e[k];
            if (e[k] > 0) {
                positives++;
            } else if (e[k] < 0) {
                negatives++;
            }
        }
        mean /= n;
        double total = 0;
        for (int k : kept) {
            double d = e[k] - mean;
            total += d * d;
        }
        int dominant = positives >= negatives ? 1 : -1;
        int dominantCount = 0;
        for (int k : kept) {
            if (sig[k] == dominant) {
                dominantCount++;
            }
        }
        double shareDominant = dominantCount / (double) n;
        boolean high = shareDominant >= 0.5;

        List<Influence.FactorInfluence> out = new ArrayList<>();
        List<Restriction> singles = new ArrayList<>();
        double summed = 0;
        for (Factor f : factors) {
            int levels = f.levels().size();
            int[] level = run.levels(f.id());
            int[] count = new int[levels];
            double[] sum = new double[levels];
            int[] sigPositive = new int[levels];
            int[] sigNegative = new int[levels];
            for (int k : kept) {
                int l = level[k];
                count[l]++;
                sum[l] += e[k] - mean;
                if (sig[k] > 0) {
                    sigPositive[l]++;
                } else if (sig[k] < 0) {
                    sigNegative[l]++;
                }
            }
            double between = 0;
            int present = 0;
            for (int l = 0; l < levels; l++) {
                if (count[l] > 0) {
                    between += sum[l] * sum[l] / count[l];
                    present++;
                }
            }
            if (present < 2) {
                // one level left: the factor cannot move the estimate (the sum is rounding noise)
                between = 0;
            }
            double share = total > 0 ? between / total : Double.NaN;
            summed += total > 0 ? share : 0;
            double[][] quartiles = levelQuartiles(e, kept, level, count);
            List<Influence.LevelEstimates> stats = new ArrayList<>();
            for (int l = 0; l < levels; l++) {
                int c = count[l];
                stats.add(new Influence.LevelEstimates(l, f.levels().get(l), c, c == 0 ? Double.NaN : mean + sum[l] / c,
                        quartiles[l][0], quartiles[l][1], quartiles[l][2],
                        c == 0 ? Double.NaN : sigPositive[l] / (double) c, c == 0 ? Double.NaN : sigNegative[l] / (double) c));
                int inDominant = dominant > 0 ? sigPositive[l] : sigNegative[l];
                if (c > 0 && c < n && crosses(inDominant / (double) c, high)) {
                    singles.add(new Restriction(f.describe(l), c, inDominant / (double) c));
                }
            }
            out.add(new Influence.FactorInfluence(f.id(), f.name(), f.decision(), share, stats));
        }
        String sentence = sentence(run, kept, dominant, shareDominant, high, singles);
        return new Influence(out, total > 0 ? 1 - summed : Double.NaN, dominant > 0 ? "positive" : "negative",
                shareDominant, sentence);
    }

    /** Per level: lower quartile, median, upper quartile (type 7), from the ascending estimates. */
    private static double[][] levelQuartiles(double[] e, int[] kept, int[] level, int[] count) {
        int levels = count.length;
        double[][] q = new double[levels][3];
        double[] p = {0.25, 0.5, 0.75};
        int[][] lo = new int[levels][3];
        double[][] frac = new double[levels][3];
        double[][] atLo = new double[levels][3];
        for (int l = 0; l < levels; l++) {
            for (int j = 0; j < 3; j++) {
                double h = (count[l] - 1) * p[j];
                lo[l][j] = (int) Math.floor(h);
                frac[l][j] = h - lo[l][j];
                q[l][j] = Double.NaN;
            }
        }
        int[] seen = new int[levels];
        for (int k : kept) {
            int l = level[k];
            int i = seen[l]++;
            for (int j = 0; j < 3; j++) {
                if (i == lo[l][j]) {
                    atLo[l][j] = e[k];
                    q[l][j] = e[k];
                } else if (i == lo[l][j] + 1) {
                    q[l][j] = atLo[l][j] + frac[l][j] * (e[k] - atLo[l][j]);
                }
            }
        }
        return q;
    }

    private static boolean crosses(double share, boolean fromHigh) {
        return fromHigh ? share < 0.5 : share >= 0.5;
    }

    private static String sentence(RankedRun run, int[] kept, int dominant, double share, boolean high,
            List<Restriction> singles) {
        StringBuilder b = new StringBuilder();
        b.append("Significant in the dominant sign (").append(dominant > 0 ? "positive" : "negative").append(") in ")
                .append(percent(share)).append(" of the ").append(String.format(Locale.ROOT, "%,d", kept.length))
                .append(" specifications; ");
        String crossing = high ? "below half" : "at least half";
        if (!singles.isEmpty()) {
            b.append(crossing).append(" when restricted to ").append(list(singles)).append('.');
            return b.toString();
        }
        List<Factor> factors = run.factors();
        long pairs = (long) factors.size() * (factors.size() - 1) / 2;
        if (pairs == 0) {
            b.append("no alternative brings it ").append(crossing).append('.');
            return b.toString();
        }
        if (pairs * kept.length > PAIR_WORK) {
            b.append("no single alternative brings it ").append(crossing)
                    .append(" (pairs of alternatives are not searched in a set this large).");
            return b.toString();
        }
        List<Restriction> found = pairs(run, kept, dominant, high);
        if (found.isEmpty()) {
            b.append("no single alternative and no pair of alternatives brings it ").append(crossing).append('.');
        } else {
            b.append(crossing).append(" only when restricted to ").append(list(found)).append('.');
        }
        return b.toString();
    }

    private static List<Restriction> pairs(RankedRun run, int[] kept, int dominant, boolean high) {
        List<Factor> factors = run.factors();
        byte[] sig = run.significances();
        List<Restriction> found = new ArrayList<>();
        for (int a = 0; a < factors.size(); a++) {
            for (int c = a + 1; c < factors.size(); c++) {
                Factor fa = factors.get(a);
                Factor fc = factors.get(c);
                int lc = fc.levels().size();
                int cells = fa.levels().size() * lc;
                int[] count = new int[cells];
                int[] inDominant = new int[cells];
                int[] la = run.levels(a);
                int[] lcol = run.levels(c);
                for (int k : kept) {
                    int cell = la[k] * lc + lcol[k];
                    count[cell]++;
                    if (sig[k] == dominant) {
                        inDominant[cell]++;
                    }
                }
                for (int cell = 0; cell < cells; cell++) {
                    if (count[cell] > 0 && count[cell] < kept.length
                            && crosses(inDominant[cell] / (double) count[cell], high)) {
                        found.add(new Restriction(fa.describe(cell / lc) + " and " + fc.describe(cell % lc),
                                count[cell], inDominant[cell] / (double) count[cell]));
                    }
                }
            }
        }
        return found;
    }

    /** The largest restrictions first: they are where the finding turns for the most specifications. */
    private static String list(List<Restriction> restrictions) {
        List<Restriction> sorted = new ArrayList<>(restrictions);
        sorted.sort(Comparator.comparingInt(Restriction::count).reversed().thenComparing(Restriction::words));
        int named = Math.min(NAMED, sorted.size());
        boolean more = sorted.size() > named;
        StringBuilder b = new StringBuilder();
        for (int i = 0; i < named; i++) {
            Restriction r = sorted.get(i);
            if (i > 0) {
                b.append(i == named - 1 && !more ? " or " : ", ");
            }
            b.append(r.words()).append(" (").append(percent(r.share())).append(" of ")
                    .append(String.format(Locale.ROOT, "%,d", r.count())).append(')');
        }
        if (more) {
            b.append(" or ").append(sorted.size() - named).append(" other").append(sorted.size() - named > 1 ? "s" : "");
        }
        return b.toString();
    }

    private static String percent(double share) {
        return Math.round(share * 100) + "%";
    }
}
