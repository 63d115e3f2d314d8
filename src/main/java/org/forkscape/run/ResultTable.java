package org.forkscape.run;

import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import java.util.concurrent.ConcurrentHashMap;
import org.forkscape.fit.Distributions;
import org.forkscape.fit.FitStatus;
import org.forkscape.fit.KeyFit;

/**
 * The results of a run, one slot per fitted specification, stored column by column: 64 bytes per
 * specification when every specification of the plan is fitted (the index is then the position), 72
 * with a random sample. The t statistic, p-value, interval and the other scales' values
 * ({@link Scale}) are derived from these on demand.
 */
public final class ResultTable {
    private final int size;
    private final long[] index;
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
    private final List<String> statusText = new ArrayList<>();
    private volatile boolean[] statusOk = new boolean[0];
    private final Map<String, Integer> statusCode = new ConcurrentHashMap<>();

    /**
     * @param indices the specification indices in slot order, or {@code null} when slot i is
     *                specification i and there are {@code size} of them
     */
    public ResultTable(int size, long[] indices) {
        this.size = size;
        this.index = indices;
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
        df[slot] = Double.isNaN(fit.df()) ? -1 : (int) fit.df();
        nObs[slot] = fit.nObs();
        nParams[slot] = fit.nParams();
        status[slot] = code(fit.statusText(), fit.ok());
    }

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

    public long specIndex(int slot) {
        return index == null ? slot : index[slot];
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

    /** Degrees of freedom, NaN when undefined. */
    public double df(int slot) {
        return df[slot] < 0 ? Double.NaN : df[slot];
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

    /** Adjusted R-squared, 1 - (1 - R2)(N - 1)/(N - K). */
    public double adjustedR2(int slot) {
        return 1 - (1 - r2[slot]) * (nObs[slot] - 1.0) / (nObs[slot] - nParams[slot]);
    }

    /** p-value of the overall F test, from the stored statistic on K - 1 and N - K degrees of freedom. */
    public double modelPValue(int slot) {
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
        return 6 * Double.BYTES + 4 * Integer.BYTES + (index == null ? 0 : Long.BYTES);
    }
}
