package org.forkscape.infer;

import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import org.forkscape.plan.Factor;
import org.forkscape.run.Json;

/**
 * The result of {@link Influence}: one entry per factor, the shares summed and what they leave for the
 * interactions, and the restrictions that turn the share significant in the dominant sign around.
 *
 * @param factors           per factor, in plan order
 * @param mainEffectsShare  the factors' variance shares summed
 * @param interactionsShare 1 minus that: the part of the variance of the estimates that no single factor
 *                          explains (the interactions, in a full factorial)
 * @param fitted            specifications analysed
 * @param dominantSign      +1 when the median estimate is zero or positive, -1 otherwise
 * @param shareSignificant  share significant in the dominant sign
 * @param restrictions      restrictions found (at most {@link Influence#LISTED}), most telling first
 * @param restrictionsFound how many were found
 * @param sentence          the finding in one plain sentence
 */
public record InfluenceReport(List<FactorInfluence> factors, double mainEffectsShare, double interactionsShare,
        int fitted, int dominantSign, double shareSignificant, List<Restriction> restrictions, int restrictionsFound,
        String sentence) {

    /**
     * One factor: per level (indexed by the factor's level numbers), the mean estimate, the number of
     * specifications and the share significant in the dominant sign (NaN for a level no specification
     * has), and its variance share.
     */
    public record FactorInfluence(Factor factor, double[] mean, int[] count, double[] shareSignificant,
            double varianceShare) {
    }

    /** One level of one factor, named as {@link Factor#reportLabel(int)} names it. */
    public record Condition(String factor, String level) {
    }

    /** A set of conditions, the number of specifications meeting them and their share significant. */
    public record Restriction(List<Condition> conditions, int specifications, double share) {
        /** "rows = trim and outcome = log trips". */
        public String describe() {
            List<String> parts = new ArrayList<>();
            for (Condition c : conditions) {
                parts.add(c.factor() + " = " + c.level());
            }
            return String.join(" and ", parts);
        }
    }

    /** The summary.json section {@code influence}: the list of factors. */
    public List<Map<String, Object>> factorsJson() {
        List<Map<String, Object>> list = new ArrayList<>();
        for (FactorInfluence f : factors) {
            Map<String, Object> m = new LinkedHashMap<>();
            m.put("factor", f.factor().name());
            m.put("decision", f.factor().decision());
            Map<String, Object> levels = new LinkedHashMap<>();
            Map<String, Object> counts = new LinkedHashMap<>();
            Map<String, Object> shares = new LinkedHashMap<>();
            for (int l : f.factor().reportOrder()) {
                String label = f.factor().reportLabel(l);
                levels.put(label, Json.number(f.mean()[l]));
                counts.put(label, f.count()[l]);
                shares.put(label, Json.number(f.shareSignificant()[l]));
            }
            m.put("levels", levels);
            m.put("specifications", counts);
            m.put("share_significant", shares);
            m.put("variance_share", Json.number(f.varianceShare()));
            list.add(m);
        }
        return list;
    }

    /** The summary.json section {@code influence_overall}. */
    public Map<String, Object> overallJson() {
        Map<String, Object> m = new LinkedHashMap<>();
        m.put("specifications", fitted);
        m.put("dominant_sign", dominantSign > 0 ? "positive" : "negative");
        m.put("share_significant", Json.number(shareSignificant));
        m.put("main_effects_share", Json.number(mainEffectsShare));
        m.put("interactions_share", Json.number(interactionsShare));
        m.put("sentence", sentence);
        m.put("restrictions_search", fitted == 0 ? null : shareSignificant >= 0.5 ? "below half" : "half or more");
        List<Map<String, Object>> list = new ArrayList<>();
        for (Restriction r : restrictions) {
            Map<String, Object> e = new LinkedHashMap<>();
            Map<String, Object> where = new LinkedHashMap<>();
            r.conditions().forEach(c -> where.put(c.factor(), c.level()));
            e.put("where", where);
            e.put("specifications", r.specifications());
            e.put("share_significant", Json.number(r.share()));
            list.add(e);
        }
        m.put("restrictions", list);
        m.put("restrictions_found", restrictionsFound);
        return m;
    }
}
