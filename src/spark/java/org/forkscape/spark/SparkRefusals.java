package org.forkscape.spark;

import java.util.List;
import org.forkscape.InputException;
import org.forkscape.fit.ClusterComponents;
import org.forkscape.fit.DataVariant;
import org.forkscape.infer.NullDrawSettings;
import org.forkscape.infer.NullMethod;
import org.forkscape.plan.Decision;
import org.forkscape.plan.ErrorType;
import org.forkscape.plan.ModelFamily;
import org.forkscape.plan.Plan;

/**
 * The plan features the Spark runner does not compute, refused before any work at their JSON path, each
 * with the way out (README, "Beyond one machine", lists them): three or more absorbed columns (their within
 * transformation iterates over the rows); beside two absorbed columns, generalized linear models, and with
 * null draws cluster errors whose clusterings a draw cannot sum ({@link #drawClusterings}, once the variant is
 * built); beside null draws, the permutation. Two absorbed columns are least squares'
 * exact solve by parts ({@link CrossedPartitioning}).
 */
final class SparkRefusals {
    static final String WAY_OUT = "; run this plan on one machine (forkscape.jar run), or leave that choice out";

    private SparkRefusals() {
    }

    static void check(Plan plan) {
        List<Decision> ds = plan.decisions();
        if (plan.nullDraws() > 0) {
            nullDraws(plan);
        }
        String pair = null;
        for (int i = 0; i < ds.size(); i++) {
            Decision d = ds.get(i);
            if (d instanceof Decision.Absorb a) {
                for (int j = 0; j < a.alternatives().size(); j++) {
                    int columns = a.alternatives().get(j).columns().size();
                    String at = "decisions[" + i + "].alternatives[" + j + "].columns";
                    if (columns > 2) {
                        throw new InputException(at, "three or more absorbed columns are demeaned by alternating "
                                + "projections, iterations over the rows, which the Spark runner does not make"
                                + WAY_OUT);
                    }
                    if (columns == 2 && pair == null) {
                        pair = at;
                    }
                }
            }
        }
        if (pair != null) {
            besideTwoColumns(plan, pair);
        }
    }

    /**
     * Beside two absorbed columns (the alternative at {@code pair}) the Spark runner fits least squares:
     * generalized linear models are refused.
     */
    private static void besideTwoColumns(Plan plan, String pair) {
        List<Decision> ds = plan.decisions();
        for (int i = 0; i < ds.size(); i++) {
            if (ds.get(i) instanceof Decision.Model m) {
                for (int j = 0; j < m.alternatives().size(); j++) {
                    ModelFamily f = m.alternatives().get(j);
                    if (!f.leastSquares()) {
                        throw new InputException("decisions[" + i + "].alternatives[" + j + "]", f.spelling()
                                + " beside two absorbed columns (" + pair + ") is not fitted on Spark (only least "
                                + "squares is demeaned exactly by parts)" + WAY_OUT);
                    }
                }
            }
        }
    }

    /**
     * Beside two absorbed columns with null draws, once the variant {@code v} is built (before its fits): a draw's
     * cluster errors come from the clusters' cells or the fourth moments its sets' second pass sums, never from
     * the clusters' scores over the draw's rows, so each clustering of a cluster error type (its column, or each
     * component of a multi-way one) must be one a draw can sum ({@link DataVariant#drawClustersProblem}); refused
     * at the error type's JSON path otherwise.
     */
    static void drawClusterings(Plan plan, DataVariant v) {
        if (plan.nullDraws() == 0 || !v.crossedInParts()) {
            return;
        }
        String resampled = NullDrawSettings.of(plan).clusterColumn();
        List<Decision> ds = plan.decisions();
        for (int i = 0; i < ds.size(); i++) {
            if (!(ds.get(i) instanceof Decision.Errors e)) {
                continue;
            }
            for (int j = 0; j < e.alternatives().size(); j++) {
                ErrorType type = e.alternatives().get(j);
                if (type.kind() != ErrorType.Kind.CLUSTER) {
                    continue;
                }
                for (ClusterComponents.Component c : ClusterComponents.of(type)) {
                    String problem = v.drawClustersProblem(c.key(), c.columns(), resampled);
                    if (problem != null) {
                        throw new InputException("decisions[" + i + "].alternatives[" + j + "]", type.label()
                                + " beside two absorbed columns is not computed in Spark's null draws: " + problem
                                + WAY_OUT + " (or the null draws)");
                    }
                }
            }
        }
    }

    /**
     * Null draws on Spark are Poisson bootstrap draws ({@link org.forkscape.fit.BootstrapByParts}). Refused:
     * the permutation, since a uniformly random permutation of each variant's rows needs them in one place.
     */
    private static void nullDraws(Plan plan) {
        if (NullDrawSettings.of(plan).method() == NullMethod.PERMUTE) {
            throw new InputException("nullMethod", "permutation draws are not made on Spark (a random permutation "
                    + "of each variant's rows needs them all in one place); use the bootstrap (\"nullMethod\": "
                    + "\"bootstrap\", --null-method bootstrap), or run this plan on one machine (forkscape.jar run)");
        }
    }
}
