package org.forkscape.plan;

import java.util.HashSet;
import java.util.LinkedHashSet;
import java.util.List;
import java.util.Set;
import org.forkscape.InputException;
import org.forkscape.data.CategoricalColumn;
import org.forkscape.data.Column;
import org.forkscape.data.NumericColumn;
import org.forkscape.data.Table;

/**
 * Refuses, before anything is fitted, a plan in which every specification is bound to fail, for the
 * reasons one pass over a few columns decides: every cluster-robust error type clusters on a column with
 * fewer than two clusters (CR1's G/(G-1) needs two), or in the rows of every pair of outcome and key
 * predictor alternatives the key predictor takes a single value (its coefficient is not identified beside
 * the intercept) or the outcome does (there is nothing to explain). Such a run would
 * end with nothing fitted, which both doors refuse; saying so at the check lets the plan form show it at
 * its field and the batch command stop before fitting. A plan in which only some specifications are bound
 * to fail runs: those are reported as not fitted, each with its reason.
 */
final class BoundToFail {
    private BoundToFail() {
    }

    /**
     * @throws PlanException at the decision concerned
     * @param plan  a plan whose columns exist and have types their roles allow
     */
    static void refuse(Plan plan, Table table) {
        clusters(plan, table);
        keyPredictor(plan, table);
    }

    private static void clusters(Plan plan, Table table) {
        List<Decision> ds = plan.decisions();
        for (int i = 0; i < ds.size(); i++) {
            if (!(ds.get(i) instanceof Decision.Errors e)) {
                continue;
            }
            Set<String> columns = new LinkedHashSet<>();
            String single = null;
            for (ErrorType t : e.alternatives()) {
                // a multi-way type has one cluster when any of its columns has, as a one-way type on it has
                String lone = t.kind() != ErrorType.Kind.CLUSTER ? null : t.clusterColumns().stream()
                        .filter(c -> distinct(table.column(c), null) < 2).findFirst().orElse(null);
                if (lone == null) {
                    return;
                }
                columns.add(InputException.quoted(lone));
                single = lone;
            }
            String named = e.alternatives().size() == 1
                    ? "its errors cluster on " + columns.iterator().next() + ", which has "
                            + (distinct(table.column(single), null) == 0 ? "no value" : "a single value")
                            + " in the data"
                    : "every error type clusters on a column with at most one value in the data ("
                            + String.join(", ", columns) + ")";
            throw new PlanException("decisions[" + i + "]", "every specification is bound to fail: " + named
                    + ", and cluster-robust errors need at least two clusters; cluster on a column with several "
                    + "groups, or add an error type that does not cluster (such as HC1)");
        }
    }

    private static void keyPredictor(Plan plan, Table table) {
        List<VariableChoice> keys = plan.predictor().alternatives();
        List<VariableChoice> outcomes = plan.outcome().alternatives();
        for (VariableChoice key : keys) {
            Column x = table.column(key.column());
            for (VariableChoice outcome : outcomes) {
                Column y = table.column(outcome.column());
                if (distinct(x, y) >= 2 && distinct(y, x) >= 2) {
                    return;
                }
            }
        }
        boolean flatOutcomes = true;
        for (VariableChoice outcome : outcomes) {
            for (VariableChoice key : keys) {
                flatOutcomes &= distinct(table.column(outcome.column()), table.column(key.column())) < 2;
            }
        }
        if (flatOutcomes) {
            int i = plan.decisions().indexOf(plan.outcome());
            String named = outcomes.size() == 1 ? "the outcome " + InputException.quoted(outcomes.get(0).column())
                    + " takes" : "each outcome alternative takes";
            throw new PlanException("decisions[" + i + "].alternatives[0].column", "every specification is bound to "
                    + "fail: " + named + " at most one value in the rows that have a key predictor, so there is "
                    + "nothing to explain; choose an outcome that varies in the data");
        }
        int i = plan.decisions().indexOf(plan.predictor());
        String named = keys.size() == 1 ? "the key predictor " + InputException.quoted(keys.get(0).column())
                + " takes" : "each key predictor alternative takes";
        throw new PlanException("decisions[" + i + "].alternatives[0].column", "every specification is bound to "
                + "fail: " + named + " at most one value in the rows that have an outcome, so its effect cannot be "
                + "told from the intercept; choose a key predictor that varies in the data");
    }

    /**
     * Distinct non-missing values of {@code c} in the rows where {@code alsoPresent} (if given) is not
     * missing, counted up to two: all the rules need to know.
     */
    private static int distinct(Column c, Column alsoPresent) {
        Set<Double> seen = new HashSet<>();
        for (int r = 0; r < c.size() && seen.size() < 2; r++) {
            if (c.isMissing(r) || alsoPresent != null && alsoPresent.isMissing(r)) {
                continue;
            }
            seen.add(c instanceof NumericColumn n ? n.values()[r] : (double) ((CategoricalColumn) c).codes()[r]);
        }
        return seen.size();
    }
}
