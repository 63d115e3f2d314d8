package org.forkscape.bench;

import java.util.Arrays;
import java.util.List;

/** The median of repeated measurements (the mean of the middle two for an even count). */
final class Medians {
    private Medians() {
    }

    static double of(double[] values) {
        double[] s = values.clone();
        Arrays.sort(s);
        int n = s.length;
        return n % 2 == 1 ? s[n / 2] : (s[n / 2 - 1] + s[n / 2]) / 2;
    }

    static double of(List<Double> values) {
        return of(values.stream().mapToDouble(Double::doubleValue).toArray());
    }
}
