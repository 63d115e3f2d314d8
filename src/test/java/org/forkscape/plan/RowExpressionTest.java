package org.forkscape.plan;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.ByteArrayInputStream;
import java.nio.charset.StandardCharsets;
import java.util.ArrayList;
import java.util.List;
import java.util.function.IntPredicate;
import org.forkscape.data.CsvTableReader;
import org.forkscape.data.Table;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.CsvSource;

/**
 * The row-filter grammar: what it keeps, how it binds, and where it says a mistake is. Precedence is
 * checked against Java's own boolean operators, whose order (! before &amp;&amp; before ||) is fixed by
 * the Java Language Specification, sections 15.15, 15.23 and 15.24.
 */
class RowExpressionTest {
    /** Rows 0-7: every combination of a, b, c in {0, 1}; row 8 has a missing; rows 9-10 test text and signs. */
    private static final Table T = new CsvTableReader().read(new ByteArrayInputStream((
            "a,b,c,region,`odd` name,score\n"
                    + "0,0,0,north,1,-0\n0,0,1,south,2,1.5\n0,1,0,north,3,2\n0,1,1,east,4,1e3\n"
                    + "1,0,0,south,5,-2\n1,0,1,north,6,0\n1,1,0,east,7,3\n1,1,1,south,8,4\n"
                    + "NA,1,1,north,9,5\n0,0,0,,10,6\n1,1,1,\"north, upper\",11,7\n").getBytes(StandardCharsets.UTF_8)),
            "t.csv");

    static List<Integer> kept(String expression) {
        RowExpression.RowPredicate p = RowExpression.parse(expression, "keep").bind(T, "keep");
        List<Integer> rows = new ArrayList<>();
        for (int r = 0; r < T.rowCount(); r++) {
            if (p.keep(r)) {
                rows.add(r);
            }
        }
        return rows;
    }

    static List<Integer> where(IntPredicate p) {
        List<Integer> rows = new ArrayList<>();
        for (int r = 0; r < 8; r++) {
            if (p.test(r)) {
                rows.add(r);
            }
        }
        return rows;
    }

    static boolean bit(int row, String column) {
        int shift = column.equals("a") ? 2 : column.equals("b") ? 1 : 0;
        return (row >> shift & 1) == 1;
    }

    static PlanException syntaxError(String expression) {
        return assertThrows(PlanException.class, () -> RowExpression.parse(expression, "decisions[3].alternatives[1].keep"));
    }

    static PlanException bindError(String expression) {
        RowExpression e = RowExpression.parse(expression, "k");
        return assertThrows(PlanException.class, () -> e.bind(T, "decisions[3].alternatives[1].keep"));
    }

    @Test
    void notBindsTighterThanAndWhichBindsTighterThanOrAsInJava() {
        assertEquals(where(r -> !bit(r, "a") && bit(r, "b") || bit(r, "c")),
                kept("not a == 1 and b == 1 or c == 1").stream().filter(r -> r < 8).toList());
        assertEquals(where(r -> bit(r, "a") || bit(r, "b") && bit(r, "c")),
                kept("a == 1 or b == 1 and c == 1").stream().filter(r -> r < 8).toList());
        assertEquals(where(r -> (bit(r, "a") || bit(r, "b")) && bit(r, "c")),
                kept("(a == 1 or b == 1) and c == 1").stream().filter(r -> r < 8).toList());
        assertEquals(where(r -> !(bit(r, "a") && bit(r, "b"))),
                kept("not (a == 1 and b == 1)").stream().filter(r -> r < 8).toList());
        assertEquals(where(r -> !!bit(r, "a")), kept("not not a == 1").stream().filter(r -> r < 8).toList());
    }

