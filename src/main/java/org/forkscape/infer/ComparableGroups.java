package org.forkscape.infer;

import java.util.ArrayList;
import java.util.BitSet;
import java.util.LinkedHashMap;
import java.util.LinkedHashSet;
import java.util.List;
import java.util.Map;
import java.util.Set;
import org.forkscape.fit.SpecificationModel;
import org.forkscape.fit.UsableRows;
import org.forkscape.plan.Decision;
import org.forkscape.plan.ModelFamily;
import org.forkscape.plan.SpecificationNumber;
import org.forkscape.plan.SpecificationSpace;
import org.forkscape.run.Json;
import org.forkscape.run.ResultTable;

/**
 * Groups the fitted specifications whose likelihoods can be compared and whose key coefficients share one
 * scale: the same outcome alternative, key-predictor alternative and model on exactly the same rows (the
 * same sample, fixed-effect and weights alternatives and the same usable missing-value groups; a weighted
 * likelihood differs from the unweighted one by a constant of its rows' weights, which cancels within a
 * group), and computes
 * {@link GroupWeights} within each: Sala-i-Martin's CDF(0) and the BIC weights,
 * estimate and posterior inclusion probabilities. Likelihoods of different outcomes or different rows
 * are not on one scale, so nothing is weighed across groups.
 */
public final class ComparableGroups {
    /** Said in the output beside the groups. */
    public static final String NOTE = "Likelihoods and BIC compare models of the same outcome on the same rows "
            + "only, and an average of coefficients needs one coefficient on one scale, so weights are computed "
            + "within groups of specifications that share the outcome alternative, the key-predictor alternative, "
            + "the model and exactly the same rows (sample, fixed-effect and weights alternatives and missing values); "
            + "they say nothing across groups. Specifications that differ only in their standard errors are the same "
            + "model and share its weight equally.";

    private ComparableGroups() {
    }

    /** One group: its labels, its members (indices into the {@link RunVariants}) and its weights. */
    public record Group(String outcome, String predictor, String model, Map<String, String> rows, int nObs,
            int[] members, GroupWeights weights, Map<String, Double> inclusion, SpecificationNumber bestSpec,
            double bestWeight, LeamerBounds bounds) {
    }

    private record Key(int outcomeColumn, int keyColumn, ModelFamily family, int variant, BitSet usable) {
    }

    /** The groups, with Leamer's bounds of each at the interval level {@code confidence}. */
    public static List<Group> of(RunVariants variants, double confidence) {
        Map<Key, List<Integer>> byKey = new LinkedHashMap<>();
        for (int i = 0; i < variants.size(); i++) {
            int v = variants.variantOf(i);
            BitSet usable = UsableRows.groups(variants.variant(v), variants.model(i).variableMask());
            SpecificationModel model = variants.model(i);
            byKey.computeIfAbsent(new Key(model.outcomeColumn(), model.keyColumn(), model.family(), v, usable),
                    k -> new ArrayList<>()).add(i);
        }
        ResultTable r = variants.run().results();
        SpecificationSpace space = variants.run().models().space();
        List<Decision> decisions = variants.run().plan().decisions();
        long[] choices = new long[decisions.size()];
        List<Group> groups = new ArrayList<>();
        for (List<Integer> members : byKey.values()) {
            int m = members.size();
            double[] b = new double[m];
            double[] s = new double[m];
            double[] logL = new double[m];
            int[] n = new int[m];
            int[] k = new int[m];
            List<Set<String>> controls = new ArrayList<>();
            for (int j = 0; j < m; j++) {
                int slot = variants.slot(members.get(j));
                b[j] = r.estimate(slot);
                s[j] = r.stdError(slot);
                n[j] = r.nObs(slot);
                logL[j] = r.family(slot).leastSquares() ? GroupWeights.logLikelihood(r.rss(slot), n[j])
                        : -r.deviance(slot) / 2;
                k[j] = r.nParams(slot);
                space.decode(r.specIndex(slot), choices);
                controls.add(controlsOf(decisions, choices));
            }
            GroupWeights w = GroupWeights.ofLikelihoods(b, s, logL, n, k);
            int first = variants.slot(members.get(0));
            space.decode(r.specIndex(first), choices);
            String outcome = "";
            String predictor = "";
            String model = ModelFamily.OLS.spelling();
            Map<String, String> rows = new LinkedHashMap<>();
            for (int d = 0; d < decisions.size(); d++) {
                Decision dec = decisions.get(d);
                if (dec instanceof Decision.Outcome) {
                    outcome = dec.label(choices[d]);
                } else if (dec instanceof Decision.Predictor) {
                    predictor = dec.label(choices[d]);
                } else if (dec instanceof Decision.Model) {
                    model = dec.label(choices[d]);
                } else if (dec instanceof Decision.Sample || dec instanceof Decision.Absorb
                        || dec instanceof Decision.Weights) {
                    rows.put(dec.name(), dec.label(choices[d]));
                }
            }
            int best = 0;
            for (int j = 1; j < m; j++) {
                if (w.bicWeights()[j] > w.bicWeights()[best]) {
                    best = j;
                }
            }
            int[] slots = members.stream().mapToInt(variants::slot).toArray();
            groups.add(new Group(outcome, predictor, model, rows, n[0], members.stream().mapToInt(Integer::intValue).toArray(), w,
                    inclusion(controls, w.bicWeights()), r.specNumber(variants.slot(members.get(best))),
                    w.bicWeights()[best], LeamerBounds.of(r, slots, confidence)));
        }
        return groups;
    }

