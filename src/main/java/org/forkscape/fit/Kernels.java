package org.forkscape.fit;

/**
 * The few hot loops of the cross-product sums, written with independent accumulators so that the
 * additions pipeline instead of waiting on each other (the JIT does not reorder floating-point sums).
 * Their fixed order keeps every result reproducible.
 */
final class Kernels {
    private Kernels() {
    }

    static double dot(double[] x, double[] y, int n) {
        double s0 = 0;
        double s1 = 0;
        double s2 = 0;
        double s3 = 0;
        int r = 0;
        for (; r + 3 < n; r += 4) {
            s0 += x[r] * y[r];
            s1 += x[r + 1] * y[r + 1];
            s2 += x[r + 2] * y[r + 2];
            s3 += x[r + 3] * y[r + 3];
        }
        for (; r < n; r++) {
            s0 += x[r] * y[r];
        }
        return (s0 + s1) + (s2 + s3);
    }

    static double sum(double[] x, int n) {
        double s0 = 0;
        double s1 = 0;
        int r = 0;
        for (; r + 1 < n; r += 2) {
            s0 += x[r];
            s1 += x[r + 1];
        }
        if (r < n) {
            s0 += x[r];
        }
        return s0 + s1;
    }
}
