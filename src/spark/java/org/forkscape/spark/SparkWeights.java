package org.forkscape.spark;

import static org.apache.spark.sql.functions.col;
import static org.apache.spark.sql.functions.lit;

import java.util.List;
import java.util.Set;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.forkscape.plan.Decision;
import org.forkscape.plan.Plan;
import org.forkscape.plan.PlanException;
import org.forkscape.plan.WeightChoice;

/**
 * The check of the analytic weights' values that the plan checker makes on one machine, where the rows are
 * in the driver: every present weight finite and not negative (a negative or infinite weight has no meaning
 * in weighted least squares; R's {@code lm.wfit} refuses negative weights too). On Spark the rows stay on
 * the executors, so the bad rows of each weight column are counted there (one Spark job per column) and the
 * plan is refused at the alternative's {@code column} before any variant is built. Zero is allowed (the row
 * takes no part) and a missing weight drops its row, as on one machine ({@code fit.AnalyticWeights}).
 */
final class SparkWeights {
    private SparkWeights() {
    }

    /**
     * @param rows        the plan's columns over every row
     * @param categorical the names of the columns read as categorical (the plan checker refuses them as
     *                    weights, with its own message)
     */
    static void check(Plan plan, Dataset<Row> rows, Set<String> categorical, String source) {
        List<Decision> ds = plan.decisions();
        for (int i = 0; i < ds.size(); i++) {
            if (!(ds.get(i) instanceof Decision.Weights w)) {
                continue;
            }
            for (int j = 0; j < w.alternatives().size(); j++) {
                WeightChoice choice = w.alternatives().get(j);
                if (!choice.weighted() || categorical.contains(choice.column())
                        || !List.of(rows.columns()).contains(choice.column())) {
                    continue;
                }
                org.apache.spark.sql.Column c = col("`" + choice.column() + "`").cast("double");
                long bad = rows.where(c.lt(lit(0)).or(c.equalTo(lit(Double.POSITIVE_INFINITY)))).count();
                if (bad > 0) {
                    throw new PlanException("decisions[" + i + "].alternatives[" + j + "].column", "the weights in \""
                            + choice.column() + "\" must be finite and not negative; " + String.format("%,d", bad)
                            + " row" + (bad == 1 ? " of " + source + " is" : "s of " + source + " are") + " not; fix "
                            + (bad == 1 ? "it" : "them") + ", or leave the cell empty to drop the row");
                }
            }
        }
    }
}
