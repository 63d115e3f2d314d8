package org.forkscape.fit;

import java.util.SplittableRandom;
import org.apache.commons.math3.linear.Array2DRowRealMatrix;
import org.apache.commons.math3.linear.RealMatrix;

/**
 * An invented unbalanced two-way design for the tests of the crossed fixed effects: each row's unit and period,
 * over {@code groups} blocks of units and periods that share no levels, with one unit per block seen once.
 */
record TwoWayDesign(int[] unit, int units, int[] period, int periods) {
    /** A thinly connected chain of {@code units} units: each unit seen in its own period and the next one's. */
    static TwoWayDesign chain(int units) {
        int[] unit = new int[2 * units];
        int[] period = new int[2 * units];
        for (int u = 0; u < units; u++) {
            unit[2 * u] = u;
            period[2 * u] = u;
            unit[2 * u + 1] = u;
            period[2 * u + 1] = u + 1;
        }
        return new TwoWayDesign(unit, units, period, units + 1);
    }

    static TwoWayDesign of(long seed, int groups, int unitsPerGroup, int periodsPerGroup, double observed) {
        SplittableRandom random = new SplittableRandom(seed);
        int n = 0;
        int[] unit = new int[groups * unitsPerGroup * periodsPerGroup + groups];
        int[] period = new int[unit.length];
        for (int g = 0; g < groups; g++) {
            for (int u = 0; u < unitsPerGroup; u++) {
                for (int t = 0; t < periodsPerGroup; t++) {
                    if (random.nextDouble() < observed) {
                        unit[n] = g * unitsPerGroup + u;
                        period[n] = g * periodsPerGroup + t;
                        n++;
                    }
                }
            }
        }
        // one unit seen once per group: singletons
        int units = groups * unitsPerGroup;
        for (int g = 0; g < groups; g++) {
            unit[n] = units++;
            period[n] = g * periodsPerGroup;
            n++;
        }
        return new TwoWayDesign(java.util.Arrays.copyOf(unit, n), units, java.util.Arrays.copyOf(period, n),
                groups * periodsPerGroup);
    }

    int n() {
        return unit.length;
    }

    RealMatrix dummies() {
        RealMatrix d = new Array2DRowRealMatrix(n(), units + periods);
        for (int i = 0; i < n(); i++) {
            d.setEntry(i, unit[i], 1);
            d.setEntry(i, units + period[i], 1);
        }
        return d;
    }
}
