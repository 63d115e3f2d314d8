package org.forkscape.plan;

import java.util.ArrayList;
import java.util.LinkedHashSet;
import java.util.List;
import java.util.Optional;
import java.util.Set;
import org.forkscape.data.CategoricalColumn;
import org.forkscape.data.Column;
import org.forkscape.data.NumericColumn;
import org.forkscape.data.Table;

/**
 * A row filter written in a small, safe grammar. It can compare columns, numbers and double-quoted
 * strings and combine comparisons; it cannot call anything, so no plan can reach Java classes or files.
 *
 * <pre>
 * expr       := and ("or" and)*
 * and        := unary ("and" unary)*
 * unary      := "not" unary | "(" expr ")" | comparison
 * comparison := value ("==" | "!=" | "&lt;" | "&lt;=" | "&gt;" | "&gt;=") value
 * value      := identifier | `any name` | number | "string"
 * </pre>
 * {@code not} binds tighter than {@code and}, and {@code and} tighter than {@code or}, as in most
 * query languages (common practice). Inside backquotes and double quotes a backslash escapes the next
 * character. Text compares only with {@code ==} and {@code !=}; numbers with all six operators. A row
 * where any column the expression names is missing is not kept, whatever the rest of the expression says.
 */
public final class RowExpression {
    /** Longer expressions and deeper nesting are refused rather than risk the parser's stack. */
    static final int MAX_LENGTH = 10_000;
    static final int MAX_DEPTH = 64;
    /** How much of a long expression a message repeats. */
    private static final int ECHO = 80;

    private final String source;
    private final Node root;
    private final Set<String> columns;

    private RowExpression(String source, Node root, Set<String> columns) {
        this.source = source;
        this.root = root;
        this.columns = columns;
    }

    /** Parses {@code text}; a syntax error becomes a {@link PlanException} at {@code path} with the position. */
    public static RowExpression parse(String text, String path) {
        if (text.length() > MAX_LENGTH) {
            throw new PlanException(path, String.format("the expression has %,d characters; at most %,d are accepted",
                    text.length(), MAX_LENGTH));
        }
        Parser p = new Parser(text, path);
        Node root = p.expression(0);
        if (p.peek().kind != TokenKind.END) {
            throw p.error("unexpected " + p.peek().describe() + p.hintAfterComplete());
        }
        return new RowExpression(text, root, p.columns);
    }

    public String source() {
        return source;
    }

    /** Every column the expression names, in order of first mention. */
    public Set<String> columns() {
        return columns;
    }

    /**
     * A predicate over rows of {@code table}; unknown columns (with the nearest name), type mismatches and
     * text values that are not levels of their column are reported at {@code path}.
     */
    public RowPredicate bind(Table table, String path) {
        List<Column> used = new ArrayList<>();
        for (String name : columns) {
            Optional<Column> c = table.find(name);
            if (c.isEmpty()) {
                String hint = table.nearestName(name).map(n -> "; did you mean \"" + n + "\"?").orElse("");
                throw new PlanException(path, "the expression names \"" + name + "\", which is not a column of "
                        + table.source() + hint);
            }
            used.add(c.get());
        }
        BoolEval eval = root.bind(table, path);
        Column[] needed = used.toArray(new Column[0]);
        return row -> {
            for (Column c : needed) {
                if (c.isMissing(row)) {
                    return false;
                }
            }
            return eval.test(row);
        };
    }

    /** Whether a row is kept. */
    @FunctionalInterface
    public interface RowPredicate {
        boolean keep(int row);
    }

    @FunctionalInterface
    private interface BoolEval {
        boolean test(int row);
    }

    private sealed interface Node permits AnyOf, AllOf, Not, Compare {
        BoolEval bind(Table t, String path);
    }

    /** A chain of {@code or}, kept flat so that a long chain does not nest the evaluation. */
    private record AnyOf(List<Node> terms) implements Node {
        public BoolEval bind(Table t, String path) {
            BoolEval[] e = terms.stream().map(n -> n.bind(t, path)).toArray(BoolEval[]::new);
            return row -> {
                for (BoolEval x : e) {
                    if (x.test(row)) {
                        return true;
                    }
                }
                return false;
            };
        }
    }

    /** A chain of {@code and}, kept flat. */
    private record AllOf(List<Node> terms) implements Node {
        public BoolEval bind(Table t, String path) {
            BoolEval[] e = terms.stream().map(n -> n.bind(t, path)).toArray(BoolEval[]::new);
            return row -> {
                for (BoolEval x : e) {
                    if (!x.test(row)) {
                        return false;
                    }
                }
                return true;
            };
        }
    }

