package org.forkscape.run;

import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import java.util.concurrent.ConcurrentHashMap;
import org.forkscape.fit.Distributions;
import org.forkscape.fit.FitStatus;
import org.forkscape.fit.KeyFit;
import org.forkscape.plan.ModelFamily;
import org.forkscape.plan.SpecificationNumber;
import org.forkscape.plan.SpecificationSpace;

/**
 * The results of a run, one slot per fitted specification, stored column by column: 64 bytes per
 * specification when every specification of the plan is fitted (the index is then the position), 72
 * with a random sample, and 21 more when the plan fits generalized linear models (their average marginal
 * effect, its standard error, the likelihood-ratio p-value and the model). The t statistic, p-value,
 * interval and the other scales' values ({@link Scale}) are derived from these on demand. For a
 * generalized linear model the residual sum of squares slot holds the deviance, R-squared McFadden's,
 * and the degrees of freedom are infinite (the standard normal reference).
 */
public final class ResultTable {
    private final int size;
    private final long[] index;
    private final SpecificationSpace space;
    private final double[] estimate;
    private final double[] stdEstimate;
    private final double[] stdError;
    private final double[] r2;
    private final double[] rss;
    private final double[] modelF;
    private final int[] df;
    private final int[] nObs;
    private final int[] nParams;
    private final int[] status;
    /** Only when the plan fits generalized linear models: their own columns, and each slot's model. */
    private final double[] effect;
    private final double[] effectStdError;
    private final double[] likelihoodRatioP;
    private final byte[] family;
    private final List<String> statusText = new ArrayList<>();
    private volatile boolean[] statusOk = new boolean[0];
    private final Map<String, Integer> statusCode = new ConcurrentHashMap<>();

    /**
     * @param indices the specification indices in slot order, or {@code null} when slot i is
     *                specification i and there are {@code size} of them
     */
    public ResultTable(int size, long[] indices) {
        this(size, indices, false, null);
    }

    /**
     * @param generalized whether some specifications fit generalized linear models
     * @param space       the space the indices are keys of, which numbers them ({@link #specNumber}); null
     *                    when the keys are the indices themselves, as in every space within a long
     */
    public ResultTable(int size, long[] indices, boolean generalized, SpecificationSpace space) {
        this.size = size;
        this.index = indices;
        this.space = space;
        estimate = new double[size];
        stdEstimate = new double[size];
        stdError = new double[size];
        r2 = new double[size];
        rss = new double[size];
        modelF = new double[size];
        df = new int[size];
        nObs = new int[size];
        nParams = new int[size];
        status = new int[size];
        effect = generalized ? new double[size] : null;
        effectStdError = generalized ? new double[size] : null;
        likelihoodRatioP = generalized ? new double[size] : null;
        family = generalized ? new byte[size] : null;
        code(FitStatus.OK.describe(""), true);
    }

    /** Stores one fit; safe to call from several threads for distinct slots. */
    public void set(int slot, KeyFit fit) {
        estimate[slot] = fit.estimate();
        stdEstimate[slot] = fit.standardizedEstimate();
        stdError[slot] = fit.stdError();
        r2[slot] = fit.r2();
        rss[slot] = fit.rss();
        modelF[slot] = fit.modelF();
        df[slot] = Double.isNaN(fit.df()) ? -1 : Double.isInfinite(fit.df()) ? NORMAL : (int) fit.df();
        nObs[slot] = fit.nObs();
        nParams[slot] = fit.nParams();
        status[slot] = code(fit.statusText(), fit.ok());
        if (family != null) {
            effect[slot] = fit.effect();
            effectStdError[slot] = fit.effectStdError();
            likelihoodRatioP[slot] = fit.likelihoodRatioP();
            family[slot] = (byte) fit.family().ordinal();
        } else if (!fit.family().leastSquares()) {
            throw new IllegalStateException("a table for least squares alone was handed a " + fit.family().spelling()
                    + " fit");
        }
    }

    /** The df slot of the standard normal reference. */
    private static final int NORMAL = Integer.MAX_VALUE;

