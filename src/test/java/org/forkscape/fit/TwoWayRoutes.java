package org.forkscape.fit;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.forkscape.run.RunResult;

/**
 * The routes a run on parts (or on Spark's partitions) took beside two absorbed columns, for the two-way reference
 * plans ({@code school-panel-plan.json}, {@code school-panel-weighted-plan.json}: pupil and term absorbed,
 * HC0, HC1, pupil and pupil x term clusters); shared by {@link TwoWayEffectsByPartsTest} and the Spark runner's
 * {@code SparkTwoWayEffectsTest}.
 */
public final class TwoWayRoutes {
    private TwoWayRoutes() {
    }

    /**
     * HC0 and HC1 from the fourth moments and one-way cluster errors (and the one-column components of the
     * two-way) from the clusters' cells, both summed by the parts (or partitions) from their within values in the pass of the
     * sets' within cross-products, as one machine sums them from its demeaned rows; the pupil x term component,
     * one row per cluster, from the fourth moments.
     */
    public static void assertWithinPass(RunResult parts) {
        long crossed = 0;
        long fourth = 0;
        long cells = 0;
        long served = 0;
        for (int v = 0; v < parts.models().variantCount(); v++) {
            DataVariant variant = parts.models().variant(parts.models().variantKey(v));
            assertFalse(variant.holdsRows());
            if (variant.absorbsSeveral) {
                crossed++;
                assertTrue(variant.crossedWithin != null && variant.crossedSolves() > 0,
                        "demeaned by the parts' exact solve");
                fourth += variant.partsFourthMoments();
                cells += variant.partsClusterCells();
                served += variant.rowPassesServed() + variant.clusterScorePasses();
            }
        }
        assertTrue(crossed > 0, "variants beside pupil and term");
        assertTrue(fourth > 0, "fourth moments summed by the parts from their within values");
        assertTrue(cells > 0, "clusters' cells summed by the parts from their within values");
        // the pupil x term intersection, counted by the parts (cut by pupil), has one row per cluster: the two-way
        // error's component takes the fourth moments, as one machine's does
        assertEquals(0, served, "no robust error beside pupil and term from a pass over the rows of its own");
        assertTrue(parts.routes().getOrDefault(VarianceRoute.FOURTH_MOMENTS, 0L) > 0, "HC0 and HC1 from them");
        assertTrue(parts.routes().getOrDefault(VarianceRoute.CLUSTER_CELLS, 0L) > 0, "cluster errors from them");
        assertTrue(parts.refitByQr() > 0, "controls constant within pupils or terms sent to the QR refit");
    }

    /** With the routes without rows off: HC0 and HC1 and one-way clusters in the row passes' batches. */
    public static void assertRowPasses(RunResult parts) {
        long served = 0;
        long scorePasses = 0;
        long batched = 0;
        for (int v = 0; v < parts.models().variantCount(); v++) {
            DataVariant variant = parts.models().variant(parts.models().variantKey(v));
            if (variant.absorbsSeveral) {
                served += variant.rowPassesServed();
                scorePasses += variant.clusterScorePasses();
                batched += variant.clusterScoresBatched();
            }
        }
        assertTrue(served > 0, "HC0 and HC1 from row passes over the parts' within values");
        assertTrue(scorePasses > 0, "multi-way cluster errors from the clusters' scores over the parts' within values");
        assertTrue(batched > 0, "one-way cluster errors from the clusters' scores summed by the row passes' batches");
    }

}
