package org.forkscape.fit;

import java.util.Arrays;

/**
 * Which data variant: the chosen alternative of each sample decision (in declared order) and of the
 * absorb decision (-1 when the plan has none).
 */
public record VariantKey(int[] sampleChoices, int absorbChoice) implements java.io.Serializable {
    public VariantKey {
        sampleChoices = sampleChoices.clone();
    }

    @Override
    public boolean equals(Object o) {
        return o instanceof VariantKey k && k.absorbChoice == absorbChoice && Arrays.equals(k.sampleChoices, sampleChoices);
    }

    @Override
    public int hashCode() {
        return 31 * Arrays.hashCode(sampleChoices) + absorbChoice;
    }

    @Override
    public String toString() {
        return "VariantKey" + Arrays.toString(sampleChoices) + "/" + absorbChoice;
    }
}
