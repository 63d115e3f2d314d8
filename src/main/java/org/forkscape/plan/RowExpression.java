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
 * A row where any referenced column is missing is not kept.
 */
public final class RowExpression {
    /** Longer expressions and deeper nesting are refused rather than risk the parser's stack. */
    static final int MAX_LENGTH = 10_000;
    static final int MAX_DEPTH = 64;

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
            throw new PlanException(path, "the expression is longer than " + MAX_LENGTH + " characters");
        }
        Parser p = new Parser(text, path);
        Node root = p.expression(0);
        if (p.peek().kind != TokenKind.END) {
            throw p.error("unexpected " + p.peek().describe());
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

    /** A predicate over rows of {@code table}; type mismatches and unknown columns are reported at {@code path}. */
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

    private sealed interface Node permits Or, And, Not, Compare {
        BoolEval bind(Table t, String path);
    }

    private record Or(Node left, Node right) implements Node {
        public BoolEval bind(Table t, String path) {
            BoolEval l = left.bind(t, path);
            BoolEval r = right.bind(t, path);
            return row -> l.test(row) || r.test(row);
        }
    }

    private record And(Node left, Node right) implements Node {
        public BoolEval bind(Table t, String path) {
            BoolEval l = left.bind(t, path);
            BoolEval r = right.bind(t, path);
            return row -> l.test(row) && r.test(row);
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

        boolean holds(int cmp) {
            return switch (this) {
                case EQ -> cmp == 0;
                case NE -> cmp != 0;
                case LT -> cmp < 0;
                case LE -> cmp <= 0;
                case GT -> cmp > 0;
                case GE -> cmp >= 0;
            };
        }
    }

    private sealed interface Value permits ColumnRef, NumberValue, TextValue {
    }

    private record ColumnRef(String name) implements Value {
    }

    private record NumberValue(double value) implements Value {
    }

    private record TextValue(String value) implements Value {
    }

    @FunctionalInterface
    private interface NumberAt {
        double at(int row);
    }

    @FunctionalInterface
    private interface TextAt {
        String at(int row);
    }

    private record Compare(Value left, Op op, Value right) implements Node {
        public BoolEval bind(Table t, String path) {
            boolean leftText = isText(left, t);
            boolean rightText = isText(right, t);
            if (leftText != rightText) {
                throw new PlanException(path, "\"" + describe(left) + " " + op.text + " " + describe(right)
                        + "\" compares text with a number");
            }
            if (leftText) {
                if (op != Op.EQ && op != Op.NE) {
                    throw new PlanException(path, "text can only be compared with == or !=, not " + op.text);
                }
                TextAt l = text(left, t);
                TextAt r = text(right, t);
                return op == Op.EQ ? row -> l.at(row).equals(r.at(row)) : row -> !l.at(row).equals(r.at(row));
            }
            NumberAt l = number(left, t);
            NumberAt r = number(right, t);
            Op o = op;
            return row -> o.holds(Double.compare(l.at(row), r.at(row)));
        }

        private static boolean isText(Value v, Table t) {
            return v instanceof TextValue
                    || v instanceof ColumnRef c && t.column(c.name()) instanceof CategoricalColumn;
        }

        private static TextAt text(Value v, Table t) {
            if (v instanceof TextValue s) {
                String value = s.value();
                return row -> value;
            }
            CategoricalColumn c = (CategoricalColumn) t.column(((ColumnRef) v).name());
            int[] codes = c.codes();
            List<String> levels = c.levels();
            return row -> levels.get(codes[row]);
        }

        private static NumberAt number(Value v, Table t) {
            if (v instanceof NumberValue n) {
                double value = n.value();
                return row -> value;
            }
            double[] values = ((NumericColumn) t.column(((ColumnRef) v).name())).values();
            return row -> values[row];
        }

        private static String describe(Value v) {
            if (v instanceof ColumnRef c) {
                return c.name();
            }
            if (v instanceof NumberValue n) {
                return Double.toString(n.value());
            }
            return "\"" + ((TextValue) v).value() + "\"";
        }
    }

    private enum TokenKind { IDENT, QUOTED_NAME, NUMBER, STRING, OP, LPAREN, RPAREN, AND, OR, NOT, END }

    private record Token(TokenKind kind, String text, int position) {
        String describe() {
            return kind == TokenKind.END ? "end of expression" : "\"" + text + "\" at character " + (position + 1);
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
            return new PlanException(path, "cannot read the expression \"" + text + "\": " + what);
        }

        Node expression(int depth) {
            if (depth > MAX_DEPTH) {
                throw error("it nests more than " + MAX_DEPTH + " levels deep");
            }
            Node left = conjunction(depth);
            while (peek().kind == TokenKind.OR) {
                next++;
                left = new Or(left, conjunction(depth));
            }
            return left;
        }

        private Node conjunction(int depth) {
            Node left = unary(depth);
            while (peek().kind == TokenKind.AND) {
                next++;
                left = new And(left, unary(depth));
            }
            return left;
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
                    throw error("expected \")\" but found " + peek().describe());
                }
                next++;
                return inner;
            }
            Value left = value();
            Token op = peek();
            if (op.kind != TokenKind.OP) {
                throw error("expected a comparison (==, !=, <, <=, >, >=) but found " + op.describe());
            }
            next++;
            Value right = value();
            return new Compare(left, Op.valueOf(opName(op.text)), right);
        }

        private static String opName(String op) {
            return switch (op) {
                case "==" -> "EQ";
                case "!=" -> "NE";
                case "<" -> "LT";
                case "<=" -> "LE";
                case ">" -> "GT";
                default -> "GE";
            };
        }

        private Value value() {
            Token t = peek();
            switch (t.kind) {
                case IDENT, QUOTED_NAME -> {
                    next++;
                    columns.add(t.text);
                    return new ColumnRef(t.text);
                }
                case NUMBER -> {
                    next++;
                    return new NumberValue(Double.parseDouble(t.text));
                }
                case STRING -> {
                    next++;
                    return new TextValue(t.text);
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
                    out.add(new Token(TokenKind.LPAREN, "(", i++));
                } else if (c == ')') {
                    out.add(new Token(TokenKind.RPAREN, ")", i++));
                } else if (c == '=' || c == '!' || c == '<' || c == '>') {
                    int start = i;
                    boolean two = i + 1 < n && text.charAt(i + 1) == '=';
                    String op = text.substring(i, i + (two ? 2 : 1));
                    if (op.equals("=") || op.equals("!")) {
                        throw error("\"" + op + "\" at character " + (start + 1) + " is not an operator; use == or !=");
                    }
                    out.add(new Token(TokenKind.OP, op, start));
                    i += op.length();
                } else if (c == '"' || c == '`') {
                    int start = i++;
                    StringBuilder b = new StringBuilder();
                    while (i < n && text.charAt(i) != c) {
                        if (text.charAt(i) == '\\' && i + 1 < n) {
                            i++;
                        }
                        b.append(text.charAt(i++));
                    }
                    if (i >= n) {
                        throw error("the " + (c == '"' ? "text" : "name") + " opened at character " + (start + 1)
                                + " is never closed");
                    }
                    i++;
                    out.add(new Token(c == '"' ? TokenKind.STRING : TokenKind.QUOTED_NAME, b.toString(), start));
                } else if (Character.isDigit(c) || c == '.' || ((c == '-' || c == '+') && i + 1 < n
                        && (Character.isDigit(text.charAt(i + 1)) || text.charAt(i + 1) == '.'))) {
                    int start = i++;
                    while (i < n && (Character.isDigit(text.charAt(i)) || text.charAt(i) == '.'
                            || text.charAt(i) == 'e' || text.charAt(i) == 'E'
                            || ((text.charAt(i) == '-' || text.charAt(i) == '+')
                                && (text.charAt(i - 1) == 'e' || text.charAt(i - 1) == 'E')))) {
                        i++;
                    }
                    String number = text.substring(start, i);
                    try {
                        double v = Double.parseDouble(number);
                        if (!Double.isFinite(v)) {
                            throw new NumberFormatException();
                        }
                    } catch (NumberFormatException e) {
                        throw error("\"" + number + "\" at character " + (start + 1) + " is not a number");
                    }
                    out.add(new Token(TokenKind.NUMBER, number, start));
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
                    out.add(new Token(kind, word, start));
                } else {
                    throw error("unexpected character \"" + c + "\" at character " + (i + 1));
                }
            }
            out.add(new Token(TokenKind.END, "", n));
            return out;
        }
    }
}
