package org.forkscape.infer;

import java.util.List;
import org.forkscape.plan.Factor;
import org.forkscape.plan.SpecificationSpace;
import org.forkscape.run.ResultTable;
import org.forkscape.run.RunResult;
import org.forkscape.run.Scale;

/**
 * Fitted specifications laid out by factor for the influence analysis: each one's level of every factor,
 * its estimate and its p-value.
 */
public final class SpecificationGrid {
    private final List<Factor> factors;
    private final int[][] levelOf;
    private final double[] estimate;
    private final double[] pValue;
    private final double alpha;

    /**
     * @param factors  the factors, as {@link Factor#listOf} lists a plan's, whose level numbers {@code levelOf} holds
     * @param levelOf  {@code levelOf[f][i]}: level of specification i on factor f (copied)
     * @param estimate key estimates (copied)
     * @param pValue   their p-values (copied)
     * @param alpha    the significance level
     */
    public SpecificationGrid(List<Factor> factors, int[][] levelOf, double[] estimate, double[] pValue, double alpha) {
        this.factors = List.copyOf(factors);
        this.levelOf = new int[levelOf.length][];
        for (int f = 0; f < levelOf.length; f++) {
            this.levelOf[f] = levelOf[f].clone();
            if (levelOf[f].length != estimate.length) {
                throw new IllegalArgumentException("factor " + f + " has " + levelOf[f].length + " levels for "
                        + estimate.length + " specifications");
            }
        }
        if (levelOf.length != factors.size() || pValue.length != estimate.length) {
            throw new IllegalArgumentException("the grid's arrays do not match");
        }
        this.estimate = estimate.clone();
        this.pValue = pValue.clone();
        this.alpha = alpha;
    }

    /** The fitted specifications among {@code slots} of a run, with their estimates as fitted. */
    public static SpecificationGrid of(RunResult run, int[] slots) {
        return of(run, slots, Scale.AS_FITTED);
    }

    /**
     * The fitted specifications among {@code slots} that have a value on {@code scale}, with that value as
     * their estimate (its sign is the estimate's, so significance in the dominant sign is unchanged).
     */
    public static SpecificationGrid of(RunResult run, int[] slots, Scale scale) {
        List<Factor> factors = Factor.listOf(run.plan());
        ResultTable r = run.results();
        int fitted = 0;
        for (int slot : slots) {
            if (r.fitted(slot) && scale.defined(r, slot)) {
                fitted++;
            }
        }
        int[][] levelOf = new int[factors.size()][fitted];
        double[] estimate = new double[fitted];
        double[] p = new double[fitted];
        SpecificationSpace space = run.models().space();
        long[] choices = new long[space.decisionCount()];
        int i = 0;
        for (int slot : slots) {
            if (!r.fitted(slot) || !scale.defined(r, slot)) {
                continue;
            }
            space.decode(r.specIndex(slot), choices);
            for (Factor f : factors) {
                levelOf[f.id()][i] = f.levelOf(choices);
            }
            estimate[i] = scale.value(r, slot);
            p[i] = r.pValue(slot);
            i++;
        }
        return new SpecificationGrid(factors, levelOf, estimate, p, run.plan().alpha());
    }

    public List<Factor> factors() {
        return factors;
    }

    public int size() {
        return estimate.length;
    }

    public int level(int factor, int spec) {
        return levelOf[factor][spec];
    }

    public double estimate(int spec) {
        return estimate[spec];
    }

    public double pValue(int spec) {
        return pValue[spec];
    }

    public double alpha() {
        return alpha;
    }
}
