package org.forkscape.check;

/** The outcome of one release rule. A rule that cannot be measured on a run fails, except where it says otherwise. */
public enum Verdict {
    PASS("pass"),
    FAIL("fail"),
    /** The rule concerns something the plan does not have (a reported specification): neither pass nor fail. */
    NOT_APPLICABLE("not applicable");

    private final String word;

    Verdict(String word) {
        this.word = word;
    }

    /** The verdict of a spelling in check.json; an unknown one is an {@code IllegalArgumentException}. */
    static Verdict named(String word) {
        for (Verdict v : values()) {
            if (v.word.equals(word)) {
                return v;
            }
        }
        throw new IllegalArgumentException("unknown result \"" + word + "\"");
    }

    /** The spelling in check.json and on the terminal. */
    public String word() {
        return word;
    }
}
