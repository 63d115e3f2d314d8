package org.forkscape.plan;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTimeoutPreemptively;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.junit.jupiter.api.Assertions.fail;

import java.io.ByteArrayInputStream;
import java.nio.charset.StandardCharsets;
import java.time.Duration;
import java.util.List;
import java.util.SplittableRandom;
import java.util.function.Function;
import org.forkscape.data.CategoricalColumn;
import org.forkscape.data.CsvTableReader;
import org.forkscape.data.NumericColumn;
import org.forkscape.data.Table;
import org.junit.jupiter.api.Test;

/**
 * Seeded random expressions: every input either parses, binds and evaluates, or raises a
 * {@link PlanException} at the field's path; nothing else is ever thrown. Expressions built from the
 * grammar are also evaluated by a plain tree walk written here and must keep the same rows. The
 * timeout on each batch only detects a hang; it is far above the time a batch takes.
 */
class RowExpressionFuzzTest {
    private static final int CASES_PER_BATCH = 5_000;
    private static final Duration HANG = Duration.ofMinutes(2);
    private static final String PATH = "decisions[2].alternatives[0].keep";
    private static final Table T = new CsvTableReader().read(new ByteArrayInputStream((
            "a,b,region,`q` col\n"
                    + "0,1.5,north,1\n1,-2,south,2\n2,0,east,NA\n3,1e3,north,4\n,7,south,5\nNA,-0,,6\n"
                    + "5,2,east,7\n6,NaN,north,8\n").getBytes(StandardCharsets.UTF_8)), "t.csv");
    private static final String[] NUMERIC = {"a", "b", "`\\`q\\` col`"};
    private static final String[] NUMERIC_NAMES = {"a", "b", "`q` col"};
    private static final String[] LEVELS = {"north", "south", "east"};
    private static final String PIECES = "ab()<>=!\"`. -1e";
    private static final String INSERTS = "()\"`=<>!andornot 1.e-\\";
    private static final String[] OPS = {"==", "!=", "<", "<=", ">", ">="};
    private static final String[] VALUES = {"a", "b", "1", "-2.5", "1e3", "`q` col", "(a", "not b"};
    private static final String[] CONNECTIVES = {"and", "or", ") and", "and not"};
    private static final String[] VOCABULARY = {"a", "b", "region", "`q` col", "`", "\"", "\"north\"", "(", ")", "and",
            "or", "not", "AND", "==", "=", "!=", "!", "<", "<=", ">", ">=", "=>", "1", "-1", "1e3", "1e", ".5", ".", "1.2.3",
            "1e999", "&&", "||", "'", "\\", " ", "\t", "\n", "#", "é", "\u0000", "\uD800", "😀", "x.y", "_z", "-", "+"};

    /**
     * A node of a generated expression: its text, its meaning on a row, and how loosely it binds (0 for
     * an or-chain, 1 for an and-chain, 2 for a comparison, negation or parenthesis). An operand that binds
     * more loosely than its operator is put in parentheses, so the text means what the tree means only if
     * the parser gets precedence right.
     */
    private record Gen(String text, Function<Integer, Boolean> holds, int binding) {
        Gen(String text, Function<Integer, Boolean> holds) {
            this(text, holds, 2);
        }

        String operand(int operator) {
            return binding < operator ? "(" + text + ")" : text;
        }
    }

    @Test
    void grammarBuiltExpressionsKeepTheRowsATreeWalkKeeps() {
        assertTimeoutPreemptively(HANG, () -> {
            SplittableRandom random = new SplittableRandom(20_240_601L);
            for (int i = 0; i < CASES_PER_BATCH; i++) {
                Gen g = expression(random, 0);
                RowExpression.RowPredicate p = bindOrFail(g.text());
                for (int row = 0; row < T.rowCount(); row++) {
                    boolean expected = !touchesMissing(g.text(), row) && g.holds().apply(row);
                    assertEquals(expected, p.keep(row), g.text() + " on row " + row);
                }
            }
        });
    }

