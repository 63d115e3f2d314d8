package org.forkscape.spark;

import java.util.List;
import org.forkscape.InputException;
import org.forkscape.infer.NullDrawSettings;
import org.forkscape.infer.NullMethod;
import org.forkscape.plan.Decision;
import org.forkscape.plan.Plan;

/**
 * The plan features the Spark runner does not compute, refused before any work at their JSON path, each
 * with the way out (README, "Beyond one machine", lists them): two or more absorbed columns (their within
 * transformation iterates over the rows); beside null draws, the permutation.
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
        for (int i = 0; i < ds.size(); i++) {
            Decision d = ds.get(i);
            if (d instanceof Decision.Absorb a) {
                for (int j = 0; j < a.alternatives().size(); j++) {
                    if (a.alternatives().get(j).columns().size() > 1) {
                        throw new InputException("decisions[" + i + "].alternatives[" + j + "].columns",
                                "two absorbed columns are demeaned by alternating projections, iterations over the "
                                        + "rows, which the Spark runner does not make" + WAY_OUT);
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
