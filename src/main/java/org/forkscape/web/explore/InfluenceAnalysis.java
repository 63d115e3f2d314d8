package org.forkscape.web.explore;

/**
 * Computes the influence panel for the specifications a filter keeps. {@link DecisionInfluence} answers
 * with the inference package's analysis; the seam lets a benchmark or a test time or replace it.
 */
@FunctionalInterface
public interface InfluenceAnalysis {
    /** @param kept ranks of the specifications in the set, ascending */
    Influence of(RankedRun run, int[] kept);
}
