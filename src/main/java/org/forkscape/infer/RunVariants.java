package org.forkscape.infer;

import org.forkscape.fit.DataVariant;
import org.forkscape.fit.SpecificationModel;
import org.forkscape.fit.SpecificationModels;
import org.forkscape.plan.SpecificationSpace;
import org.forkscape.run.ResultTable;
import org.forkscape.run.RunResult;

/**
 * The fitted specifications of a run with what re-estimating them needs: each one's model and data
 * variant, grouped by variant, and each variant rebuilt once from the plan and the table (the run does
 * not keep them). Read only after construction; shared by the null draws' worker threads.
 */
public final class RunVariants {
    private final RunResult run;
    private final int[] slots;
    private final int[] variantOf;
    private final SpecificationModel[] models;
    private final DataVariant[] variants;
    private final int[][] byVariant;

    private RunVariants(RunResult run, int[] slots, int[] variantOf, SpecificationModel[] models,
            DataVariant[] variants, int[][] byVariant) {
        this.run = run;
        this.slots = slots;
        this.variantOf = variantOf;
        this.models = models;
        this.variants = variants;
        this.byVariant = byVariant;
    }

    /** Indexes the fitted slots among {@code candidates} (slots of {@code run.results()}). */
    public static RunVariants of(RunResult run, int[] candidates) {
        ResultTable r = run.results();
        SpecificationModels m = run.models();
        SpecificationSpace space = m.space();
        int fitted = 0;
        for (int slot : candidates) {
            if (r.fitted(slot)) {
                fitted++;
            }
        }
        int[] slots = new int[fitted];
        int[] variantOf = new int[fitted];
        SpecificationModel[] models = new SpecificationModel[fitted];
        int variantCount = (int) m.variantCount();
        int[] perVariant = new int[variantCount];
        long[] choices = new long[space.decisionCount()];
        int k = 0;
        for (int slot : candidates) {
            if (!r.fitted(slot)) {
                continue;
            }
            space.decode(r.specIndex(slot), choices);
            slots[k] = slot;
            variantOf[k] = m.variantOrdinal(choices);
            models[k] = m.model(choices);
            perVariant[variantOf[k]]++;
            k++;
        }
        int[][] byVariant = new int[variantCount][];
        DataVariant[] variants = new DataVariant[variantCount];
        for (int v = 0; v < variantCount; v++) {
            byVariant[v] = new int[perVariant[v]];
            if (perVariant[v] > 0) {
                variants[v] = m.variant(m.variantKey(v));
            }
            perVariant[v] = 0;
        }
        for (int i = 0; i < fitted; i++) {
            byVariant[variantOf[i]][perVariant[variantOf[i]]++] = i;
        }
        return new RunVariants(run, slots, variantOf, models, variants, byVariant);
    }

    /** Every fitted slot of the run. */
    public static RunVariants of(RunResult run) {
        int[] all = new int[run.results().size()];
        for (int i = 0; i < all.length; i++) {
            all[i] = i;
        }
        return of(run, all);
    }

    public RunResult run() {
        return run;
    }

    /** Number of fitted specifications indexed. */
    public int size() {
        return slots.length;
    }

    /** The result-table slot of fitted specification {@code i}. */
    public int slot(int i) {
        return slots[i];
    }

    public int variantOf(int i) {
        return variantOf[i];
    }

    public SpecificationModel model(int i) {
        return models[i];
    }

    public int variantCount() {
        return variants.length;
    }

    /** The observed variant, or null when none of the indexed specifications uses it. */
    public DataVariant variant(int v) {
        return variants[v];
    }

    /** Indices (0..size-1) of the fitted specifications of variant {@code v}, in slot order. */
    public int[] specificationsOf(int v) {
        return byVariant[v];
    }
}