    @Test
    void everyComparisonOperatorOnNumbers() {
        assertEquals(List.of(1, 2, 3, 9), kept("score > 1 and score < 1000.5 and a == 0"));
        assertEquals(List.of(0, 1, 5), kept("score >= -0 and score <= 1.5"));
        assertEquals(List.of(3), kept("score == 1000"));
        assertEquals(List.of(0, 1, 2, 3, 5, 6, 7, 8, 9, 10), kept("score != -2"));
        assertEquals(List.of(4), kept("score < -1.5e0"));
        assertEquals(List.of(4), kept("-2 == score"));
    }

    @Test
    void negativeZeroEqualsZero() {
        assertEquals(List.of(0, 5), kept("score == 0"));
        assertEquals(List.of(0, 5), kept("score == -0"));
    }

    @Test
    void textComparesWithEqualityOnly() {
        assertEquals(List.of(0, 2, 5, 8), kept("region == \"north\""));
        assertEquals(List.of(1, 3, 4, 6, 7, 10), kept("region != \"north\" and b >= 0"));
        assertEquals(List.of(10), kept("region == \"north, upper\""));
        assertEquals(List.of(0, 1, 2, 3, 4, 5, 6, 7, 8, 10), kept("region == region"));
    }

    @Test
    void aRowMissingAnyNamedColumnIsNotKeptWhateverTheRestSays() {
        // row 8 has a missing: even "a == 1 or b == 1", true on b, does not keep it
        assertTrue(!kept("a == 1 or b == 1").contains(8));
        assertTrue(!kept("not a == 1").contains(8));
        assertTrue(kept("b == 1").contains(8));
        // row 9 has region missing
        assertTrue(!kept("region != \"north\"").contains(9));
        assertTrue(!kept("region != \"north\" or a == 0").contains(9));
    }

    @Test
    void backquotesNameAnyColumnAndAllowEscapes() {
        assertEquals(List.of(10), kept("`\\`odd\\` name` > 10"));
        RowExpression e = RowExpression.parse("`\\`odd\\` name` > 10 and region == \"say \\\"hi\\\"\"", "k");
        assertEquals(List.of("`odd` name", "region"), List.copyOf(e.columns()));
        assertEquals("`\\`odd\\` name` > 10 and region == \"say \\\"hi\\\"\"", e.source());
    }

    @Test
    void identifiersMayHoldDotsUnderscoresAndLetters() {
        RowExpression e = RowExpression.parse("x.total_2 > 1 and élèves < 3 and _z == 1", "k");
        assertEquals(List.of("x.total_2", "élèves", "_z"), List.copyOf(e.columns()));
    }

    @Test
    void literalsMayStandOnBothSides() {
        assertEquals(11, kept("1 < 2").size());
        assertEquals(0, kept("\"a\" == \"b\"").size());
    }

    @ParameterizedTest
    @CsvSource(delimiterString = " ~ ", value = {
            "a > ~ end of expression",
            "a > 1 and ~ end of expression",
            "a 1 ~ expected a comparison (==, !=, <, <=, >, >=) after a but found \"1\" at character 3",
            "a = 1 ~ \"=\" at character 3 is not an operator; use == to compare",
            "!(a == 1) ~ \"!\" at character 1 is not an operator",
            "(a == 1 ~ expected \")\" to close the \"(\" at character 1 but found end of expression",
            "a == 1) ~ unexpected \")\" at character 7; it closes no \"(\"",
            "1 < a < 3 ~ unexpected \"<\" at character 7; comparisons do not chain",
            "a == 1 AND b == 1 ~ unexpected \"AND\" at character 8; write and, or, not in lower case",
            "a == 1 && b == 1 ~ unexpected character \"&\" at character 8; write and",
            "a == 1 || b == 1 ~ unexpected character \"|\" at character 8; write or",
            "region == 'north' ~ unexpected character \"'\" at character 11; text goes in double quotes",
            "region == \"north ~ the text opened by the \" at character 11 is never closed",
            "`odd name > 1 ~ the name opened by the ` at character 1 is never closed",
            "`` > 1 ~ the backquotes at character 1 hold no column name",
            "a == 1.2.3 ~ \"1.2.3\" at character 6 is not a number",
            "a == 1e ~ \"1e\" at character 6 is not a number",
            "a == 1e999 ~ \"1e999\" at character 6 is too large for a number",
            "a == 1 b == 2 ~ unexpected \"b\" at character 8; join comparisons with and or or",
            "a == # ~ unexpected character \"#\" at character 6",
            "== 1 ~ expected a column, number or \"text\" but found \"==\" at character 1",
            "not ~ expected a column, number or \"text\" but found end of expression"})
    void syntaxErrorsGiveThePosition(String expression, String fragment) {
        PlanException e = syntaxError(expression);
        assertEquals("decisions[3].alternatives[1].keep", e.where());
        assertTrue(e.problem().startsWith("cannot read the expression \"" + expression + "\": "), e.problem());
        assertTrue(e.problem().contains(fragment), "expected \"" + fragment + "\" in: " + e.problem());
    }

