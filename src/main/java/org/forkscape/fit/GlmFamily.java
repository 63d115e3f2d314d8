package org.forkscape.fit;

import org.apache.commons.math3.special.Erf;
import org.forkscape.plan.ModelFamily;

/**
 * The link, variance and deviance of a generalized linear model's family (McCullagh &amp; Nelder 1989,
 * Generalized Linear Models, 2nd ed., Chapman &amp; Hall, chapters 2, 4 and 6), with the numerical guards of
 * R's {@code binomial()}, {@code binomial(link = "probit")} and {@code poisson()} families so that fitted
 * values agree with R's {@code glm}: the logit's inverse is held to [eps, 1 - eps] beyond |eta| = 30,
 * the probit's linear predictor to |eta| &lt;= -qnorm(eps), the Poisson mean to at least eps (eps the double
 * machine epsilon).
 */
abstract class GlmFamily {
    static final double EPS = Math.ulp(1.0);

    /** The mean at linear predictor {@code eta}. */
    abstract double mean(double eta);

    /** d mu / d eta at {@code eta}. */
    abstract double meanSlope(double eta);

    /** d^2 mu / d eta^2 at {@code eta}, for the delta method of the average marginal effect. */
    abstract double meanCurvature(double eta);

    /**
     * d mu / d eta at {@code eta} whose mean {@link #mean} gave {@code mean}: the same value as
     * {@link #meanSlope}, overridden where a family can take it from the mean without another exponential.
     */
    double meanSlope(double eta, double mean) {
        return meanSlope(eta);
    }

    /** d^2 mu / d eta^2 from the mean and slope at {@code eta} (see {@link #meanSlope(double, double)}). */
    double meanCurvature(double eta, double mean, double slope) {
        return meanCurvature(eta);
    }

    /** Var(y) / dispersion at mean {@code mu}. */
    abstract double variance(double mu);

    /** The unit deviance 2 (l(y; y) - l(mu; y)) of one row. */
    abstract double unitDeviance(double y, double mu);

    /** The link: the linear predictor whose mean is {@code mu}. */
    abstract double link(double mu);

    /**
     * A level's starting mean from its outcome sum and row count: pulled half a row away from 0 and 1 for
     * a binary outcome, 0.1 above the mean for counts (R's {@code mustart} for these families, per level).
     */
    abstract double startingMean(double sum, int count);

    /** Whether {@code mu} sits at the edge of the parameter space (a fitted probability of 0 or 1, a mean of 0). */
    abstract boolean atBoundary(double mu);

    /**
     * The hot loop of every iteration, for rows from..to-1 at linear predictors {@code eta}: each row's
     * mean (into {@code mu}), working weight mu'(eta)^2 / V(mu) and score (y - mu) mu'(eta) / V(mu); returns
     * the rows' deviance. Overridden where a family can share its exponentials.
     */
    double evaluate(double[] y, double[] eta, double[] mu, double[] weight, double[] score, int from, int to) {
        double d = 0;
        for (int i = from; i < to; i++) {
            double m = mean(eta[i]);
            mu[i] = m;
            d += unitDeviance(y[i], m);
        }
        weightsAndScores(y, eta, mu, weight, score, from, to);
        return d;
    }

    /** The working weights and scores of rows from..to-1, from their linear predictors and means. */
    void weightsAndScores(double[] y, double[] eta, double[] mu, double[] weight, double[] score, int from, int to) {
        for (int i = from; i < to; i++) {
            double m = mu[i];
            double slope = meanSlope(eta[i]);
            double v = variance(m);
            weight[i] = slope * slope / v;
            score[i] = (y[i] - m) * slope / v;
        }
    }

    static GlmFamily of(ModelFamily family) {
        return switch (family) {
            case LOGIT -> LOGIT;
            case PROBIT -> PROBIT;
            case POISSON -> POISSON;
            case OLS -> throw new IllegalArgumentException("least squares is not fitted by iterations");
        };
    }

    /**
     * Fitted means closer than this to 0 or 1 mark a linear predictor running away: the maximum
     * likelihood estimate does not exist (Albert &amp; Anderson 1984, "On the existence of maximum likelihood
     * estimates in logistic regression models", Biometrika 71(1); for counts, Santos Silva &amp; Tenreyro
     * 2010, "On the existence of the maximum likelihood estimates in Poisson regression", Economics
     * Letters 107(2)). The threshold itself is common practice: at convergence to 1e-10 in relative
     * deviance, separated rows stop with |eta| above about 23, a legitimately fitted row almost never.
     */
    static final double BOUNDARY = 1e-10;

    /** The binomial family with a 0/1 outcome: what the logit and probit links share. */
    private abstract static class Binomial extends GlmFamily {
        @Override
        double variance(double mu) {
            return mu * (1 - mu);
        }

        @Override
        double unitDeviance(double y, double mu) {
            return y > 0 ? -2 * Math.log(mu) : -2 * Math.log1p(-mu);
        }

        @Override
        double startingMean(double sum, int count) {
            return (sum + 0.5) / (count + 1);
        }

        @Override
        boolean atBoundary(double mu) {
            return mu < BOUNDARY || mu > 1 - BOUNDARY;
        }
    }

