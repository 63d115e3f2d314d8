package org.forkscape.fit;

/**
 * The key coefficient of one specification refitted in one null draw.
 *
 * @param estimate the key coefficient in the draw's data
 * @param stdError its standard error of the specification's own type
 * @param df       degrees of freedom of its t reference (N - K, or G - 1 for clusters)
 */
public record DrawFit(double estimate, double stdError, double df) {
}
