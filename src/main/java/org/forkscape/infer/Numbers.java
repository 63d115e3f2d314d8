package org.forkscape.infer;

/** Number cells of the inference CSV files: the shortest decimal that reads back exactly; empty for NaN. */
final class Numbers {
    private Numbers() {
    }

    static String cell(double v) {
        if (!Double.isFinite(v)) {
            return "";
        }
        if (v == Math.rint(v) && Math.abs(v) < 1e15) {
            return Long.toString((long) v);
        }
        return Double.toString(v);
    }
}
