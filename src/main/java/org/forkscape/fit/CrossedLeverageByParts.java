package org.forkscape.fit;

import java.util.Arrays;
import java.util.HashMap;
import java.util.Map;

/**
 * Beside two absorbed columns held in parts ({@link CrossedEffectsByParts}), for HC2 and HC3: the dummies' part
 * of the leverages of one part's usable rows, from the driver's generalised inverse of the Schur complement.
 */
final class CrossedLeverageByParts {
    private CrossedLeverageByParts() {
    }

    /**
     * The dummies' part of the leverage of each of the part's usable rows, w_i d_i'(D'WD)^- d_i, for HC2 and HC3:
     * for a row at levels (a, b), 1/W_a + u'S^-u with u = e_b - c_a/W_a (c_a the weights of a's pairs with B,
     * all in this part), expanded over the B levels a meets as {@link CrossedDummyLeverage} expands it, with
     * the driver's S^- ({@link CrossedEffectsByParts.Effects#inverse}) in place of one machine's; a level a at one B level has u = 0
     * and the value 1/W_a exactly (a singleton's leverage is 1). The block form of a generalised inverse of
     * D'WD by its Schur complement; Frisch-Waugh-Lovell adds the within columns' part (Davidson &amp;
     * MacKinnon 2004, Econometric Theory and Methods, sections 2.4 and 2.6).
     */
    static DummyLeverage of(CodedRows coded, CrossedEffectsByParts.Codes codes, long[] usableMasks,
            CrossedEffectsByParts.Effects e) {
        int[] rows = CrossedEffectsByParts.usableRows(coded, usableMasks);
        int n = rows.length;
        int[] level = new int[n];
        CrossedEffectsByParts.localFirst(codes.first(), rows, level);
        Integer[] order = new Integer[n];
        for (int i = 0; i < n; i++) {
            order[i] = i;
        }
        int[] second = codes.second();
        Arrays.sort(order, (x, y) -> level[x] != level[y] ? Integer.compare(level[x], level[y])
                : x.compareTo(y));
        double[] value = new double[coded.rows];
        int m = e.inverse() == null ? 0 : (int) Math.round(Math.sqrt(e.inverse().length));
        int start = 0;
        while (start < n) {
            int a = level[order[start]];
            int end = start;
            while (end < n && level[order[end]] == a) {
                end++;
            }
            // a's pairs: its B codes ascending, each with its weight, rows added in row order
            java.util.TreeMap<Integer, Double> pairs = new java.util.TreeMap<>();
            double na = 0;
            for (int k = start; k < end; k++) {
                int r = rows[order[k]];
                double w = coded.weight == null ? 1 : coded.weight[r];
                pairs.merge(second[r], w, Double::sum);
            }
            int[] bs = pairs.keySet().stream().mapToInt(Integer::intValue).toArray();
            double[] cw = pairs.values().stream().mapToDouble(Double::doubleValue).toArray();
            for (double w : cw) {
                na += w;
            }
            Map<Integer, Double> byPair = new HashMap<>();
            if (bs.length == 1) {
                byPair.put(bs[0], 1 / na);
            } else {
                double[] cross = new double[bs.length];
                double quadratic = 0;
                for (int c = 0; c < bs.length; c++) {
                    int lb = e.reduced()[bs[c]];
                    double sum = 0;
                    if (lb >= 0) {
                        for (int c2 = 0; c2 < bs.length; c2++) {
                            int lb2 = e.reduced()[bs[c2]];
                            if (lb2 >= 0) {
                                sum += e.inverse()[lb * m + lb2] * cw[c2];
                            }
                        }
                    }
                    cross[c] = sum;
                    quadratic += cw[c] * sum;
                }
                quadratic /= na * na;
                for (int c = 0; c < bs.length; c++) {
                    int lb = e.reduced()[bs[c]];
                    double v = 1 / na + quadratic;
                    if (lb >= 0) {
                        v += e.inverse()[lb * m + lb] - 2 * cross[c] / na;
                    }
                    byPair.put(bs[c], v);
                }
            }
            for (int k = start; k < end; k++) {
                int r = rows[order[k]];
                value[r] = (coded.weight == null ? 1 : coded.weight[r]) * byPair.get(second[r]);
            }
            start = end;
        }
        boolean ill = e.illConditioned();
        return new DummyLeverage() {
            @Override
            public double at(int row) {
                return value[row];
            }

            @Override
            public boolean illConditioned() {
                return ill;
            }
        };
    }

}