    private record Not(Node inner) implements Node {
        public BoolEval bind(Table t, String path) {
            BoolEval i = inner.bind(t, path);
            return row -> !i.test(row);
        }
    }

    private enum Op {
        EQ("=="), NE("!="), LT("<"), LE("<="), GT(">"), GE(">=");

        final String text;

        Op(String text) {
            this.text = text;
        }

        static Op of(String text) {
            for (Op o : values()) {
                if (o.text.equals(text)) {
                    return o;
                }
            }
            throw new IllegalArgumentException(text);
        }

        /** Plain IEEE comparison, so that -0 equals 0; values are never NaN (missing rows are not kept). */
        boolean holds(double a, double b) {
            return switch (this) {
                case EQ -> a == b;
                case NE -> a != b;
                case LT -> a < b;
                case LE -> a <= b;
                case GT -> a > b;
                case GE -> a >= b;
            };
        }
    }

    private sealed interface Value permits ColumnRef, NumberValue, TextValue {
        /** As written in the expression, for messages. */
        String written();
    }

    private record ColumnRef(String name, String written) implements Value {
    }

    private record NumberValue(double value, String written) implements Value {
    }

    private record TextValue(String value, String written) implements Value {
    }

    @FunctionalInterface
    private interface NumberAt {
        double at(int row);
    }

    /** A comparison; {@code position} is the 1-based character where it starts, for messages. */
    private record Compare(Value left, Op op, Value right, int position) implements Node {
        public BoolEval bind(Table t, String path) {
            boolean leftText = isText(left, t);
            boolean rightText = isText(right, t);
            String here = "\"" + left.written() + " " + op.text + " " + right.written() + "\" (at character "
                    + position + ")";
            if (leftText != rightText) {
                Value text = leftText ? left : right;
                throw new PlanException(path, here + " compares text with a number" + typeHint(text, t));
            }
            if (leftText) {
                if (op != Op.EQ && op != Op.NE) {
                    throw new PlanException(path, here + ": text can only be compared with == or !=, not " + op.text);
                }
                return textComparison(t, path, here);
            }
            NumberAt l = number(left, t);
            NumberAt r = number(right, t);
            Op o = op;
            return row -> o.holds(l.at(row), r.at(row));
        }

        private static String typeHint(Value text, Table t) {
            if (text instanceof TextValue s) {
                return "; write a number without quotes";
            }
            Column c = t.column(((ColumnRef) text).name());
            String why = PlanChecker.whyText(c);
            return why.isEmpty() ? "; \"" + c.name() + "\" is categorical, so compare it with a quoted level"
                    : "; \"" + c.name() + "\" is categorical" + why;
        }

        /**
         * Text comparisons work on level codes: a quoted value is looked up once among the column's levels,
         * and one that is not a level is refused, since it would match no row (most likely a typing error).
         */
        private BoolEval textComparison(Table t, String path, String here) {
            boolean equal = op == Op.EQ;
            if (left instanceof TextValue a && right instanceof TextValue b) {
                boolean same = a.value().equals(b.value());
                return row -> same == equal;
            }
            if (left instanceof ColumnRef a && right instanceof ColumnRef b) {
                CategoricalColumn ca = (CategoricalColumn) t.column(a.name());
                CategoricalColumn cb = (CategoricalColumn) t.column(b.name());
                int[] codesA = ca.codes();
                int[] codesB = cb.codes();
                List<String> levelsA = ca.levels();
                List<String> levelsB = cb.levels();
                return row -> levelsA.get(codesA[row]).equals(levelsB.get(codesB[row])) == equal;
            }
            ColumnRef column = (ColumnRef) (left instanceof ColumnRef ? left : right);
            TextValue text = (TextValue) (left instanceof TextValue ? left : right);
            CategoricalColumn c = (CategoricalColumn) t.column(column.name());
            int code = c.levels().indexOf(text.value());
            if (code < 0) {
                throw new PlanException(path, here + ": " + text.written() + " is not a value of \"" + c.name()
                        + "\"" + nearestLevel(text.value(), c.levels()));
            }
            int[] codes = c.codes();
            return row -> (codes[row] == code) == equal;
        }

        private static String nearestLevel(String value, List<String> levels) {
            String best = null;
            int bestDistance = Integer.MAX_VALUE;
            for (String l : levels) {
                int d = Table.editDistance(value.toLowerCase(), l.toLowerCase());
                if (d < bestDistance) {
                    bestDistance = d;
                    best = l;
                }
            }
            if (best != null && bestDistance <= Math.max(2, value.length() / 2)) {
                return "; did you mean \"" + best + "\"?";
            }
            if (levels.size() <= 10) {
                return "; its values are " + String.join(", ", levels.stream().map(l -> "\"" + l + "\"").toList());
            }
            return "";
        }

