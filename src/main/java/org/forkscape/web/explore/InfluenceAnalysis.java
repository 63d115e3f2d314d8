package org.forkscape.web.explore;

/**
 * Computes the influence panel for the specifications a filter keeps. The explorer's own
 * {@link LevelInfluence} answers in one pass per factor; an implementation backed by the inference
 * package can take its place as a Spring bean of this type.
 */
@FunctionalInterface
public interface InfluenceAnalysis {
    /** @param kept ranks of the specifications in the set, ascending */
    Influence of(RankedRun run, int[] kept);
}
