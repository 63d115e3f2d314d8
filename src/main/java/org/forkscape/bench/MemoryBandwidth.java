package org.forkscape.bench;

/**
 * A streaming-read bandwidth figure for this machine, in the manner of the STREAM benchmark's read
 * kernels (McCalpin 1995, "Memory bandwidth and machine balance in current high performance
 * computers", IEEE TCCA Newsletter): sum a 256 MiB array several times, best run counted.
 */
final class MemoryBandwidth {
    private MemoryBandwidth() {
    }

    /** Bytes per second read by a single thread, best of five passes. */
    static double readBytesPerSecond() {
        double[] a = new double[32 << 20];
        for (int i = 0; i < a.length; i++) {
            a[i] = i & 1023;
        }
        double best = 0;
        double sink = 0;
        for (int pass = 0; pass < 5; pass++) {
            long start = System.nanoTime();
            double s0 = 0;
            double s1 = 0;
            double s2 = 0;
            double s3 = 0;
            for (int i = 0; i + 3 < a.length; i += 4) {
                s0 += a[i];
                s1 += a[i + 1];
                s2 += a[i + 2];
                s3 += a[i + 3];
            }
            sink += s0 + s1 + s2 + s3;
            double seconds = (System.nanoTime() - start) / 1e9;
            best = Math.max(best, a.length * 8.0 / seconds);
        }
        if (sink == 42) {
            // keeps the sums alive so the loop is not removed
            System.out.print("");
        }
        return best;
    }
}
