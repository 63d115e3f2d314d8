package org.forkscape.infer;

import java.util.LinkedHashMap;
import java.util.Map;
import org.forkscape.plan.SpecificationNumber;
import org.forkscape.run.Json;
import org.forkscape.run.ResultTable;

/**
 * Leamer's extreme bounds (Leamer 1983, "Let's take the con out of econometrics", American Economic
 * Review 73(1)): the lowest lower interval bound and the highest upper bound over the specifications,
 * and whether the two share a sign, Leamer's test of an estimate that no choice of specification can
 * overturn.
 *
 * @param lower      lowest lower bound of the confidence intervals
 * @param upper      highest upper bound
 * @param lowerSpec  1-based specification number that attains {@code lower}
 * @param upperSpec  likewise for {@code upper}
 * @param confidence the interval level
 */
public record LeamerBounds(double lower, double upper, SpecificationNumber lowerSpec, SpecificationNumber upperSpec, double confidence) {

    /** Over the fitted specifications among {@code slots}; null when none is fitted. */
    public static LeamerBounds of(ResultTable results, int[] slots, double confidence) {
        double lower = Double.POSITIVE_INFINITY;
        double upper = Double.NEGATIVE_INFINITY;
        SpecificationNumber lowerSpec = null;
        SpecificationNumber upperSpec = null;
        for (int slot : slots) {
            if (!results.fitted(slot)) {
                continue;
            }
            double lo = results.ciLow(slot, confidence);
            double hi = results.ciHigh(slot, confidence);
            if (lo < lower) {
                lower = lo;
                lowerSpec = results.specNumber(slot);
            }
            if (hi > upper) {
                upper = hi;
                upperSpec = results.specNumber(slot);
            }
        }
        return lowerSpec == null ? null : new LeamerBounds(lower, upper, lowerSpec, upperSpec, confidence);
    }

    /** Whether both bounds lie strictly on the same side of zero. */
    public boolean sameSign() {
        return lower > 0 && upper > 0 || lower < 0 && upper < 0;
    }

    /** The summary.json section for these bounds (its key is fixed by the summary contract). */
    public Map<String, Object> toJson() {
        Map<String, Object> m = new LinkedHashMap<>();
        m.put("lower", Json.number(lower));
        m.put("upper", Json.number(upper));
        m.put("same_sign", sameSign());
        m.put("lower_spec", lowerSpec.json());
        m.put("upper_spec", upperSpec.json());
        m.put("confidence", confidence);
        return m;
    }
}