        private static boolean isText(Value v, Table t) {
            return v instanceof TextValue
                    || v instanceof ColumnRef c && t.column(c.name()) instanceof CategoricalColumn;
        }

        private static NumberAt number(Value v, Table t) {
            if (v instanceof NumberValue n) {
                double value = n.value();
                return row -> value;
            }
            double[] values = ((NumericColumn) t.column(((ColumnRef) v).name())).values();
            return row -> values[row];
        }
    }

    private enum TokenKind { IDENT, QUOTED_NAME, NUMBER, STRING, OP, LPAREN, RPAREN, AND, OR, NOT, END }

    /** A token; {@code position} is 0-based, {@code raw} the characters as written. */
    private record Token(TokenKind kind, String text, String raw, int position) {
        String describe() {
            return kind == TokenKind.END ? "end of expression" : "\"" + raw + "\" at character " + (position + 1);
        }
    }

    private static final class Parser {
        private final String text;
        private final String path;
        private final List<Token> tokens;
        private final Set<String> columns = new LinkedHashSet<>();
        private int next;

        Parser(String text, String path) {
            this.text = text;
            this.path = path;
            this.tokens = tokenize();
        }

        Token peek() {
            return tokens.get(next);
        }

        PlanException error(String what) {
            String shown = text.length() <= ECHO ? text : text.substring(0, ECHO) + "...";
            return new PlanException(path, "cannot read the expression \"" + shown + "\": " + what);
        }

        /** Why a token can follow a complete expression only by mistake. */
        String hintAfterComplete() {
            Token t = peek();
            if (t.kind == TokenKind.OP) {
                return "; comparisons do not chain: write 1 < x and x < 3, not 1 < x < 3";
            }
            if (t.kind == TokenKind.RPAREN) {
                return "; it closes no \"(\"";
            }
            if (t.kind == TokenKind.IDENT && Set.of("and", "or", "not").contains(t.text.toLowerCase())) {
                return "; write and, or, not in lower case";
            }
            return "; join comparisons with and or or";
        }

        Node expression(int depth) {
            if (depth > MAX_DEPTH) {
                throw error("it nests more than " + MAX_DEPTH + " levels deep");
            }
            List<Node> terms = new ArrayList<>();
            terms.add(conjunction(depth));
            while (peek().kind == TokenKind.OR) {
                next++;
                terms.add(conjunction(depth));
            }
            return terms.size() == 1 ? terms.get(0) : new AnyOf(List.copyOf(terms));
        }

        private Node conjunction(int depth) {
            List<Node> terms = new ArrayList<>();
            terms.add(unary(depth));
            while (peek().kind == TokenKind.AND) {
                next++;
                terms.add(unary(depth));
            }
            return terms.size() == 1 ? terms.get(0) : new AllOf(List.copyOf(terms));
        }

        private Node unary(int depth) {
            if (depth > MAX_DEPTH) {
                throw error("it nests more than " + MAX_DEPTH + " levels deep");
            }
            Token t = peek();
            if (t.kind == TokenKind.NOT) {
                next++;
                return new Not(unary(depth + 1));
            }
            if (t.kind == TokenKind.LPAREN) {
                next++;
                Node inner = expression(depth + 1);
                if (peek().kind != TokenKind.RPAREN) {
                    throw error("expected \")\" to close the \"(\" at character " + (t.position + 1) + " but found "
                            + peek().describe());
                }
                next++;
                return inner;
            }
            Value left = value();
            Token op = peek();
            if (op.kind != TokenKind.OP) {
                throw error("expected a comparison (==, !=, <, <=, >, >=) after " + left.written() + " but found "
                        + op.describe());
            }
            next++;
            Value right = value();
            return new Compare(left, Op.of(op.text), right, t.position + 1);
        }

        private Value value() {
            Token t = peek();
            switch (t.kind) {
                case IDENT, QUOTED_NAME -> {
                    next++;
                    columns.add(t.text);
                    return new ColumnRef(t.text, t.raw);
                }
                case NUMBER -> {
                    next++;
                    return new NumberValue(Double.parseDouble(t.text), t.raw);
                }
                case STRING -> {
                    next++;
                    return new TextValue(t.text, t.raw);
                }
                default -> throw error("expected a column, number or \"text\" but found " + t.describe());
            }
        }

