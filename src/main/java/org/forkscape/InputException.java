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
