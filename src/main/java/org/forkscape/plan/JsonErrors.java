package org.forkscape.plan;

import java.util.regex.Matcher;
import java.util.regex.Pattern;
import org.forkscape.InputException;

/**
 * The JSON parser's messages in the words of someone who edits a plan by hand. The parser's own
 * wording speaks of tokens, features and character codes; the common slips (a trailing comma, single
 * quotes, a missing comma, a comment, an unclosed bracket) get a sentence that says what to change.
 */
final class JsonErrors {
    private static final Pattern NESTING = Pattern.compile("maximum allowed \\((\\d+)");
    private static final Pattern DUPLICATE = Pattern.compile("Duplicate Object property \"(.*)\"");
    private static final Pattern UNRECOGNIZED = Pattern.compile("Unrecognized token '(.*?)'");

    private JsonErrors() {
    }

    static String plain(String message) {
        String m = message == null ? "" : message;
        Matcher nesting = NESTING.matcher(m);
        if (m.contains("nesting depth") && nesting.find()) {
            return "it nests lists and objects more than " + nesting.group(1) + " levels deep";
        }
        Matcher duplicate = DUPLICATE.matcher(m);
        if (duplicate.find()) {
            return "the key \"" + duplicate.group(1) + "\" appears twice in the same object";
        }
        if (m.startsWith("Unexpected character ('}'") && m.contains("start property name")) {
            return "a comma before \"}\" has nothing after it (JSON allows no trailing comma)";
        }
        if (m.startsWith("Unexpected character (']'")) {
            return "a comma before \"]\" has nothing after it (JSON allows no trailing comma)";
        }
        if (m.startsWith("Unexpected character (''' ")) {
            return "JSON writes keys and text in double quotes, not single quotes";
        }
        if (m.contains("comment")) {
            return "JSON allows no comments; put notes in \"description\"";
        }
        if (m.contains("start property name")) {
            return "expected a key in double quotes";
        }
        if (m.contains("comma to separate Object entries") || m.contains("comma to separate Array entries")) {
            return "a comma is missing between two entries";
        }
        if (m.startsWith("Trailing token")) {
            return "there is more text after the plan's closing \"}\"";
        }
        if (m.startsWith("Unexpected end-of-input")) {
            return "the text ends before every \"{\" and \"[\" is closed";
        }
        if (m.contains("Leading zeroes")) {
            return "a number cannot start with 0 (write 1, not 01)";
        }
        if (m.contains("Non-standard token")) {
            return "NaN and Infinity are not JSON numbers";
        }
        if (m.contains("CTRL-CHAR")) {
            return "a line break or control character inside a string must be escaped, as in \\n";
        }
        Matcher unrecognized = UNRECOGNIZED.matcher(m);
        if (unrecognized.find()) {
            return InputException.quoted(unrecognized.group(1)) + " is not a JSON value; text goes in double quotes";
        }
        int cut = m.indexOf(" (start marker");
        return cut > 0 ? m.substring(0, cut) : m;
    }
}
