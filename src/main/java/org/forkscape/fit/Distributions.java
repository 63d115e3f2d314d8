package org.forkscape.fit;

import java.util.concurrent.ConcurrentHashMap;
import org.apache.commons.math3.distribution.NormalDistribution;
import org.apache.commons.math3.distribution.TDistribution;
import org.apache.commons.math3.special.Beta;
import org.apache.commons.math3.special.Erf;
import org.apache.commons.math3.special.Gamma;

/**
 * Student t and F tail probabilities through the regularized incomplete beta function of Commons Math
 * (the same function its TDistribution and FDistribution use, without their per-instance random
 * generator), and cached t critical values. Infinite degrees of freedom stand for the standard normal
 * reference that generalized linear models use (as R's summary.glm does with the dispersion fixed at 1).
 */
public final class Distributions {
    private static final ConcurrentHashMap<Key, Double> CRITICAL = new ConcurrentHashMap<>();

    private record Key(double df, double alpha) {
    }

    private Distributions() {
    }

    /** Two-sided p-value of a t statistic: P(|T| >= |t|) = I_{df/(df+t^2)}(df/2, 1/2). */
    public static double twoSidedP(double t, double df) {
        if (Double.isNaN(t) || !(df > 0)) {
            return Double.NaN;
        }
        if (Double.isInfinite(t)) {
            return 0;
        }
        if (Double.isInfinite(df)) {
            // P(|Z| >= |t|) = erfc(|t| / sqrt 2), without the cancellation of 2 (1 - Phi(|t|))
            return Erf.erfc(Math.abs(t) / Math.sqrt(2));
        }
        return Beta.regularizedBeta(df / (df + t * t), df / 2, 0.5);
    }

    /** Upper tail of the chi-square distribution on {@code df} degrees of freedom at {@code x}: Q(df/2, x/2). */
    public static double chiSquareUpperP(double x, double df) {
        if (Double.isNaN(x) || !(df > 0)) {
            return Double.NaN;
        }
        if (x <= 0) {
            return 1;
        }
        return Gamma.regularizedGammaQ(df / 2, x / 2);
    }

    /** Upper tail of F(d1, d2) at f: I_{d2/(d2 + d1 f)}(d2/2, d1/2). */
    public static double fUpperP(double f, double d1, double d2) {
        if (Double.isNaN(f) || !(d1 > 0) || !(d2 > 0)) {
            return Double.NaN;
        }
        if (Double.isInfinite(f)) {
            return 0;
        }
        if (f <= 0) {
            return 1;
        }
        return Beta.regularizedBeta(d2 / (d2 + d1 * f), d2 / 2, d1 / 2);
    }

    /**
     * Absolute accuracy of the root search behind a t quantile. Commons Math's default (1e-9) leaves
     * interval bounds correct to only about 5e-10 relative; at 1e-15 the search stops at its relative
     * accuracy (about 1e-14), so the bounds are as exact as the estimate and standard error.
     */
    static final double QUANTILE_ACCURACY = 1e-15;

    /** The t quantile at 1 - alpha/2 (the normal one for infinite df), cached by (df, alpha). */
    public static double critical(double df, double alpha) {
        if (!(df > 0)) {
            return Double.NaN;
        }
        if (Double.isInfinite(df)) {
            return CRITICAL.computeIfAbsent(new Key(df, alpha), k -> new NormalDistribution(null, 0, 1,
                    QUANTILE_ACCURACY).inverseCumulativeProbability(1 - alpha / 2));
        }
        return CRITICAL.computeIfAbsent(new Key(df, alpha),
                k -> new TDistribution(null, df, QUANTILE_ACCURACY).inverseCumulativeProbability(1 - alpha / 2));
    }
}