        private List<Token> tokenize() {
            List<Token> out = new ArrayList<>();
            int i = 0;
            int n = text.length();
            while (i < n) {
                char c = text.charAt(i);
                if (Character.isWhitespace(c)) {
                    i++;
                } else if (c == '(') {
                    out.add(new Token(TokenKind.LPAREN, "(", "(", i++));
                } else if (c == ')') {
                    out.add(new Token(TokenKind.RPAREN, ")", ")", i++));
                } else if (c == '=' || c == '!' || c == '<' || c == '>') {
                    int start = i;
                    boolean two = i + 1 < n && text.charAt(i + 1) == '=';
                    String op = text.substring(i, i + (two ? 2 : 1));
                    if (op.equals("=") || op.equals("!")) {
                        throw error("\"" + op + "\" at character " + (start + 1) + " is not an operator; use "
                                + (op.equals("=") ? "== to compare" : "!= to compare or not to negate"));
                    }
                    out.add(new Token(TokenKind.OP, op, op, start));
                    i += op.length();
                } else if (c == '"' || c == '`') {
                    i = quoted(out, i, c);
                } else if (Character.isDigit(c) || c == '.' || ((c == '-' || c == '+') && i + 1 < n
                        && (Character.isDigit(text.charAt(i + 1)) || text.charAt(i + 1) == '.'))) {
                    i = number(out, i);
                } else if (Character.isLetter(c) || c == '_') {
                    int start = i;
                    while (i < n && (Character.isLetterOrDigit(text.charAt(i)) || text.charAt(i) == '_'
                            || text.charAt(i) == '.')) {
                        i++;
                    }
                    String word = text.substring(start, i);
                    TokenKind kind = switch (word) {
                        case "and" -> TokenKind.AND;
                        case "or" -> TokenKind.OR;
                        case "not" -> TokenKind.NOT;
                        default -> TokenKind.IDENT;
                    };
                    out.add(new Token(kind, word, word, start));
                } else {
                    throw error(unexpectedCharacter(i));
                }
            }
            out.add(new Token(TokenKind.END, "", "", n));
            return out;
        }

        private int quoted(List<Token> out, int from, char quote) {
            int n = text.length();
            int i = from + 1;
            StringBuilder b = new StringBuilder();
            while (i < n && text.charAt(i) != quote) {
                if (text.charAt(i) == '\\' && i + 1 < n) {
                    i++;
                }
                b.append(text.charAt(i++));
            }
            if (i >= n) {
                throw error("the " + (quote == '"' ? "text" : "name") + " opened by the " + quote + " at character "
                        + (from + 1) + " is never closed");
            }
            i++;
            if (quote == '`' && b.length() == 0) {
                throw error("the backquotes at character " + (from + 1) + " hold no column name");
            }
            out.add(new Token(quote == '"' ? TokenKind.STRING : TokenKind.QUOTED_NAME, b.toString(),
                    text.substring(from, i), from));
            return i;
        }

        private int number(List<Token> out, int from) {
            int n = text.length();
            int i = from + 1;
            while (i < n && (Character.isDigit(text.charAt(i)) || text.charAt(i) == '.'
                    || text.charAt(i) == 'e' || text.charAt(i) == 'E'
                    || ((text.charAt(i) == '-' || text.charAt(i) == '+')
                        && (text.charAt(i - 1) == 'e' || text.charAt(i - 1) == 'E')))) {
                i++;
            }
            String number = text.substring(from, i);
            boolean ok = number.matches("[-+]?(\\d+\\.?\\d*|\\.\\d+)([eE][-+]?\\d+)?");
            if (!ok) {
                throw error("\"" + number + "\" at character " + (from + 1) + " is not a number");
            }
            if (!Double.isFinite(Double.parseDouble(number))) {
                throw error("\"" + number + "\" at character " + (from + 1) + " is too large for a number");
            }
            out.add(new Token(TokenKind.NUMBER, number, number, from));
            return i;
        }

        private String unexpectedCharacter(int i) {
            int cp = text.codePointAt(i);
            boolean loneSurrogate = cp >= Character.MIN_SURROGATE && cp <= Character.MAX_SURROGATE;
            String shown = Character.isISOControl(cp) || loneSurrogate ? String.format("U+%04X", cp)
                    : "\"" + new String(Character.toChars(cp)) + "\"";
            String hint = switch (cp) {
                case '&' -> "; write and";
                case '|' -> "; write or";
                case '\'' -> "; text goes in double quotes, column names with odd characters in backquotes";
                default -> "; a column name with such characters goes in backquotes, as in `my column`";
            };
            return "unexpected character " + shown + " at character " + (i + 1) + hint;
        }
    }
}
