package org.forkscape.fit;

import java.util.Arrays;

/**
 * Which data variant: the chosen alternative of each sample decision (in declared order), of the absorb
 * decision and of the weights decision (-1 when the plan has none).
 */
public record VariantKey(int[] sampleChoices, int absorbChoice, int weightChoice) implements java.io.Serializable {
    public VariantKey {
        sampleChoices = sampleChoices.clone();
    }

    /** A key of a plan without a weights decision. */
    public VariantKey(int[] sampleChoices, int absorbChoice) {
        this(sampleChoices, absorbChoice, -1);
    }

    @Override
    public boolean equals(Object o) {
        return o instanceof VariantKey k && k.absorbChoice == absorbChoice && k.weightChoice == weightChoice && Arrays.equals(k.sampleChoices, sampleChoices);
    }

    @Override
    public int hashCode() {
        return 31 * (31 * Arrays.hashCode(sampleChoices) + absorbChoice) + weightChoice;
    }

    @Override
    public String toString() {
        return "VariantKey" + Arrays.toString(sampleChoices) + "/" + absorbChoice + "/" + weightChoice;
    }
}
