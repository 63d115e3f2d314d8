package org.forkscape.web.explore;

import java.util.ArrayList;
import java.util.List;
import org.forkscape.InputException;
import org.forkscape.plan.Decision;
import org.forkscape.plan.Factor;
import org.forkscape.plan.Plan;
import org.forkscape.run.Scale;
import org.forkscape.run.UnitGroups;

/**
 * The set of specifications one view of the curve shows, by the explorer's rules on scales: on a scale
 * with units (as fitted, the average marginal effect) only one comparable group, the one asked for or the
 * first with a fitted specification, applied on top of the user's filter; on a unit-free scale every group.
 * The explorer's API and the print figure both take their set from here, so that they show the same.
 *
 * @param filter    the user's filter alone (the levels unticked), for captions and links
 * @param selection the filter with the group's outcome, key-predictor and model levels fixed
 * @param group     the comparable group shown, -1 on a unit-free scale
 * @param unit      one unit of the scale, in words (the vertical axis)
 * @param sort      {@code estimate} or {@code factor:F}
 * @param kept      the ranks that stay, ascending
 * @param order     the kept ranks in display order
 */
public record ShownSet(Scale scale, int group, String unit, Selection filter, Selection selection, String sort,
        int[] kept, DisplayOrder order) {

    /** The set a request's {@code drop}, {@code sort} and {@code group} show on the ranking's scale. */
    public static ShownSet of(RankedRun r, String drop, String sort, String group) {
        Selection filter = Selection.parse(r.factors(), drop);
        String order = sortText(sort);
        int g = groupOf(r, group);
        Selection selection = filter;
        Plan plan = r.run().plan();
        if (g >= 0) {
            UnitGroups.Group chosen = r.units().groups().get(g);
            selection = selection.only(factorOfDecision(r, plan.outcome()), chosen.outcomeChoice())
                    .only(factorOfDecision(r, plan.predictor()), chosen.predictorChoice());
            if (chosen.modelChoice() >= 0) {
                selection = selection.only(factorOfDecision(r, plan.all(Decision.Model.class).get(0)),
                        chosen.modelChoice());
            }
        }
        int[] kept = SpecificationFilter.keep(r, selection);
        DisplayOrder display = order.equals("estimate") ? DisplayOrder.byEstimate(kept)
                : DisplayOrder.groupedBy(r, kept, factorOf(r, order));
        String unit = r.units().unit(r.scale(), g < 0 ? null : r.units().groups().get(g));
        return new ShownSet(r.scale(), g, unit, filter, selection, order, kept, display);
    }

    /** The scale a request names; blank is as fitted. */
    public static Scale scaleOf(String word) {
        if (word == null || word.isBlank()) {
            return Scale.AS_FITTED;
        }
        Scale s = Scale.named(word);
        if (s == null) {
            throw new InputException("scale", "\"" + word.strip() + "\" is not a scale; use fitted, effect, "
                    + "standardized, partial or t");
        }
        return s;
    }

    /** Whether the curve is grouped by a factor rather than ordered by estimate alone. */
    public boolean grouped() {
        return !sort.equals("estimate");
    }

    /** The comparable group shown, {@code null} on a unit-free scale. */
    public UnitGroups.Group groupShown(RankedRun r) {
        return group < 0 ? null : r.units().groups().get(group);
    }

    /** The user's filter in words: each decision with the alternatives it keeps, only those restricted. */
    public List<String> filterWords(RankedRun r) {
        List<String> words = new ArrayList<>();
        for (Factor f : r.factors()) {
            if (!filter.restricts(f.id())) {
                continue;
            }
            List<String> kept = new ArrayList<>();
            for (int l = 0; l < f.levels().size(); l++) {
                if (filter.allowed(f.id(), l)) {
                    kept.add(f.isControl() ? f.describe(l) : f.levels().get(l));
                }
            }
            words.add(f.name() + ": " + (kept.isEmpty() ? "none" : String.join(", ", kept)));
        }
        return words;
    }

    /** The order in words. */
    public String orderWords(RankedRun r) {
        return grouped() ? "grouped by " + r.factors().get(factorOf(r, sort)).name() + ", then by estimate"
                : "by estimate";
    }

    static String sortText(String sort) {
        return sort == null || sort.isBlank() ? "estimate" : sort.strip();
    }

    private static int factorOf(RankedRun r, String sort) {
        String prefix = "factor:";
        if (sort.startsWith(prefix)) {
            try {
                int f = Integer.parseInt(sort.substring(prefix.length()));
                if (f >= 0 && f < r.factors().size()) {
                    return f;
                }
            } catch (NumberFormatException e) {
                // reported below with the accepted forms
            }
        }
        throw new InputException("sort", "\"" + sort + "\" is not an order of this run; use estimate or factor:F "
                + "with F from 0 to " + (r.factors().size() - 1));
    }

    /**
     * On a scale with units, the comparable group shown: the one asked for, or the first with a fitted
     * specification; on a unit-free scale, none (every group shares the scale).
     */
    private static int groupOf(RankedRun r, String group) {
        if (r.scale().unitFree()) {
            return -1;
        }
        UnitGroups units = r.units();
        if (group == null || group.isBlank()) {
            return units.firstFitted();
        }
        int count = units.groups().size();
        try {
            int g = Integer.parseInt(group.strip());
            if (g >= 0 && g < count) {
                return g;
            }
        } catch (NumberFormatException e) {
            // answered below with the accepted range
        }
        throw new InputException("group", "\"" + group.strip() + "\" is not a comparable group of this run on the "
                + r.scale().title() + " scale; use a number from 0 to " + (count - 1) + " (see the groups of the "
                + "layout's scales)");
    }

    /** The factor of a decision that is one factor (the outcome's, the key predictor's). */
    static int factorOfDecision(RankedRun r, Decision decision) {
        return r.factors().stream().filter(f -> !f.isControl() && f.decision().equals(decision.name()))
                .mapToInt(Factor::id).findFirst().orElseThrow();
    }
}