    /** Every control column a specification includes, required ones too. */
    static Set<String> controlsOf(List<Decision> decisions, long[] choices) {
        Set<String> in = new LinkedHashSet<>();
        for (int d = 0; d < decisions.size(); d++) {
            if (decisions.get(d) instanceof Decision.Controls c) {
                in.addAll(c.required());
                in.addAll(c.chosen(choices[d]));
            }
        }
        return in;
    }

    /**
     * Posterior inclusion probability of each control that some but not all members include, in order of
     * first appearance.
     */
    static Map<String, Double> inclusion(List<Set<String>> controls, double[] weights) {
        Set<String> union = new LinkedHashSet<>();
        controls.forEach(union::addAll);
        Map<String, Double> out = new LinkedHashMap<>();
        for (String c : union) {
            if (controls.stream().allMatch(set -> set.contains(c))) {
                continue;
            }
            double p = 0;
            for (int j = 0; j < weights.length; j++) {
                if (controls.get(j).contains(c)) {
                    p += weights[j];
                }
            }
            out.put(c, p);
        }
        return out;
    }

    /** The summary.json section {@code comparable_groups}. */
    public static Map<String, Object> toJson(List<Group> groups) {
        Map<String, Object> m = new LinkedHashMap<>();
        m.put("note", NOTE);
        List<Map<String, Object>> list = new ArrayList<>();
        for (Group g : groups) {
            Map<String, Object> e = new LinkedHashMap<>();
            e.put("outcome", g.outcome());
            e.put("predictor", g.predictor());
            e.put("model", g.model());
            e.put("rows", g.rows());
            e.put("n_obs", g.nObs());
            e.put("specifications", g.members().length);
            Map<String, Object> cdf = new LinkedHashMap<>();
            cdf.put("normal", Json.number(g.weights().cdfNormal()));
            cdf.put("non_normal", Json.number(g.weights().cdfNonNormal()));
            cdf.put("normal_unweighted", Json.number(g.weights().cdfNormalUnweighted()));
            cdf.put("non_normal_unweighted", Json.number(g.weights().cdfNonNormalUnweighted()));
            e.put("cdf_at_zero", cdf);
            Map<String, Object> bic = new LinkedHashMap<>();
            bic.put("weighted_estimate", Json.number(g.weights().bicEstimate()));
            bic.put("weighted_std_error", Json.number(g.weights().bicStdError()));
            bic.put("best_spec", g.bestSpec().json());
            bic.put("best_weight", Json.number(g.bestWeight()));
            Map<String, Object> inclusion = new LinkedHashMap<>();
            g.inclusion().forEach((c, p) -> inclusion.put(c, Json.number(p)));
            bic.put("inclusion", inclusion);
            e.put("bic", bic);
            e.put("interval_bounds", g.bounds() == null ? null : g.bounds().toJson());
            list.add(e);
        }
        m.put("groups", list);
        return m;
    }
}
