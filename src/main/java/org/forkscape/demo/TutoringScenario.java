package org.forkscape.demo;

import java.math.BigDecimal;
import java.math.RoundingMode;
import java.util.ArrayList;
import java.util.HashSet;
import java.util.List;
import java.util.Locale;
import java.util.Random;
import java.util.Set;

/**
 * The invented world of the demo: an after-school reading-tutoring programme in the 48 primary schools
 * of a made-up city, and each pupil's spring reading results. Every number comes from one seeded
 * {@link Random}, whose algorithms the Java specification fixes, and from {@link StrictMath}, whose
 * results are the same on every platform, so the same seed gives the same pupils everywhere.
 *
 * <p>What is planted, and why each piece is there:
 * <ul>
 *   <li>the true effect: each hour of tutoring adds {@link #SCORE_EFFECT_PER_HOUR} points to the reading
 *       score and {@link #LOG_FLUENCY_EFFECT_PER_HOUR} to the logarithm of reading fluency (zero in the
 *       null world);</li>
 *   <li>confounders: places go to pupils with low autumn scores, to pupils on free school meals, in the
 *       schools of the poorer zones that run more sessions, and to pupils of engaged families, who also
 *       read more at home, which raises scores by itself;</li>
 *   <li>clusters: a school effect and a test-day shock shared by each school's pupils, so that
 *       cluster-robust errors differ from the others;</li>
 *   <li>missing cells: a few autumn scores (pupils who arrived later), a few attendance records, and
 *       more of the parent survey (home reading minutes, answered less often by families on free
 *       meals);</li>
 *   <li>outliers: a handful of register entries with a digit too many, far above the programme's cap
 *       of 60 hours, with results that follow the hours actually attended;</li>
 *   <li>zeros: most pupils had no tutoring, so the logarithm of the hours does not exist, while reading
 *       fluency (words per minute) is always positive.</li>
 * </ul>
 */
public final class TutoringScenario {
    /** Reading-score points per hour of tutoring in the world with an effect. */
    public static final double SCORE_EFFECT_PER_HOUR = 0.06;
    /** Change in log words per minute per hour of tutoring in the world with an effect. */
    public static final double LOG_FLUENCY_EFFECT_PER_HOUR = 0.0006;
    /**
     * The first seed in 1, 2, 3, ... for which the null world's fullest specification (every control,
     * rows within the 60-hour cap, classical errors) estimates the hours coefficient within half a standard
     * error of zero for both outcomes, so that the null demo shows the typical picture of no effect
     * rather than a chance false positive. The demo's test checks this property.
     */
    public static final long SEED = 3L;

    static final String[] ZONES = {"central", "east", "north", "river", "south", "west"};
    /** Share of pupils on free school meals in each zone. */
    private static final double[] ZONE_DEPRIVATION = {0.22, 0.45, 0.15, 0.38, 0.30, 0.10};
    static final int SCHOOLS = 48;
    private static final int REGISTER_ERRORS = 6;

    /** One pupil: what the data file records, with the outcomes of both worlds. NaN marks a missing cell. */
    record Pupil(int id, String school, String zone, String yearGroup, int freeMeals, int englishAdditional,
            double priorScore, double attendance, double homeReading, int classSize, double tutoringHours,
            double readingScore, double readingFluency, double nullReadingScore, double nullReadingFluency) {
    }

    private TutoringScenario() {
    }

    /** The pupils of the demo, in school order. */
    static List<Pupil> pupils() {
        Random random = new Random(SEED);
        List<Pupil> out = new ArrayList<>();
        for (int s = 0; s < SCHOOLS; s++) {
            int zone = s % ZONES.length;
            double deprivation = ZONE_DEPRIVATION[zone];
            double zoneEffect = -10 * (deprivation - 0.25);
            double schoolEffect = 2.5 * random.nextGaussian();
            double sessionsOffered = 0.5 * random.nextGaussian() + 2.0 * (deprivation - 0.25);
            int classMean = 24 + (int) StrictMath.round(2 * random.nextGaussian());
            double testDayShock = random.nextGaussian();
            String school = String.format(Locale.ROOT, "S%02d", s + 1);
            int size = 35 + random.nextInt(36);
            for (int k = 0; k < size; k++) {
                out.add(pupil(random, out.size() + 1, school, zone, deprivation, zoneEffect, schoolEffect,
                        sessionsOffered, classMean, testDayShock));
            }
        }
        return withRegisterErrors(out, random);
    }