    @Test
    void aControlCharacterIsShownByItsCode() {
        assertTrue(syntaxError("a == \u0007").problem().contains("U+0007 at character 6"));
        assertTrue(syntaxError("a == \uD800").problem().contains("U+D800 at character 6"));
    }

    @Test
    void nestingAndLengthAreBounded() {
        String deep = "(".repeat(70) + "a == 1" + ")".repeat(70);
        assertTrue(syntaxError(deep).problem().contains("nests more than 64 levels deep"));
        assertTrue(syntaxError("not ".repeat(70) + "a == 1").problem().contains("nests more than 64 levels deep"));
        assertEquals(11, kept("(".repeat(60) + "b >= 0" + ")".repeat(60)).size());
        PlanException tooLong = syntaxError("a == 1 or ".repeat(1100) + "a == 1");
        assertTrue(tooLong.problem().startsWith("the expression has 11,006 characters; at most 10,000"),
                tooLong.problem());
    }

    @Test
    void aLongChainOfOrIsEvaluatedWithoutDeepNesting() {
        String chain = "a == 5 or ".repeat(900) + "a == 1";
        assertEquals(List.of(4, 5, 6, 7, 10), kept(chain));
    }

    @Test
    void aLongExpressionIsAbbreviatedInMessages() {
        String expression = "b == 1 and ".repeat(20) + "a >";
        PlanException e = syntaxError(expression);
        assertTrue(e.problem().contains("...\": "), e.problem());
        assertTrue(e.problem().length() < 200, e.problem());
    }

    @Test
    void typeMistakesAreNamedWithTheComparisonAndItsPosition() {
        PlanException e = bindError("a == 1 and region > \"n\"");
        assertEquals("decisions[3].alternatives[1].keep", e.where());
        assertEquals("\"region > \"n\"\" (at character 12): text can only be compared with == or !=, not >",
                e.problem());
        assertEquals("\"score == \"3\"\" (at character 1) compares text with a number; write a number without quotes",
                bindError("score == \"3\"").problem());
        assertEquals("\"region < 3\" (at character 1) compares text with a number; \"region\" is categorical, so "
                + "compare it with a quoted level", bindError("region < 3").problem());
    }

    @Test
    void aTextValueThatIsNoLevelIsRefusedWithTheNearestLevel() {
        assertEquals("\"region == \"nroth\"\" (at character 1): \"nroth\" is not a value of \"region\"; did you mean "
                + "\"north\"?", bindError("region == \"nroth\"").problem());
        assertTrue(bindError("region != \"zzzzzzzz\"").problem().endsWith("its values are \"east\", \"north\", "
                + "\"north, upper\", \"south\""));
    }

    @Test
    void anUnknownColumnIsNamedWithTheNearestOne() {
        assertEquals("the expression names \"regoin\", which is not a column of t.csv; did you mean \"region\"?",
                bindError("regoin == \"north\"").problem());
    }
}