    static final GlmFamily LOGIT = new Binomial() {
        private static final double THRESHOLD = 30;

        @Override
        double mean(double eta) {
            double t = eta < -THRESHOLD ? EPS : eta > THRESHOLD ? 1 / EPS : Math.exp(eta);
            return t / (1 + t);
        }

        /** Rows whose deviance terms are multiplied before one logarithm is taken. */
        private static final int PER_LOGARITHM = 8;

        /**
         * One exponential per row, and one logarithm per {@link #PER_LOGARITHM} rows: -2 log mu =
         * 2 log(1 + 1/t) and -2 log(1 - mu) = 2 log(1 + t) with t = e^eta, whose factors (each between 1 and
         * 1 + 1/eps, 4.5e15) are multiplied in groups of eight (at most 1.7e125, far from overflow) before
         * their logarithm is added. The canonical link: mu'(eta) = V(mu) = mu (1 - mu), so the weight is
         * mu (1 - mu) and the score y - mu.
         */
        @Override
        double evaluate(double[] y, double[] eta, double[] mu, double[] weight, double[] score, int from, int to) {
            double logs = 0;
            double product = 1;
            int factors = 0;
            for (int i = from; i < to; i++) {
                double e = eta[i];
                boolean held = e < -THRESHOLD || e > THRESHOLD;
                double t = e < -THRESHOLD ? EPS : e > THRESHOLD ? 1 / EPS : Math.exp(e);
                double m = t / (1 + t);
                mu[i] = m;
                product *= y[i] > 0 ? 1 + 1 / t : 1 + t;
                if (++factors == PER_LOGARITHM) {
                    logs += Math.log(product);
                    product = 1;
                    factors = 0;
                }
                double v = m * (1 - m);
                if (held) {
                    weight[i] = EPS * EPS / v;
                    score[i] = (y[i] - m) * EPS / v;
                } else {
                    weight[i] = v;
                    score[i] = y[i] - m;
                }
            }
            return 2 * (logs + Math.log(product));
        }

        @Override
        double meanSlope(double eta) {
            if (eta > THRESHOLD || eta < -THRESHOLD) {
                return EPS;
            }
            double e = Math.exp(eta);
            double d = 1 + e;
            return e / (d * d);
        }

        @Override
        double meanCurvature(double eta) {
            return meanCurvature(eta, mean(eta), meanSlope(eta));
        }

        /**
         * mu (1 - mu) within the threshold: e^eta / (1 + e^eta)^2 up to an absolute rounding of about 1e-16
         * (relatively larger where mu is within 1e-8 of 1), which is all that the sums over rows of the
         * average marginal effect and its gradient see.
         */
        @Override
        double meanSlope(double eta, double mean) {
            return eta > THRESHOLD || eta < -THRESHOLD ? EPS : mean * (1 - mean);
        }

        @Override
        double meanCurvature(double eta, double mean, double slope) {
            return slope * (1 - 2 * mean);
        }

        @Override
        double link(double mu) {
            return Math.log(mu / (1 - mu));
        }
    };

    static final GlmFamily PROBIT = new Binomial() {
        /** -qnorm(eps): R's bound on the probit's linear predictor. */
        private final double threshold = -new org.apache.commons.math3.distribution.NormalDistribution(null, 0, 1)
                .inverseCumulativeProbability(EPS);
        private final double invSqrt2Pi = 1 / Math.sqrt(2 * Math.PI);

        @Override
        double mean(double eta) {
            double e = Math.min(Math.max(eta, -threshold), threshold);
            return 0.5 * Erf.erfc(-e / Math.sqrt(2));
        }

        @Override
        double meanSlope(double eta) {
            return Math.max(invSqrt2Pi * Math.exp(-eta * eta / 2), EPS);
        }

        @Override
        double meanCurvature(double eta) {
            return -eta * invSqrt2Pi * Math.exp(-eta * eta / 2);
        }

        @Override
        double link(double mu) {
            return new org.apache.commons.math3.distribution.NormalDistribution(null, 0, 1)
                    .inverseCumulativeProbability(mu);
        }
    };

    static final GlmFamily POISSON = new GlmFamily() {
        @Override
        double mean(double eta) {
            return Math.max(Math.exp(eta), EPS);
        }

        /** The canonical link: mu'(eta) = V(mu) = mu, so the weight is mu and the score y - mu. */
        @Override
        void weightsAndScores(double[] y, double[] eta, double[] mu, double[] weight, double[] score, int from,
                int to) {
            for (int i = from; i < to; i++) {
                double m = mu[i];
                weight[i] = m;
                score[i] = y[i] - m;
            }
        }

        @Override
        double meanSlope(double eta) {
            return Math.max(Math.exp(eta), EPS);
        }

        @Override
        double meanCurvature(double eta) {
            return Math.exp(eta);
        }

        /** The mean itself: mu'(eta) = e^eta, held to eps as the mean is. */
        @Override
        double meanSlope(double eta, double mean) {
            return mean;
        }

        @Override
        double variance(double mu) {
            return mu;
        }

        @Override
        double unitDeviance(double y, double mu) {
            // y log(y / mu) is 0 at y = 0
            return 2 * ((y > 0 ? y * Math.log(y / mu) : 0) - (y - mu));
        }

        @Override
        double link(double mu) {
            return Math.log(mu);
        }

        @Override
        double startingMean(double sum, int count) {
            return sum / count + 0.1;
        }

        @Override
        boolean atBoundary(double mu) {
            return mu < BOUNDARY;
        }
    };
}
