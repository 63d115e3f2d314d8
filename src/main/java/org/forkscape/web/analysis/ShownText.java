package org.forkscape.web.analysis;

/**
 * Text from the data as the data page shows it: a level or a column name of any length (a cell may hold
 * megabytes) is cut to its first {@value #MAX} characters, with an ellipsis and its full length, so that
 * the page stays a page. The JSON API keeps the text whole.
 */
final class ShownText {
    static final int MAX = 100;

    private ShownText() {
    }

    static String of(String text) {
        if (text.length() <= MAX) {
            return text;
        }
        int end = Character.isHighSurrogate(text.charAt(MAX - 1)) ? MAX - 1 : MAX;
        return text.substring(0, end) + String.format("\u2026 (%,d characters)", text.length());
    }
}