    @Test
    void tokenSoupParsesOrGivesAPlanError() {
        assertTimeoutPreemptively(HANG, () -> {
            SplittableRandom random = new SplittableRandom(7);
            int usable = 0;
            for (int i = 0; i < CASES_PER_BATCH; i++) {
                // mostly the token the grammar expects next (value, operator, value, connective, ...),
                // sometimes any token, so that both usable and broken expressions come out
                StringBuilder b = new StringBuilder();
                int n = 1 + random.nextInt(14);
                for (int k = 0; k < n; k++) {
                    String[] expected = k % 4 == 1 ? OPS : k % 4 == 3 ? CONNECTIVES : VALUES;
                    String[] from = random.nextInt(10) < 8 ? expected : VOCABULARY;
                    b.append(from[random.nextInt(from.length)]);
                    if (random.nextInt(3) > 0) {
                        b.append(' ');
                    }
                }
                usable += survive(b.toString()) ? 1 : 0;
            }
            assertBothOutcomes(usable);
        });
    }

    @Test
    void randomCharactersParseOrGiveAPlanError() {
        assertTimeoutPreemptively(HANG, () -> {
            SplittableRandom random = new SplittableRandom(11);
            for (int i = 0; i < CASES_PER_BATCH; i++) {
                StringBuilder b = new StringBuilder();
                int n = random.nextInt(40);
                for (int k = 0; k < n; k++) {
                    int kind = random.nextInt(4);
                    b.append(kind == 0 ? (char) random.nextInt(0x10000)
                            : kind == 1 ? (char) random.nextInt(32, 127)
                            : kind == 2 ? PIECES.charAt(random.nextInt(PIECES.length())) : ' ');
                }
                survive(b.toString());
            }
        });
    }

    @Test
    void mutatedExpressionsParseOrGiveAPlanError() {
        assertTimeoutPreemptively(HANG, () -> {
            SplittableRandom random = new SplittableRandom(13);
            int usable = 0;
            for (int i = 0; i < CASES_PER_BATCH; i++) {
                StringBuilder b = new StringBuilder(expression(random, 0).text());
                int edits = 1 + random.nextInt(4);
                for (int e = 0; e < edits && b.length() > 0; e++) {
                    int at = random.nextInt(b.length());
                    switch (random.nextInt(3)) {
                        case 0 -> b.deleteCharAt(at);
                        case 1 -> b.insert(at, INSERTS.charAt(random.nextInt(INSERTS.length())));
                        default -> b.insert(at, b.charAt(random.nextInt(b.length())));
                    }
                }
                usable += survive(b.toString()) ? 1 : 0;
            }
            assertBothOutcomes(usable);
        });
    }

    @Test
    void deepAndLongInputsAreRefusedCleanly() {
        assertTimeoutPreemptively(HANG, () -> {
            SplittableRandom random = new SplittableRandom(17);
            for (int i = 0; i < 200; i++) {
                int depth = random.nextInt(1, 5_000);
                String open = random.nextBoolean() ? "(" : "not ";
                survive(open.repeat(depth) + "a == 1" + (open.equals("(") ? ")".repeat(random.nextInt(depth + 1)) : ""));
                survive("a == 1 or ".repeat(random.nextInt(1, 1_100)) + "b > 0");
            }
        });
    }

    /** Parses, binds and evaluates; true when the text was a usable expression. */
    private static boolean survive(String text) {
        try {
            RowExpression.RowPredicate p = RowExpression.parse(text, PATH).bind(T, PATH);
            for (int row = 0; row < T.rowCount(); row++) {
                p.keep(row);
            }
            return true;
        } catch (PlanException e) {
            assertEquals(PATH, e.where(), text);
            assertFalse(e.problem().isBlank(), text);
            return false;
        } catch (RuntimeException | StackOverflowError e) {
            fail("input " + quoted(text) + " threw " + e, e);
            return false;
        }
    }

    /** The generator is useful only if it makes both usable and broken expressions in fair numbers. */
    private static void assertBothOutcomes(int usable) {
        assertTrue(usable > CASES_PER_BATCH / 50, usable + " usable");
        assertTrue(CASES_PER_BATCH - usable > CASES_PER_BATCH / 50, (CASES_PER_BATCH - usable) + " refused");
    }

