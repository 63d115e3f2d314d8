package org.forkscape.infer;

import org.apache.commons.math3.distribution.NormalDistribution;
import org.apache.commons.math3.special.Erf;
import org.forkscape.fit.Distributions;

/**
 * The normal score of a t statistic with the same tail probability: z = sign(t) Phi^-1(1 - p/2), with p
 * its two-sided p-value, so that Stouffer's combination of the scores (Stouffer, Suchman, DeVinney,
 * Star &amp; Williams 1949, The American Soldier, vol. 1) respects each specification's own degrees of
 * freedom. Tail probabilities below 1e-3 are inverted by Newton's method on log Q(z), Q(z) = erfc(z /
 * sqrt 2) / 2 from Commons Math, because the library's inverse through erfInv(2p - 1) loses the digits
 * of small p. A tail that underflows is taken as the smallest normal double, so |z| never exceeds
 * {@link #MAX_SCORE}.
 */
public final class NormalScores {
    private static final NormalDistribution STANDARD = new NormalDistribution(null, 0, 1);
    private static final double SMALL_TAIL = 1e-3;
    private static final double LOG_SQRT_2PI = 0.5 * Math.log(2 * Math.PI);
    /** The normal score of the smallest positive normal double as an upper tail (about 37.5). */
    public static final double MAX_SCORE = upperQuantile(Double.MIN_NORMAL);

    private NormalScores() {
    }

    /** The signed normal score of t with df degrees of freedom; NaN when either is undefined. */
    public static double ofT(double t, double df) {
        if (Double.isNaN(t) || !(df > 0)) {
            return Double.NaN;
        }
        if (t == 0) {
            return 0;
        }
        return ofTwoSidedP(Distributions.twoSidedP(t, df), t);
    }

    /** The normal score with the same two-sided p-value, signed like {@code t}. */
    public static double ofTwoSidedP(double p, double t) {
        if (Double.isNaN(p) || Double.isNaN(t)) {
            return Double.NaN;
        }
        return t == 0 ? 0 : Math.copySign(upperQuantile(p / 2), t);
    }

    /** The z with upper tail probability q, for 0 &lt; q &lt;= 1/2; q below the smallest normal double is raised to it. */
    public static double upperQuantile(double q) {
        double tail = Math.max(q, Double.MIN_NORMAL);
        if (tail >= SMALL_TAIL) {
            return -STANDARD.inverseCumulativeProbability(tail);
        }
        double logQ = Math.log(tail);
        double a = -2 * logQ;
        double z = Math.sqrt(a - Math.log(a) - 2 * LOG_SQRT_2PI);
        for (int i = 0; i < 50; i++) {
            double upper = 0.5 * Erf.erfc(z / Math.sqrt(2));
            double logDensity = -0.5 * z * z - LOG_SQRT_2PI;
            // Newton step on f(z) = log Q(z) - log q, f'(z) = -phi(z) / Q(z)
            double step = (Math.log(upper) - logQ) * Math.exp(Math.log(upper) - logDensity);
            z += step;
            if (Math.abs(step) < 1e-14 * z) {
                break;
            }
        }
        return z;
    }
}
