package org.forkscape.run;

import java.math.BigInteger;
import java.util.Arrays;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.stream.IntStream;
import org.forkscape.plan.Plan;
import org.forkscape.plan.ReportedSpecification;
import org.forkscape.plan.SpecificationNumber;
import org.forkscape.plan.SpecificationSpace;

/**
 * Where the specification the authors report ({@link Plan#reported()}) sits among the run's fitted
 * specifications, on each scale: within its comparable group on the scales with units ({@link UnitGroups}),
 * among every specification with a value on the unit-free ones. Against the {@code n} specifications of
 * that set (the reported one among them), with {@code below} of them smaller and {@code tied} equal
 * (itself included):
 * <ul>
 * <li>{@code rank} = below + 1, counted from the smallest (ties share the lowest rank);</li>
 * <li>{@code percentile} = 100 (below + tied / 2) / n, the percentile rank with ties counted half
 * (common practice);</li>
 * <li>{@code share_smaller} = below / n, and {@code share_larger} the share above;</li>
 * <li>{@code share_significant_same_sign}: the share with p below the plan's level and a value of the
 * reported one's sign (NaN when its value is 0).</li>
 * </ul>
 * A sampled run places it only when the sample holds it: fitting it besides would add a chosen
 * specification to a random sample, whose numbers would then no longer describe a random sample.
 */
public final class ReportedPosition {
    /** The scales in the order and with the keys of summary.json's {@code scales} section. */
    static final List<Scale> SCALES = List.of(Scale.AS_FITTED, Scale.AVERAGE_MARGINAL_EFFECT, Scale.STANDARDIZED,
            Scale.PARTIAL_CORRELATION, Scale.T_STATISTIC);

    /** Where one value sits in a set of fitted specifications on one scale. */
    public record Place(double value, int count, int rank, double percentile, double shareSmaller, double shareLarger,
            double shareSignificantSameSign) {
        Map<String, Object> toJson() {
            Map<String, Object> m = new LinkedHashMap<>();
            m.put("value", Json.number(value));
            m.put("specifications", count);
            m.put("rank", rank);
            m.put("percentile", Json.number(percentile));
            m.put("share_smaller", Json.number(shareSmaller));
            m.put("share_larger", Json.number(shareLarger));
            m.put("share_significant_same_sign", Json.number(shareSignificantSameSign));
            return m;
        }
    }

    private ReportedPosition() {
    }

    /**
     * The result slot of the plan's reported specification, or -1 when the run did not include it (a
     * sample without it); the plan must name one.
     */
    public static int slotOf(Plan plan, SpecificationSpace space, ResultTable r) {
        BigInteger number = space.index(plan.reported().toArray()).add(BigInteger.ONE);
        long key = space.key(number);
        if (key < 0) {
            return -1;
        }
        int low = 0;
        int high = r.size() - 1;
        // the slots hold their keys in increasing order (SpecificationSpace.indices)
        while (low <= high) {
            int mid = (low + high) >>> 1;
            long k = r.specIndex(mid);
            if (k == key) {
                return mid;
            }
            if (k < key) {
                low = mid + 1;
            } else {
                high = mid - 1;
            }
        }
        return -1;
    }

    /** Where the value of {@code slot} on {@code scale} sits among the fitted {@code slots} with a value on it. */
    public static Place place(ResultTable r, int slot, int[] slots, Scale scale, double alpha) {
        double v = scale.value(r, slot);
        int n = 0;
        int below = 0;
        int tied = 0;
        int sameSign = 0;
        for (int s : slots) {
            double x = scale.value(r, s);
            if (Double.isNaN(x)) {
                continue;
            }
            n++;
            if (x < v) {
                below++;
            } else if (x == v) {
                tied++;
            }
            if (r.pValue(s) < alpha && Math.signum(x) == Math.signum(v)) {
                sameSign++;
            }
        }
        double f = n;
        return new Place(v, n, below + 1, 100 * (below + tied / 2.0) / f, below / f, (n - below - tied) / f,
                v == 0 ? Double.NaN : sameSign / f);
    }

    /** summary.json's {@code reported} section; the plan must name a reported specification. */
    static Map<String, Object> toJson(RunResult run) {
        Plan plan = run.plan();
        ReportedSpecification reported = plan.reported();
        SpecificationSpace space = run.models().space();
        ResultTable r = run.results();
        Map<String, Object> m = new LinkedHashMap<>();
        SpecificationNumber number = new SpecificationNumber(space.index(reported.toArray()).add(BigInteger.ONE),
                space.beyondLong());
        m.put("spec", number.json());
        m.put("labels", reported.labels(plan.decisions()));
        int slot = slotOf(plan, space, r);
        m.put("in_run", slot >= 0);
        if (slot < 0) {
            m.put("note", "The run fitted a seeded sample of " + r.size() + " specifications that does not hold the "
                    + "reported one, so its place is not given; run the plan without a sample to place it.");
            return m;
        }
        m.put("status", r.status(slot));
        if (!r.fitted(slot)) {
            return m;
        }
        m.put("estimate", Json.number(r.estimate(slot)));
        m.put("p_value", Json.number(r.pValue(slot)));
        m.put("significant", r.pValue(slot) < plan.alpha());
        int[] fitted = IntStream.range(0, r.size()).filter(r::fitted).toArray();
        Map<String, Object> positions = new LinkedHashMap<>();
        for (Scale scale : SCALES) {
            Map<String, Object> e = new LinkedHashMap<>();
            int[] set = fitted;
            if (!scale.unitFree()) {
                UnitGroups units = UnitGroups.of(run, scale);
                int group = units.groupOf(slot);
                e.put("group", group);
                e.put("title", units.groups().get(group).title());
                set = Arrays.stream(fitted).filter(s -> units.groupOf(s) == group).toArray();
            }
            if (scale.defined(r, slot)) {
                e.putAll(place(r, slot, set, scale, plan.alpha()).toJson());
            } else {
                e.put("value", null);
                e.put("note", "the " + scale.title() + " is not defined for its model");
            }
            positions.put(key(scale), e);
        }
        m.put("scales", positions);
        return m;
    }

    /** The key of a scale in summary.json's {@code scales} section. */
    private static String key(Scale scale) {
        return scale == Scale.AS_FITTED ? "as_fitted" : scale.name().toLowerCase(Locale.ROOT);
    }
}
