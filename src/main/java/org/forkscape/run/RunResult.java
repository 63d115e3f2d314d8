package org.forkscape.run;

import org.forkscape.data.Table;
import java.util.Map;
import org.forkscape.fit.SpecificationModels;
import org.forkscape.fit.VarianceRoute;
import org.forkscape.plan.Plan;

/**
 * A finished run: the plan and data it used, how specifications map to models, and the results.
 *
 * @param refitByQr number of specifications the precision guard refit from rows
 * @param routes    number of specifications whose standard error each route computed (empty when the run
 *                  was read back from its files, which do not record it)
 * @param seconds   wall time of the fitting
 */
public record RunResult(Plan plan, Table table, SpecificationModels models, ResultTable results, long refitByQr,
        Map<VarianceRoute, Long> routes, double seconds) {
}
