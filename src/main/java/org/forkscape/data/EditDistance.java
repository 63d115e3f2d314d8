package org.forkscape.data;

/** Levenshtein distance (Levenshtein 1966, Soviet Physics Doklady 10(8)), for "did you mean" suggestions. */
final class EditDistance {
    private EditDistance() {
    }

    static int between(String a, String b) {
        int[] previous = new int[b.length() + 1];
        int[] current = new int[b.length() + 1];
        for (int j = 0; j <= b.length(); j++) {
            previous[j] = j;
        }
        for (int i = 1; i <= a.length(); i++) {
            current[0] = i;
            for (int j = 1; j <= b.length(); j++) {
                int substitution = previous[j - 1] + (a.charAt(i - 1) == b.charAt(j - 1) ? 0 : 1);
                current[j] = Math.min(substitution, Math.min(previous[j], current[j - 1]) + 1);
            }
            int[] t = previous;
            previous = current;
            current = t;
        }
        return previous[b.length()];
    }
}