    /** The code of a status text, numbered on first sight; whether it is a fitted one is the fit's own word. */
    private int code(String text, boolean fitted) {
        Integer c = statusCode.get(text);
        if (c != null) {
            return c;
        }
        synchronized (statusText) {
            return statusCode.computeIfAbsent(text, t -> {
                statusText.add(t);
                boolean[] ok = java.util.Arrays.copyOf(statusOk, statusText.size());
                ok[ok.length - 1] = fitted;
                statusOk = ok;
                return statusText.size() - 1;
            });
        }
    }

    public int size() {
        return size;
    }

    /** The specification's key in its space ({@link SpecificationSpace}): its index within a long. */
    public long specIndex(int slot) {
        return index == null ? slot : index[slot];
    }

    /** The specification's 1-based number in the whole space, as the results write it. */
    public SpecificationNumber specNumber(int slot) {
        long key = specIndex(slot);
        return space == null ? new SpecificationNumber(java.math.BigInteger.valueOf(key + 1), false) : space.number(key);
    }

    public double estimate(int slot) {
        return estimate[slot];
    }

    /** The standardized coefficient, b sd(x) / sd(y) over the specification's rows ({@link KeyFit#standardizedEstimate}). */
    public double standardizedEstimate(int slot) {
        return stdEstimate[slot];
    }

    public double stdError(int slot) {
        return stdError[slot];
    }

    /** Degrees of freedom, NaN when undefined, infinite for the standard normal reference. */
    public double df(int slot) {
        return df[slot] < 0 ? Double.NaN : df[slot] == NORMAL ? Double.POSITIVE_INFINITY : df[slot];
    }

    public ModelFamily family(int slot) {
        return family == null ? ModelFamily.OLS : ModelFamily.values()[family[slot]];
    }

    /** Whether the plan fits generalized linear models (then their columns are stored). */
    public boolean generalized() {
        return family != null;
    }

    /** The average marginal effect of the key predictor (the coefficient for least squares). */
    public double effect(int slot) {
        return family == null ? estimate[slot] : effect[slot];
    }

    public double effectStdError(int slot) {
        return family == null ? stdError[slot] : effectStdError[slot];
    }

    /** The residual deviance: the residual sum of squares for least squares, as R's deviance() gives it. */
    public double deviance(int slot) {
        return rss[slot];
    }

    public int nObs(int slot) {
        return nObs[slot];
    }

    public int nParams(int slot) {
        return nParams[slot];
    }

    public double r2(int slot) {
        return r2[slot];
    }

    public double rss(int slot) {
        return rss[slot];
    }

    /** Adjusted R-squared, 1 - (1 - R2)(N - 1)/(N - K); NaN for a generalized linear model. */
    public double adjustedR2(int slot) {
        if (!family(slot).leastSquares()) {
            return Double.NaN;
        }
        return 1 - (1 - r2[slot]) * (nObs[slot] - 1.0) / (nObs[slot] - nParams[slot]);
    }

    /**
     * p-value of the overall F test, from the stored statistic on K - 1 and N - K degrees of freedom; of
     * the likelihood-ratio test for a generalized linear model.
     */
    public double modelPValue(int slot) {
        if (!family(slot).leastSquares()) {
            return likelihoodRatioP[slot];
        }
        return Distributions.fUpperP(modelF[slot], nParams[slot] - 1, nObs[slot] - nParams[slot]);
    }

    public String status(int slot) {
        synchronized (statusText) {
            return statusText.get(status[slot]);
        }
    }

    /** Whether the slot has an estimate and a standard error. */
    public boolean fitted(int slot) {
        return statusOk[status[slot]];
    }

    public double statistic(int slot) {
        return estimate[slot] / stdError[slot];
    }

    public double pValue(int slot) {
        return Distributions.twoSidedP(statistic(slot), df(slot));
    }

    /** Lower and upper bounds of the confidence interval at the given level. */
    public double ciLow(int slot, double confidence) {
        return estimate[slot] - Distributions.critical(df(slot), 1 - confidence) * stdError[slot];
    }

    public double ciHigh(int slot, double confidence) {
        return estimate[slot] + Distributions.critical(df(slot), 1 - confidence) * stdError[slot];
    }

    /** Bytes held per specification by the numeric columns (for the benchmark's storage figure). */
    public int bytesPerSpecification() {
        return 6 * Double.BYTES + 4 * Integer.BYTES + (index == null ? 0 : Long.BYTES)
                + (family == null ? 0 : 3 * Double.BYTES + 1);
    }
}
