package org.forkscape.fit;

/**
 * Shifts each model column of a variant by its level's mean over the non-missing rows (the overall mean
 * without fixed effects), so that every cross-product is formed around the column's centre, and sets missing
 * cells to 0 (their rows are excluded by the missing patterns).
 */
final class LevelShifts {
    /** Per level and column: the shift. */
    final double[][] levelShift;
    /** The shifted columns: the arrays given, shifted in place. */
    final double[][] shifted;
    /**
     * Per level and column: the number of non-missing values the shift is the mean of (null when the
     * shifts were given), so that the shifts of parts of the rows can be merged.
     */
    final int[][] nonMissing;

    /**
     * @param raw    the model columns over the variant's rows, NaN where missing; shifted in place
     * @param levels the rows' fixed-effect levels
     * @param whole  when it gives the level shifts (the means over every part of the rows), those are used
     */
    LevelShifts(double[][] raw, FixedEffectLevels levels, WholeRows whole) {
        if (whole.hasLevelShift()) {
            levelShift = whole.levelShift();
            shifted = raw;
            nonMissing = null;
            int[] level = levels.level;
            for (int j = 0; j < raw.length; j++) {
                double[] x = raw[j];
                for (int i = 0; i < x.length; i++) {
                    double v = x[i];
                    x[i] = v != v ? 0 : v - levelShift[level[i]][j];
                }
            }
            return;
        }
        int columns = raw.length;
        int rows = levels.level.length;
        int levelCount = levels.levels;
        int[] level = levels.level;
        levelShift = new double[levelCount][columns];
        shifted = new double[columns][];
        nonMissing = new int[levelCount][columns];
        double[] levelSum = new double[levelCount];
        int[] levelN = new int[levelCount];
        for (int j = 0; j < columns; j++) {
            double[] x = raw[j];
            java.util.Arrays.fill(levelSum, 0);
            java.util.Arrays.fill(levelN, 0);
            if (levelCount == 1) {
                double sum = 0;
                int count = 0;
                for (int i = 0; i < rows; i++) {
                    double v = x[i];
                    if (v == v) {
                        sum += v;
                        count++;
                    }
                }
                levelSum[0] = sum;
                levelN[0] = count;
            } else {
                for (int i = 0; i < rows; i++) {
                    double v = x[i];
                    if (v == v) {
                        levelSum[level[i]] += v;
                        levelN[level[i]]++;
                    }
                }
            }
            for (int l = 0; l < levelCount; l++) {
                levelShift[l][j] = levelN[l] == 0 ? 0 : levelSum[l] / levelN[l];
                nonMissing[l][j] = levelN[l];
            }
            correct(x, j, level, levelN);
            // the raw column is not needed after this: shift it in place
            double shift0 = levelShift[0][j];
            for (int i = 0; i < rows; i++) {
                double v = x[i];
                x[i] = v != v ? 0 : v - (levelCount == 1 ? shift0 : levelShift[level[i]][j]);
            }
            shifted[j] = x;
        }
    }

    /**
     * Adds to each level's shift of column {@code j} the mean of the values minus the shift: the
     * corrected two-pass mean (Chan, Golub &amp; LeVeque 1983, "Algorithms for computing the sample
     * variance: analysis and recommendations", The American Statistician 37(3)). A one-pass mean of
     * values far from zero can miss by more than their spread (the sum's rounding grows with the offset
     * and the row count); every cross-product is then formed around a shift that is off, and the
     * offsets that undo it cancel. Corrected, the shift is within a few units of roundoff of the mean.
     */
    private void correct(double[] x, int j, int[] level, int[] levelN) {
        int levels = levelShift.length;
        double[] residualSum = new double[levels];
        for (int i = 0; i < level.length; i++) {
            double v = x[i];
            if (v == v) {
                int l = levels == 1 ? 0 : level[i];
                residualSum[l] += v - levelShift[l][j];
            }
        }
        for (int l = 0; l < levels; l++) {
            if (levelN[l] > 0) {
                levelShift[l][j] += residualSum[l] / levelN[l];
            }
        }
    }
}
