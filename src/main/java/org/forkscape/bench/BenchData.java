package org.forkscape.bench;

import java.io.BufferedWriter;
import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.SplittableRandom;

/**
 * Synthetic benchmark data with a fixed seed: an outcome, a key predictor correlated with fourteen
 * controls, a cluster identifier with 50 clusters and heteroskedastic noise. It measures speed only;
 * no result of the benchmark is a finding about anything.
 */
final class BenchData {
    static final int CONTROLS = 14;
    static final int CLUSTERS = 50;

    private BenchData() {
    }

    /** Writes {@code rows} rows to {@code file}: y, x, c1..c14, cluster (17 columns). */
    static void write(Path file, int rows, long seed) throws IOException {
        SplittableRandom random = new SplittableRandom(seed);
        try (BufferedWriter w = Files.newBufferedWriter(file, StandardCharsets.UTF_8)) {
            StringBuilder header = new StringBuilder("y,x");
            for (int j = 1; j <= CONTROLS; j++) {
                header.append(",c").append(j);
            }
            w.write(header.append(",cluster\n").toString());
            double[] c = new double[CONTROLS];
            StringBuilder line = new StringBuilder(256);
            for (int i = 0; i < rows; i++) {
                int cluster = random.nextInt(CLUSTERS);
                double clusterShock = Math.sin(cluster * 1.7) * 0.8;
                double x = gaussian(random) + 0.3 * clusterShock;
                double y = 0.25 * x + clusterShock;
                for (int j = 0; j < CONTROLS; j++) {
                    c[j] = 0.4 * x + gaussian(random);
                    y += (j % 3 == 0 ? 0.2 : -0.1) * c[j];
                }
                y += gaussian(random) * (1 + 0.5 * Math.abs(x));
                line.setLength(0);
                line.append(fmt(y)).append(',').append(fmt(x));
                for (double v : c) {
                    line.append(',').append(fmt(v));
                }
                line.append(",k").append(cluster).append('\n');
                w.write(line.toString());
            }
        }
    }

    private static String fmt(double v) {
        return String.format(java.util.Locale.ROOT, "%.6f", v);
    }

    private static double gaussian(SplittableRandom r) {
        // Box-Muller transform (Box & Muller 1958, Annals of Mathematical Statistics 29(2))
        double u = 1 - r.nextDouble();
        double v = r.nextDouble();
        return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * v);
    }

    /** A plan: y on x with every subset of the first {@code optional} controls, one error type. */
    static String plan(String dataFile, int optional, String errors) {
        StringBuilder controls = new StringBuilder();
        for (int j = 1; j <= optional; j++) {
            controls.append(j > 1 ? ", " : "").append("\"c").append(j).append('"');
        }
        return "{\"data\": \"" + dataFile + "\", \"decisions\": ["
                + "{\"name\": \"outcome\", \"kind\": \"outcome\", \"alternatives\": [{\"label\": \"y\", \"column\": \"y\"}]},"
                + "{\"name\": \"key\", \"kind\": \"predictor\", \"alternatives\": [{\"label\": \"x\", \"column\": \"x\"}]},"
                + "{\"name\": \"controls\", \"kind\": \"controls\", \"optional\": [" + controls + "]},"
                + "{\"name\": \"errors\", \"kind\": \"errors\", \"alternatives\": [\"" + errors + "\"]}]}";
    }
}
