package org.forkscape.infer;

import java.util.LinkedHashMap;
import java.util.Map;
import java.util.function.DoubleFunction;
import org.forkscape.plan.SpecificationNumber;
import org.forkscape.run.Json;
import org.forkscape.run.ResultTable;

/**
 * The best-looking specification, the one with the smallest p-value, with its p adjusted for having
 * been picked out of the whole set by the min-p method (Westfall &amp; Young 1993, Resampling-Based
 * Multiple Testing): the share of null draws whose smallest p is at least as small.
 *
 * @param spec      1-based specification number in the full space (column {@code spec} of
 *                  specifications.csv)
 * @param row       1-based data row of specifications.csv (the header not counted)
 * @param pNominal  its own p-value
 * @param adjusted  the draws behind the min-p adjusted p-value; null without null draws
 */
public record BestSpecification(SpecificationNumber spec, int row, double pNominal, DrawTally adjusted) {

    /**
     * The best of the given slots; ties keep the first slot. Returns null when none is fitted.
     *
     * @param draws the null draws over the same specifications, or null
     */
    public static BestSpecification of(ResultTable results, int[] slots, NullDrawResult draws) {
        return within(results, slots, draws == null ? null : draws::minPAdjustedTally);
    }

    /**
     * The best of the given slots, its p adjusted by {@code adjust} (the draws whose smallest p over the
     * same slots is at most it), or not adjusted when {@code adjust} is null.
     */
    public static BestSpecification within(ResultTable results, int[] slots, DoubleFunction<DrawTally> adjust) {
        int best = -1;
        double bestP = Double.POSITIVE_INFINITY;
        for (int slot : slots) {
            if (!results.fitted(slot)) {
                continue;
            }
            double p = results.pValue(slot);
            if (p < bestP) {
                bestP = p;
                best = slot;
            }
        }
        if (best < 0) {
            return null;
        }
        DrawTally adjusted = adjust == null ? null : adjust.apply(bestP);
        return new BestSpecification(results.specNumber(best), best + 1, bestP, adjusted);
    }

    /** The min-p adjusted p-value; NaN without null draws. */
    public double pAdjusted() {
        return adjusted == null ? Double.NaN : adjusted.p();
    }

    /** The summary.json section {@code best}. */
    public Map<String, Object> toJson() {
        Map<String, Object> m = new LinkedHashMap<>();
        m.put("spec", spec.json());
        m.put("row", row);
        m.put("p_nominal", Json.number(pNominal));
        m.put("p_adjusted", Json.number(pAdjusted()));
        m.put("adjusted_test", adjusted == null ? null : adjusted.toJson());
        m.put("adjustment", adjusted == null ? "none: ask for null draws (plan key \"nullDraws\", or --null-draws R) to adjust it"
                : "min-p over the null draws (Westfall & Young 1993)");
        return m;
    }
}
