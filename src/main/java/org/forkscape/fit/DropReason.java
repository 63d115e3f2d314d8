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
}
