package org.forkscape.run;

import org.forkscape.data.Table;
import org.forkscape.fit.SpecificationModels;
import org.forkscape.plan.Plan;

/**
 * A finished run: the plan and data it used, how specifications map to models, and the results.
 *
 * @param refitByQr number of specifications the precision guard refit from rows
 * @param seconds   wall time of the fitting
 */
public record RunResult(Plan plan, Table table, SpecificationModels models, ResultTable results, long refitByQr,
        double seconds) {
}