    private static RowExpression.RowPredicate bindOrFail(String text) {
        try {
            return RowExpression.parse(text, PATH).bind(T, PATH);
        } catch (RuntimeException e) {
            throw new AssertionError("grammar-built " + quoted(text) + " threw " + e, e);
        }
    }

    private static String quoted(String text) {
        StringBuilder b = new StringBuilder("\"");
        text.chars().forEach(c -> b.append(c < 32 || c > 126 ? String.format("\\u%04x", c) : String.valueOf((char) c)));
        return b.append('"').toString();
    }

    /** Whether the row misses a column that the text names (the rule that drops it before evaluation). */
    private static boolean touchesMissing(String text, int row) {
        RowExpression e = RowExpression.parse(text, PATH);
        return e.columns().stream().anyMatch(c -> T.column(c).isMissing(row));
    }

    private static Gen expression(SplittableRandom r, int depth) {
        int pick = depth > 4 ? 0 : r.nextInt(6);
        switch (pick) {
            case 1 -> {
                Gen a = expression(r, depth + 1);
                Gen b = expression(r, depth + 1);
                return new Gen(a.operand(1) + " and " + b.operand(1),
                        row -> a.holds().apply(row) && b.holds().apply(row), 1);
            }
            case 2 -> {
                Gen a = expression(r, depth + 1);
                Gen b = expression(r, depth + 1);
                return new Gen(a.text() + " or " + b.text(), row -> a.holds().apply(row) || b.holds().apply(row), 0);
            }
            case 3 -> {
                Gen a = expression(r, depth + 1);
                return new Gen("not " + a.operand(2), row -> !a.holds().apply(row));
            }
            case 4 -> {
                Gen a = expression(r, depth + 1);
                return new Gen("(" + a.text() + ")", a.holds());
            }
            default -> {
                return comparison(r);
            }
        }
    }

    private static Gen comparison(SplittableRandom r) {
        if (r.nextInt(4) == 0) {
            String level = LEVELS[r.nextInt(LEVELS.length)];
            boolean equal = r.nextBoolean();
            CategoricalColumn region = (CategoricalColumn) T.column("region");
            String text = r.nextBoolean() ? "region " + (equal ? "==" : "!=") + " \"" + level + "\""
                    : "\"" + level + "\" " + (equal ? "==" : "!=") + " region";
            return new Gen(text, row -> region.codes()[row] >= 0
                    && region.levels().get(region.codes()[row]).equals(level) == equal);
        }
        int column = r.nextInt(NUMERIC.length);
        double[] values = ((NumericColumn) T.column(NUMERIC_NAMES[column])).values();
        double literal = r.nextInt(3) == 0 ? r.nextInt(-3, 8) : r.nextDouble(-5, 10);
        String written = r.nextBoolean() ? String.valueOf(literal) : String.format("%.3e", literal);
        double parsed = Double.parseDouble(written);
        String op = OPS[r.nextInt(OPS.length)];
        boolean columnLeft = r.nextBoolean();
        String text = columnLeft ? NUMERIC[column] + " " + op + " " + written : written + " " + op + " " + NUMERIC[column];
        return new Gen(text, row -> {
            double a = columnLeft ? values[row] : parsed;
            double b = columnLeft ? parsed : values[row];
            return switch (op) {
                case "==" -> a == b;
                case "!=" -> a != b;
                case "<" -> a < b;
                case "<=" -> a <= b;
                case ">" -> a > b;
                default -> a >= b;
            };
        });
    }

    @Test
    void theGeneratorCoversEveryOperatorAndBothColumnTypes() {
        SplittableRandom random = new SplittableRandom(20_240_601L);
        StringBuilder all = new StringBuilder();
        for (int i = 0; i < 500; i++) {
            all.append(expression(random, 0).text()).append('\n');
        }
        for (String must : List.of(" and ", " or ", "not ", "(", "region", "`\\`q\\` col`", "==", "!=", "<=", ">=", "e+")) {
            assertFalse(all.indexOf(must) < 0, must);
        }
    }
}
