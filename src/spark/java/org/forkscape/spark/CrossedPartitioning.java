package org.forkscape.spark;

import java.util.List;
import java.util.Map;
import org.forkscape.InputException;
import org.forkscape.fit.CrossedEffectsByParts;
import org.forkscape.plan.Decision;
import org.forkscape.plan.Plan;

/**
 * The column the rows are partitioned on when the plan absorbs two columns: of each pair, the one with more
 * levels over the table (the first on a tie, as {@link org.forkscape.fit.VariantByParts} orders them), so that
 * each of its levels has every row in one partition and the other column's effects are solved on the driver
 * ({@link CrossedEffectsByParts}). Refused at the alternative's {@code columns} path, with both level counts and
 * the way out: a pair whose column with fewer levels has more than
 * {@link CrossedEffectsByParts#MAX_SECOND_LEVELS} (the driver's solve is cubic in them), and pairs that would
 * partition the rows on different columns (the rows have one partitioning).
 */
final class CrossedPartitioning {
    private CrossedPartitioning() {
    }

    /**
     * @param levels per grouping column present in the data, its distinct values or levels over the table
     * @return the column to partition on, or null when no alternative absorbs two columns
     */
    static String column(Plan plan, Map<String, Integer> levels) {
        String chosen = null;
        String chosenAt = null;
        List<Decision> ds = plan.decisions();
        for (int i = 0; i < ds.size(); i++) {
            if (!(ds.get(i) instanceof Decision.Absorb a)) {
                continue;
            }
            for (int j = 0; j < a.alternatives().size(); j++) {
                List<String> columns = a.alternatives().get(j).columns();
                if (columns.size() != 2 || !levels.containsKey(columns.get(0)) || !levels.containsKey(columns.get(1))) {
                    // three or more are refused by SparkRefusals; a column not in the data by the plan check
                    continue;
                }
                int first = levels.get(columns.get(0));
                int second = levels.get(columns.get(1));
                String larger = first >= second ? columns.get(0) : columns.get(1);
                String smaller = first >= second ? columns.get(1) : columns.get(0);
                String at = "decisions[" + i + "].alternatives[" + j + "].columns";
                int fewer = Math.min(first, second);
                if (fewer > CrossedEffectsByParts.MAX_SECOND_LEVELS) {
                    throw new InputException(at, String.format("\"%s\" has %,d levels and \"%s\" %,d; beside two "
                            + "absorbed columns the Spark runner solves for the effects of the one with fewer "
                            + "levels on the driver, at most %,d of them" + SparkRefusals.WAY_OUT, columns.get(0),
                            first, columns.get(1), second, CrossedEffectsByParts.MAX_SECOND_LEVELS));
                }
                if (chosen != null && !chosen.equals(larger)) {
                    throw new InputException(at, "the Spark runner partitions the rows by one column for every pair "
                            + "of absorbed columns, the pair's column with more levels; here that is \"" + larger
                            + "\" (\"" + smaller + "\" has fewer), but \"" + chosen + "\" at " + chosenAt
                            + SparkRefusals.WAY_OUT);
                }
                chosen = larger;
                chosenAt = at;
            }
        }
        return chosen;
    }
}