    private static Pupil pupil(Random random, int id, String school, int zone, double deprivation,
            double zoneEffect, double schoolEffect, double sessionsOffered, int classMean, double testDayShock) {
        int year = random.nextInt(3);
        int freeMeals = random.nextDouble() < deprivation ? 1 : 0;
        int english = random.nextDouble() < (zone == 1 || zone == 3 ? 0.22 : 0.10) ? 1 : 0;
        double engagement = random.nextGaussian();
        double prior = 100 + zoneEffect + schoolEffect - 5 * freeMeals - 3 * english + 12 * random.nextGaussian();
        double attendance = clamp(95.5 - 2.5 * freeMeals + 0.8 * engagement + 3.2 * random.nextGaussian(), 62, 100);
        attendance = round(attendance, 1);
        double homeReading = StrictMath.round(StrictMath.exp(StrictMath.log(55) + 0.35 * engagement
                - 0.2 * freeMeals + 0.45 * random.nextGaussian()));
        int classSize = classMean + random.nextInt(5) - 2;
        double propensity = -0.9 + 0.07 * (100 - prior) + sessionsOffered + 0.6 * freeMeals + 0.35 * engagement;
        boolean tutored = random.nextDouble() < 1 / (1 + StrictMath.exp(-propensity));
        double hours = 0;
        if (tutored) {
            hours = clamp(StrictMath.round(StrictMath.exp(StrictMath.log(18) + 0.45 * random.nextGaussian())
                    + 2 * engagement), 1, 60);
        }
        double scoreNoise = 6.5 * random.nextGaussian();
        double fluencyNoise = 0.16 * random.nextGaussian();
        double scoreWithoutTutoring = 25 + 0.75 * prior + 0.3 * zoneEffect + schoolEffect + 2 * testDayShock
                + 0.04 * (homeReading - 55) - 3 * freeMeals - english + 0.2 * (attendance - 95)
                - 0.15 * (classSize - 24) + scoreNoise;
        double logFluencyWithoutTutoring = StrictMath.log(95) + 0.011 * (prior - 100) + 0.05 * (year - 1)
                + 0.004 * schoolEffect + 0.05 * testDayShock + 0.005 * engagement + fluencyNoise;

        boolean priorMissing = random.nextDouble() < 0.015;
        boolean attendanceMissing = random.nextDouble() < 0.03;
        boolean surveyMissing = random.nextDouble() < 0.10 + 0.08 * freeMeals;
        return new Pupil(id, school, ZONES[zone], "Y" + (year + 4), freeMeals, english,
                priorMissing ? Double.NaN : round(prior, 1), attendanceMissing ? Double.NaN : attendance,
                surveyMissing ? Double.NaN : homeReading, classSize, hours,
                round(scoreWithoutTutoring + SCORE_EFFECT_PER_HOUR * hours, 1),
                words(logFluencyWithoutTutoring + LOG_FLUENCY_EFFECT_PER_HOUR * hours),
                round(scoreWithoutTutoring, 1), words(logFluencyWithoutTutoring));
    }

    /** A few tutored pupils whose register entry has a digit too many: ten times the hours attended. */
    private static List<Pupil> withRegisterErrors(List<Pupil> pupils, Random random) {
        List<Pupil> out = new ArrayList<>(pupils);
        Set<Integer> changed = new HashSet<>();
        while (changed.size() < REGISTER_ERRORS) {
            int i = random.nextInt(out.size());
            Pupil p = out.get(i);
            if (p.tutoringHours() >= 15 && changed.add(i)) {
                out.set(i, new Pupil(p.id(), p.school(), p.zone(), p.yearGroup(), p.freeMeals(),
                        p.englishAdditional(), p.priorScore(), p.attendance(), p.homeReading(), p.classSize(),
                        10 * p.tutoringHours(), p.readingScore(), p.readingFluency(), p.nullReadingScore(),
                        p.nullReadingFluency()));
            }
        }
        return out;
    }

    private static double words(double logWordsPerMinute) {
        return StrictMath.max(5, StrictMath.round(StrictMath.exp(logWordsPerMinute)));
    }

    private static double clamp(double v, double low, double high) {
        return StrictMath.min(high, StrictMath.max(low, v));
    }

    private static double round(double v, int decimals) {
        // from the exact binary value, not from Double.toString, whose digits changed between Java releases
        return new BigDecimal(v).setScale(decimals, RoundingMode.HALF_EVEN).doubleValue();
    }
}
