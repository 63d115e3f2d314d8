package org.forkscape.web.explore;

/**
 * What the browser draws for a set of specifications in display order: every specification when there
 * are few enough to draw one by one, otherwise one bin per pixel column of the plot.
 *
 * @param mode   {@code points} or {@code bins}
 * @param count  specifications in the set
 * @param points the specifications, when {@code mode} is {@code points}, else {@code null}
 * @param bins   the bins, when {@code mode} is {@code bins}, else {@code null}
 */
public record Curve(String mode, int count, Points points, Bins bins) {

    /**
     * Position i of each array is position i of the curve.
     *
     * @param spec         the specification number (1-based, as in specifications.csv)
     * @param significance +1 significant positive, -1 significant negative, 0 not significant
     * @param levels       per factor, the level at each position
     */
    public record Points(long[] spec, double[] estimate, double[] low, double[] high, int[] significance,
            int[][] levels) {
    }

    /**
     * Bin b covers curve positions {@code [from[b], to[b])}.
     *
     * @param min     lowest estimate in the bin
     * @param median  median estimate in the bin
     * @param max     highest estimate in the bin
     * @param low     lowest lower interval bound in the bin (the interval envelope)
     * @param high    highest upper interval bound in the bin
     * @param significantPositive specifications significant and positive in the bin
     * @param significantNegative specifications significant and negative in the bin
     * @param share   per grid row (as in {@link RankedRun#gridRows()}), the share of the bin's
     *                specifications that use that alternative or control
     */
    public record Bins(int[] from, int[] to, double[] min, double[] median, double[] max, double[] low, double[] high,
            int[] significantPositive, int[] significantNegative, double[][] share) {
    }
}
