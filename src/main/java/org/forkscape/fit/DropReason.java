package org.forkscape.fit;

/** Why the QR refit dropped a column; its words go into the status note. */
enum DropReason {
    CONSTANT("constant in these rows"),
    FIXED_EFFECTS("collinear with the fixed effects"),
    OTHER_COLUMNS("collinear with the other columns");

    final String words;

    DropReason(String words) {
        this.words = words;
    }

    /**
     * The status note naming dropped columns by the words of their reason, in the order first seen:
     * "dropped a, b: constant in these rows; c: collinear with the other columns", or empty.
     */
    static String note(java.util.Map<String, java.util.List<String>> dropped) {
        if (dropped == null || dropped.isEmpty()) {
            return "";
        }
        StringBuilder b = new StringBuilder("dropped ");
        dropped.forEach((reason, cols) -> {
            if (b.length() > "dropped ".length()) {
                b.append("; ");
            }
            b.append(String.join(", ", cols)).append(": ").append(reason);
        });
        return b.toString();
    }
}
