package org.forkscape.fit;

/**
 * Whether a specification was fitted, and if not, why. Each status has one sentence, completed by a
 * detail (a column, a count, an error type), rendered only where a status is written or shown.
 */
public enum FitStatus {
    OK("ok"),
    /** Detail: the counts, "5 rows complete on this specification's variables" or "5 rows for 7 coefficients". */
    TOO_FEW_ROWS("too few rows: %s"),
    CONSTANT_OUTCOME("the outcome is constant in these rows"),
    /** Detail: the key predictor's column. */
    CONSTANT_KEY("the key predictor %s is constant in these rows"),
    /** Detail: the key predictor's column. */
    KEY_IN_FIXED_EFFECTS("collinear: the key predictor %s is a linear combination of the fixed effects"),
    /** Detail: the key predictor's column. */
    KEY_IN_CONTROLS("collinear: the key predictor %s is a linear combination of the controls"),
    ONE_CLUSTER("one cluster: cluster-robust errors need at least two"),
    /** Detail: the error type's label. */
    VARIANCE_NOT_POSITIVE("undefined: the multi-way cluster variance for %s is not positive (the intersections' "
            + "terms outweigh the others)"),
    /** Detail: the error type's label. */
    LEVERAGE_ONE("undefined: leverage 1 for %s (a row fits perfectly, such as a fixed-effect level with one row)"),
    /** Detail: the error type's label. */
    LEVERAGE_ILL_CONDITIONED("undefined: the fixed effects' leverages for %s cannot be computed to full precision "
            + "(groups of levels of the two absorbed columns are joined by rows of almost no weight)"),
    /** Detail: the number of primes tried ({@link ModularDummyRank}). */
    RANK_NOT_CERTIFIED("undefined: the rank of the absorbed fixed effects' dummies could not be certified exactly "
            + "with %s primes"),
    /** Detail: the iteration limit. */
    NOT_CONVERGED("not converged after %s iterations"),
    /** Detail: which rows are fitted at the boundary. */
    SEPARATION("separation: %s");

    private final String sentence;

    FitStatus(String sentence) {
        this.sentence = sentence;
    }

    /** The sentence with its detail filled in. */
    public String describe(String detail) {
        return sentence.contains("%s") ? String.format(sentence, detail) : sentence;
    }

    /** A status and its detail, as read back from a sentence this enum wrote. */
    public record Read(FitStatus status, String detail) {
    }

    /**
     * The status whose sentence {@code text} is, with the detail it was completed by.
     *
     * @throws IllegalArgumentException when no status writes that sentence
     */
    public static Read read(String text) {
        for (FitStatus s : values()) {
            int at = s.sentence.indexOf("%s");
            if (at < 0) {
                if (s.sentence.equals(text)) {
                    return new Read(s, "");
                }
                continue;
            }
            String head = s.sentence.substring(0, at);
            String tail = s.sentence.substring(at + 2);
            if (text.length() > head.length() + tail.length() && text.startsWith(head) && text.endsWith(tail)) {
                return new Read(s, text.substring(head.length(), text.length() - tail.length()));
            }
        }
        throw new IllegalArgumentException("not a status sentence: " + text);
    }
}
