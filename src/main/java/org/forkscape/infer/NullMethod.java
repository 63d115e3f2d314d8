package org.forkscape.infer;

/** How a null draw removes the key effect. */
public enum NullMethod {
    /**
     * Each specification's own estimated effect is removed from its outcome (y - b x) and rows, or whole
     * clusters, are resampled with replacement (Simonsohn, Simmons &amp; Nelson 2020).
     */
    BOOTSTRAP("bootstrap"),
    /** The key predictor is shuffled between rows: the right null for a randomized predictor. */
    PERMUTE("permute");

    private final String spelling;

    NullMethod(String spelling) {
        this.spelling = spelling;
    }

    public String spelling() {
        return spelling;
    }

    /** The method of a plan spelling ({@code bootstrap} or {@code permute}). */
    public static NullMethod of(String spelling) {
        for (NullMethod m : values()) {
            if (m.spelling.equals(spelling)) {
                return m;
            }
        }
        throw new IllegalArgumentException("unknown null method " + spelling);
    }
}
