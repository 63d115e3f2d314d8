package org.forkscape;

/**
 * A problem with what the user gave us (a data file, a plan, a command-line argument), described in a
 * sentence that names the file, line, field or JSON path. The command line prints the message alone and
 * exits with code 2; the web pages show it next to the field it concerns.
 */
public class InputException extends RuntimeException {
    private final String where;

    public InputException(String where, String message) {
        super(where == null || where.isEmpty() ? message : where + ": " + message);
        this.where = where == null ? "" : where;
    }

    /** Longest piece of the user's own text a message repeats; past it the text is cut. */
    public static final int MAX_ECHO = 60;

    /**
     * The user's text in double quotes, cut to {@value #MAX_ECHO} characters (with "..." and its full
     * length) so that a message never repeats an unbounded input.
     */
    public static String quoted(String text) {
        return "\"" + cut(text) + "\"";
    }

    /** The user's text cut as {@link #quoted} cuts it, without quotes (for keys in JSON paths). */
    public static String cut(String text) {
        if (text == null || text.length() <= MAX_ECHO) {
            return text;
        }
        return text.substring(0, MAX_ECHO) + String.format("... (%,d characters)", text.length());
    }

    /** The file, line, field or JSON path the problem is about ({@code ""} when it is about the whole input). */
    public String where() {
        return where;
    }

    /** The message without its location prefix. */
    public String problem() {
        String m = getMessage();
        return where.isEmpty() ? m : m.substring(where.length() + 2);
    }
}
