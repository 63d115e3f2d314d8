package org.forkscape.data;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertInstanceOf;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.ByteArrayInputStream;
import java.io.FilterInputStream;
import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * The CSV loader against the rules of RFC 4180 (Shafranovich 2005, "Common Format and MIME Type for
 * Comma-Separated Values (CSV) Files", section 2) and against the documented contract for types and
 * missing cells; every error names the file and line.
 */
class CsvTableReaderTest {
    static Table read(String text) {
        return read(text.getBytes(StandardCharsets.UTF_8));
    }

    static Table read(byte[] bytes) {
        return new CsvTableReader().read(new ByteArrayInputStream(bytes), "t.csv");
    }

    static DataException failure(String text) {
        return failure(text.getBytes(StandardCharsets.UTF_8));
    }

    static DataException failure(byte[] bytes) {
        return assertThrows(DataException.class, () -> read(bytes));
    }

    static double[] numbers(Table t, String column) {
        return assertInstanceOf(NumericColumn.class, t.column(column)).values();
    }

    static CategoricalColumn categorical(Table t, String column) {
        return assertInstanceOf(CategoricalColumn.class, t.column(column));
    }

    @Test
    void aColumnOfNumbersIsNumericAndAnyOtherCellMakesItCategorical() {
        Table t = read("score,region,code\n1.5,north,7\n-2,south,12f\n3,north,8\n");
        assertEquals(3, t.rowCount());
        assertArrayEquals(new double[] {1.5, -2, 3}, numbers(t, "score"));
        CategoricalColumn region = categorical(t, "region");
        assertEquals(List.of("north", "south"), region.levels());
        assertArrayEquals(new int[] {0, 1, 0}, region.codes());
        // "12f" would parse with Double.parseDouble, but a data file's "12f" is a label, not a number
        assertEquals(List.of("12f", "7", "8"), categorical(t, "code").levels());
    }

    @Test
    void theFourMissingSpellingsAreMissingInNumericAndCategoricalColumns() {
        Table t = read("x,g\n1,a\n,b\nNA,\nNaN,NA\n.,.\n  NA  , NaN \n5,a\n");
        double[] x = numbers(t, "x");
        assertEquals(1, x[0]);
        for (int i = 1; i <= 5; i++) {
            assertTrue(Double.isNaN(x[i]), "row " + i);
        }
        assertEquals(5, x[6]);
        CategoricalColumn g = categorical(t, "g");
        assertEquals(List.of("a", "b"), g.levels());
        assertArrayEquals(new int[] {0, 1, -1, -1, -1, -1, 0}, g.codes());
        assertEquals(4, g.missingCount());
        assertEquals(5, t.column("x").missingCount());
    }

    @Test
    void otherSpellingsOfNothingAreText() {
        CategoricalColumn c = categorical(read("x\nna\nN/A\nnull\n3\n"), "x");
        assertEquals(List.of("3", "N/A", "na", "null"), c.levels());
        assertEquals(0, c.missingCount());
        // mostly text: nothing stands out as stray
        assertEquals(List.of(), c.strayTextLevels());
        CategoricalColumn numbersWithAStray = categorical(read("x\n1\n2\n3\nN/A\n4\n5\n"), "x");
        assertEquals(List.of("N/A"), numbersWithAStray.strayTextLevels());
    }

    @Test
    void multiByteCharactersAcrossTheDecodersBufferBoundariesDecodeIntact() {
        StringBuilder b = new StringBuilder("x,word\n");
        for (int i = 0; i < 30_000; i++) {
            b.append(i).append(i % 2 == 0 ? ",été\n" : ",日本\n");
        }
        Table t = read(b.toString());
        assertEquals(30_000, t.rowCount());
        assertEquals(List.of("été", "日本"), categorical(t, "word").levels());
        assertEquals(29_999, numbers(t, "x")[29_999]);
    }

    @Test
    void aColumnWithOnlyMissingCellsIsNumericAndAllNaN() {
        Table t = read("x,empty\n1,\n2,NA\n3,.\n");
        double[] empty = numbers(t, "empty");
        assertEquals(3, empty.length);
        for (double v : empty) {
            assertTrue(Double.isNaN(v));
        }
    }

    @Test
    void exponentNotationAndSignsAreNumbers() {
        Table t = read("x\n1e3\n2.5E-2\n-1.5e+2\n+4\n.5\n5.\n-0\n1e-400\n");
        assertArrayEquals(new double[] {1000, 0.025, -150, 4, 0.5, 5, -0.0, 0}, numbers(t, "x"));
    }

    @Test
    void wordsThatJavaReadsAsNumbersStayText() {
        for (String cell : List.of("Infinity", "-Infinity", "0x1F", "1d", "1_000", "1,5", "e5", "1e", "--1")) {
            Table t = read("x\n1\n\"" + cell + "\"\n");
            assertInstanceOf(CategoricalColumn.class, t.column("x"), cell);
        }
    }

    @Test
    void levelsAreSortedByCharacterCodeWhateverTheirOrderInTheFile() {
        CategoricalColumn c = categorical(read("g\nzeta\nAlpha\nbeta\nalpha\nZeta\nbeta\n"), "g");
        assertEquals(List.of("Alpha", "Zeta", "alpha", "beta", "zeta"), c.levels());
        assertArrayEquals(new int[] {4, 0, 3, 2, 1, 3}, c.codes());
        assertArrayEquals(new int[] {1, 1, 1, 2, 1}, c.levelCounts());
    }

    @Test
    void aByteOrderMarkIsNotPartOfTheFirstName() {
        byte[] bom = {(byte) 0xEF, (byte) 0xBB, (byte) 0xBF};
        for (String header : List.of("x,y", "\"x\",y")) {
            byte[] body = (header + "\n1,2\n").getBytes(StandardCharsets.UTF_8);
            byte[] file = new byte[bom.length + body.length];
            System.arraycopy(bom, 0, file, 0, 3);
            System.arraycopy(body, 0, file, 3, body.length);
            Table t = read(file);
            assertEquals("x", t.columns().get(0).name(), header);
            assertArrayEquals(new double[] {1}, numbers(t, "x"));
        }
    }

    @Test
    void windowsAndOldMacLineEndingsEndRecords() {
        // RFC 4180 rule 1: records end with CRLF; a lone CR or LF is accepted as well
        for (String eol : List.of("\r\n", "\n", "\r")) {
            Table t = read("x,y" + eol + "1,a" + eol + "2,b" + eol);
            assertArrayEquals(new double[] {1, 2}, numbers(t, "x"), eol);
            assertEquals(List.of("a", "b"), categorical(t, "y").levels());
        }
    }

    @Test
    void quotedFieldsHoldCommasQuotesAndLineBreaks() {
        // RFC 4180 rules 5-7: fields in double quotes may hold commas, CRLF, and quotes written twice
        Table t = read("id,note\n1,\"a, b\"\n2,\"say \"\"hi\"\"\"\n3,\"two\r\nlines\"\n4,plain\n");
        CategoricalColumn note = categorical(t, "note");
        assertEquals(4, t.rowCount());
        assertEquals("a, b", note.levels().get(note.codes()[0]));
        assertEquals("say \"hi\"", note.levels().get(note.codes()[1]));
        assertEquals("two\r\nlines", note.levels().get(note.codes()[2]));
        assertArrayEquals(new double[] {1, 2, 3, 4}, numbers(t, "id"));
    }

    @Test
    void surroundingSpacesAreRemovedFromNamesAndCellsQuotedOrNot() {
        Table t = read(" x , \" y \" \n 1 , \" north \"\n\" 2 \",south\n");
        assertEquals(List.of("x", "y"), t.columns().stream().map(Column::name).toList());
        assertArrayEquals(new double[] {1, 2}, numbers(t, "x"));
        assertEquals(List.of("north", "south"), categorical(t, "y").levels());
    }

    @Test
    void emptyLinesAndLinesOfSpacesAreSkipped() {
        Table t = read("\nx,y\n1,2\n\n   \n3,4\n\n");
        assertArrayEquals(new double[] {1, 3}, numbers(t, "x"));
        assertArrayEquals(new double[] {2, 4}, numbers(t, "y"));
    }

    @Test
    void theLastRecordNeedsNoLineBreak() {
        assertArrayEquals(new double[] {1, 2}, numbers(read("x\n1\n2"), "x"));
    }

    @Test
    void nonAsciiNamesAndValuesKeepTheirCharacters() {
        Table t = read("région,城市,ünits\n1,北京,ø\n2,上海,å\n");
        assertArrayEquals(new double[] {1, 2}, numbers(t, "région"));
        assertEquals(List.of("上海", "北京"), categorical(t, "城市").levels());
        assertEquals(List.of("å", "ø"), categorical(t, "ünits").levels());
    }

    @Test
    void aRaggedRowNamesItsLineAndBothCounts() {
        DataException e = failure("a,b,c\n1,2,3\n4,5\n6,7,8\n");
        assertEquals("t.csv, line 3", e.where());
        assertEquals("expected 3 fields as in the header, found 2", e.problem());
        DataException more = failure("a,b\n1,2\n3,4,5\n");
        assertTrue(more.getMessage().startsWith("t.csv, line 3: expected 2 fields as in the header, found 3"));
        assertTrue(more.getMessage().contains("double quotes"), more.getMessage());
    }

    @Test
    void aLineNumberCountsTheLinesInsideQuotedFields() {
        assertEquals("t.csv, line 5", failure("a,b\n1,\"x\ny\"\n2,z\n3\n").where());
    }

    @Test
    void anUnclosedQuoteNamesTheLineWhereItOpens() {
        DataException e = failure("a,b\n1,2\n\"3,4\n5,6\n7,8\n");
        assertEquals("t.csv, line 3", e.where());
        assertTrue(e.problem().contains("closing quote never comes"), e.problem());
    }

    @Test
    void textAfterAClosingQuoteNamesItsLine() {
        DataException e = failure("a,b\n1,2\n\"3\"x,4\n");
        assertEquals("t.csv, line 3", e.where());
        assertTrue(e.problem().contains("written twice"), e.problem());
    }

    @Test
    void invalidUtf8NamesTheExactLineEvenFarIntoTheFile() {
        StringBuilder b = new StringBuilder("x,name\n");
        for (int i = 0; i < 20_000; i++) {
            b.append(i).append(",plain\n");
        }
        b.append("1,caf\u00e9\n");
        DataException e = failure(b.toString().getBytes(StandardCharsets.ISO_8859_1));
        assertEquals("t.csv, line 20002", e.where());
        assertTrue(e.problem().contains("0xE9"), e.problem());
        assertTrue(e.problem().contains("UTF-8"), e.problem());
    }

    @Test
    void aFileEndingInsideAMultiByteCharacterIsNotUtf8() {
        byte[] text = "x\n1\n".getBytes(StandardCharsets.UTF_8);
        byte[] file = java.util.Arrays.copyOf(text, text.length + 1);
        file[text.length] = (byte) 0xE4;
        DataException e = failure(file);
        assertEquals("t.csv, line 3", e.where());
        assertTrue(e.problem().contains("multi-byte"), e.problem());
    }

    @Test
    void binaryEmptyAndHeaderOnlyFilesAreRefused() {
        assertTrue(failure(new byte[] {'P', 'K', 3, 4, 0, 0, 1}).problem().contains("binary"));
        assertEquals("t.csv: is empty: a header line and at least one data row are needed", failure("").getMessage());
        assertTrue(failure("\n\n  \n").problem().startsWith("is empty"));
        assertTrue(failure(new byte[] {(byte) 0xEF, (byte) 0xBB, (byte) 0xBF}).problem().startsWith("is empty"));
        assertEquals("t.csv: has a header but no data rows", failure("x,y\n").getMessage());
    }

    @Test
    void aNulCharacterAnywhereIsRefusedWithItsLine() {
        StringBuilder text = new StringBuilder("site,ozone\n");
        for (int i = 0; i < 2000; i++) {
            text.append("s").append(i).append(',').append(i % 7).append('\n');
        }
        text.append("late\u0000,3\n");
        DataException late = failure(text.toString());
        assertEquals("t.csv, line 2002", late.where());
        assertTrue(late.problem().contains("NUL character"), late.problem());
    }

    @Test
    void headerNamesMustBeUniqueAndNonEmpty() {
        DataException twice = failure("x,y,x\n1,2,3\n");
        assertEquals("t.csv, line 1", twice.where());
        assertTrue(twice.problem().contains("\"x\" appears twice (columns 1 and 3)"), twice.problem());
        assertTrue(failure("x, ,y\n1,2,3\n").problem().startsWith("column 2 of the header has an empty name"));
        assertTrue(failure("x,y,\n1,2,\n").problem().contains("end with a comma"));
        // names are compared after their surrounding spaces are removed
        assertTrue(failure("x,\" x\"\n1,2\n").problem().contains("appears twice"));
    }

    @Test
    void aNumberBeyondTheDoubleRangeIsRefusedWithItsLineAndColumn() {
        DataException e = failure("id,x\n1,5\n2,1e999\n");
        assertEquals("t.csv, line 3", e.where());
        assertTrue(e.problem().contains("1e999") && e.problem().contains("\"x\""), e.problem());
        // in a text column the same cell is just text
        assertEquals(List.of("1e999", "a"), categorical(read("x\na\n1e999\n"), "x").levels());
    }

    @Test
    void limitsOnColumnsAndCellsAreEnforcedWithTheirNumbers() {
        CsvTableReader small = new CsvTableReader(new CsvLimits(3, 10));
        DataException wide = assertThrows(DataException.class, () -> small.read(
                new ByteArrayInputStream("a,b,c,d\n1,2,3,4\n".getBytes(StandardCharsets.UTF_8)), "w.csv"));
        assertEquals("w.csv, line 1: the header has 4 columns; at most 3 are accepted", wide.getMessage());
        DataException cells = assertThrows(DataException.class, () -> small.read(
                new ByteArrayInputStream("a,b\n1,2\n3,4\n5,6\n7,8\n9,10\n11,12\n".getBytes(StandardCharsets.UTF_8)),
                "c.csv"));
        assertTrue(cells.getMessage().startsWith("c.csv: has more than 10 cells"), cells.getMessage());
        assertEquals(5, small.read(new ByteArrayInputStream("a,b\n1,2\n3,4\n5,6\n7,8\n9,10\n"
                .getBytes(StandardCharsets.UTF_8)), "ok.csv").rowCount());
    }

    @Test
    void aMissingFileIsNamed(@TempDir Path dir) {
        DataException e = assertThrows(DataException.class, () -> new CsvTableReader().read(dir.resolve("none.csv")));
        assertEquals("none.csv", e.where());
        assertTrue(e.problem().startsWith("no such data file"), e.problem());
    }

    @Test
    void readsAFileFromDiskAndLeavesACallersStreamOpen(@TempDir Path dir) throws IOException {
        Path file = dir.resolve("d.csv");
        Files.writeString(file, "x\n1\n2\n");
        assertEquals(2, new CsvTableReader().read(file).rowCount());
        assertEquals("d.csv", new CsvTableReader().read(file).source());
        boolean[] closed = {false};
        var stream = new FilterInputStream(new ByteArrayInputStream("x\n1\n".getBytes(StandardCharsets.UTF_8))) {
            @Override
            public void close() throws IOException {
                closed[0] = true;
                super.close();
            }
        };
        new CsvTableReader().read(stream, "s.csv");
        assertFalse(closed[0]);
    }
}
