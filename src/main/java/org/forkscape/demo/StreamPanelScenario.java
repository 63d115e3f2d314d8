package org.forkscape.demo;

import java.math.BigDecimal;
import java.math.RoundingMode;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;
import java.util.Random;

/**
 * The invented world of the panel demo: a programme that plants buffer strips of trees and grass along
 * the banks of streams in eight farmed catchments of a made-up region, and the nitrate measured at 160
 * monitoring sites over sixteen seasons (four years). Every number comes from one seeded {@link Random} and
 * from {@link StrictMath}, so the same seed gives the same panel everywhere.
 *
 * <p>What is planted, and why each piece is there:
 * <ul>
 *   <li>the true effect: each hectare of planted buffer upstream of a site lowers its nitrate by
 *       {@link #NITRATE_EFFECT_PER_HECTARE} mg/L;</li>
 *   <li>confounding that fixed effects remove: the programme enrolls the sites with the highest nitrate
 *       (a site's level, which site effects absorb), and nitrate falls everywhere over the four years as
 *       farming changes while the buffers grow (a common trend, which season effects absorb), so that
 *       the curve shows how much the choice of fixed effects matters;</li>
 *   <li>shocks shared by every site of a season (a wet spring washes nitrate out of every field) and by
 *       every season of a site, so that errors clustered by site, by season, or both differ;</li>
 *   <li>precision that differs by row: each site-season's nitrate is the mean of its grab samples (one to
 *       six), so its noise shrinks with the number of samples, which analytic weights by that number
 *       use;</li>
 *   <li>an unbalanced panel: some site-seasons were not sampled (no row), and a few flow readings and
 *       water temperatures are missing.</li>
 * </ul>
 */
public final class StreamPanelScenario {
    /** Change in nitrate (mg/L) per hectare of planted buffer upstream. */
    public static final double NITRATE_EFFECT_PER_HECTARE = -0.06;
    /** The seed of the panel's one random stream. */
    public static final long SEED = 11L;

    static final int SITES = 160;
    static final int CATCHMENTS = 8;
    static final int SEASONS = 16;
    private static final String[] SEASON_NAMES = {"winter", "spring", "summer", "autumn"};
    /** Share of site-seasons with no sample taken. */
    private static final double UNSAMPLED = 0.06;

    /** One site in one season, as the data file records it. NaN marks a missing cell. */
    record Reading(String site, String catchment, String season, String catchmentSeason, double bufferHectares,
            double bufferShare, double rainfall, double waterTemperature, double flow, double cropland, int samples,
            double nitrate) {
    }

    private StreamPanelScenario() {
    }

    /** The panel, site by site and season by season within a site. */
    static List<Reading> readings() {
        Random random = new Random(SEED);
        double[] catchmentFarming = new double[CATCHMENTS];
        for (int c = 0; c < CATCHMENTS; c++) {
            catchmentFarming[c] = random.nextDouble();
        }
        double[] seasonRain = new double[SEASONS];
        double[] seasonShock = new double[SEASONS];
        double[] seasonTemperature = new double[SEASONS];
        for (int t = 0; t < SEASONS; t++) {
            double phase = 2 * StrictMath.PI * t / 4;
            seasonRain[t] = 220 + 60 * StrictMath.cos(phase) + 40 * random.nextGaussian();
            // a common downward trend as farming changes, plus the season's own shock
            seasonShock[t] = -0.05 * t + 0.3 * random.nextGaussian();
            seasonTemperature[t] = 11 - 6 * StrictMath.cos(phase - StrictMath.PI / 6) + 0.8 * random.nextGaussian();
        }
        double[][] catchmentSeasonShock = new double[CATCHMENTS][SEASONS];
        for (int c = 0; c < CATCHMENTS; c++) {
            for (int t = 0; t < SEASONS; t++) {
                catchmentSeasonShock[c][t] = 0.15 * random.nextGaussian();
            }
        }
        List<Reading> out = new ArrayList<>();
        for (int s = 0; s < SITES; s++) {
            int catchment = s % CATCHMENTS;
            double farming = catchmentFarming[catchment];
            double baseline = 2.2 + 1.6 * farming + 0.7 * random.nextGaussian();
            double cropland0 = clamp(0.25 + 0.45 * farming + 0.08 * random.nextGaussian(), 0.03, 0.95);
            double strip = 4 + 6 * random.nextDouble();
            // the programme enrolls the sites with the most nitrate
            boolean enrolled = random.nextDouble() < 1 / (1 + StrictMath.exp(-1.6 * (baseline - 3.2)));
            int start = 2 + random.nextInt(10);
            double perSeason = strip * (0.05 + 0.10 * random.nextDouble());
            double siteWetness = 0.15 * random.nextGaussian();
            String site = String.format(Locale.ROOT, "R%03d", s + 1);
            String catchmentName = "C" + (catchment + 1);
            for (int t = 0; t < SEASONS; t++) {
                double buffer = enrolled && t >= start ? StrictMath.min(strip, perSeason * (t - start + 1)) : 0;
                buffer = round(buffer, 1);
                double cropland = clamp(cropland0 - 0.004 * t + 0.02 * random.nextGaussian(), 0.01, 0.97);
                double rainfall = StrictMath.max(20, seasonRain[t] * (1 + siteWetness + 0.12 * random.nextGaussian()));
                double flow = StrictMath.max(0.05, 0.006 * rainfall + 0.3 * random.nextGaussian());
                double temperature = seasonTemperature[t] + 0.7 * random.nextGaussian();
                int samples = 1 + random.nextInt(6);
                double noise = 0.6 / StrictMath.sqrt(samples) * random.nextGaussian();
                double nitrate = baseline + seasonShock[t] + catchmentSeasonShock[catchment][t]
                        + 0.004 * (rainfall - 220) + 2.0 * (cropland - cropland0) - 0.02 * (temperature - 11)
                        + NITRATE_EFFECT_PER_HECTARE * buffer + noise;
                boolean sampled = random.nextDouble() >= UNSAMPLED;
                boolean flowMissing = random.nextDouble() < 0.05;
                boolean temperatureMissing = random.nextDouble() < 0.02;
                if (!sampled) {
                    continue;
                }
                String season = "Y" + (t / 4 + 1) + " " + SEASON_NAMES[t % 4];
                out.add(new Reading(site, catchmentName, season, catchmentName + " " + season, buffer,
                        round(100 * buffer / strip, 1), round(rainfall, 0), temperatureMissing ? Double.NaN
                                : round(temperature, 1), flowMissing ? Double.NaN : round(flow, 2),
                        round(cropland, 3), samples, round(StrictMath.max(0.05, nitrate), 2)));
            }
        }
        return out;
    }

    private static double clamp(double v, double low, double high) {
        return StrictMath.min(high, StrictMath.max(low, v));
    }

    private static double round(double v, int decimals) {
        // from the exact binary value, not from Double.toString, whose digits changed between Java releases
        return new BigDecimal(v).setScale(decimals, RoundingMode.HALF_EVEN).doubleValue();
    }
}
