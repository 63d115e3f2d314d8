package org.forkscape.bench;

import java.io.BufferedWriter;
import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import java.util.Locale;
import java.util.SplittableRandom;

/**
 * Invented benchmark data with a binary outcome and a fixed seed: whether a household signed up for a
 * kerbside food-waste collection ({@code signed_up}, 0 or 1) after doorstep outreach ({@code outreach},
 * minutes of conversation, standardized), with fourteen standardized household and street attributes as candidate
 * controls, each correlated with the outreach. The outcome follows a logistic model in all of them. It
 * measures speed only; no result of the benchmark is a finding about anything.
 */
final class GlmBenchData {
    static final String OUTCOME = "signed_up";
    static final String KEY = "outreach";
    static final List<String> CONTROLS = List.of("household_size", "garden_area", "bin_distance", "flat",
            "years_at_address", "age_of_oldest", "children", "cars", "street_density", "allotment_nearby",
            "kitchen_caddy", "prior_recycling", "home_office", "pets");

    /** Log-odds of signing up with everything at zero; about 40% sign up. */
    private static final double INTERCEPT = -0.4;
    private static final double KEY_EFFECT = 0.35;
    /** How strongly each attribute moves with the outreach (outreach teams chose streets). */
    private static final double CONFOUNDING = 0.3;

    private GlmBenchData() {
    }

    /** Writes {@code rows} rows to {@code file}: the outcome, the outreach, the 14 attributes. */
    static void write(Path file, int rows, long seed) throws IOException {
        SplittableRandom random = new SplittableRandom(seed);
        try (BufferedWriter w = Files.newBufferedWriter(file, StandardCharsets.UTF_8)) {
            w.write(OUTCOME + "," + KEY + "," + String.join(",", CONTROLS) + "\n");
            double[] c = new double[CONTROLS.size()];
            StringBuilder line = new StringBuilder(256);
            for (int i = 0; i < rows; i++) {
                double x = round(gaussian(random));
                double eta = INTERCEPT + KEY_EFFECT * x;
                for (int j = 0; j < c.length; j++) {
                    c[j] = round(CONFOUNDING * x + gaussian(random));
                    eta += (j % 3 == 0 ? 0.15 : -0.08) * c[j];
                }
                int y = random.nextDouble() < 1 / (1 + StrictMath.exp(-eta)) ? 1 : 0;
                line.setLength(0);
                line.append(y).append(',').append(fmt(x));
                for (double v : c) {
                    line.append(',').append(fmt(v));
                }
                w.write(line.append('\n').toString());
            }
        }
    }

    /** The value as written, so that the outcome is drawn from the numbers a reader of the file sees. */
    private static double round(double v) {
        return Double.parseDouble(fmt(v));
    }

    /**
     * Box-Muller transform (Box &amp; Muller 1958, Annals of Mathematical Statistics 29(2)), in StrictMath so
     * that the file is the same on every platform and Java release.
     */
    private static double gaussian(SplittableRandom r) {
        double u = 1 - r.nextDouble();
        double v = r.nextDouble();
        return StrictMath.sqrt(-2 * StrictMath.log(u)) * StrictMath.cos(2 * StrictMath.PI * v);
    }

    private static String fmt(double v) {
        return String.format(Locale.ROOT, "%.6f", v);
    }

    /** A plan: a logit of the outcome on the outreach with every subset of the first {@code optional} attributes. */
    static String plan(String dataFile, int optional, String errors) {
        StringBuilder controls = new StringBuilder();
        for (int j = 0; j < optional; j++) {
            controls.append(j > 0 ? ", " : "").append('"').append(CONTROLS.get(j)).append('"');
        }
        return "{\"data\": \"" + dataFile + "\", \"decisions\": ["
                + "{\"name\": \"outcome\", \"kind\": \"outcome\", \"alternatives\": [{\"label\": \"" + OUTCOME
                + "\", \"column\": \"" + OUTCOME + "\"}]},"
                + "{\"name\": \"key\", \"kind\": \"predictor\", \"alternatives\": [{\"label\": \"" + KEY
                + "\", \"column\": \"" + KEY + "\"}]},"
                + "{\"name\": \"controls\", \"kind\": \"controls\", \"optional\": [" + controls + "]},"
                + "{\"name\": \"model\", \"kind\": \"model\", \"alternatives\": [\"logit\"]},"
                + "{\"name\": \"errors\", \"kind\": \"errors\", \"alternatives\": [\"" + errors + "\"]}]}";
    }
}
