package org.forkscape.data;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertInstanceOf;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import java.net.URISyntaxException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import java.util.stream.Stream;
import org.junit.jupiter.api.Test;

/**
 * The files in {@code src/test/resources/awkward-input/} are valid CSV (RFC 4180) written the ways real
 * exports write it; each must load with the types and values a user expects. Every file of the folder
 * is checked here, so a new file without its test fails {@link #everyFileOfTheCorpusHasItsTest}.
 */
class AwkwardInputTest {
    private static final List<String> CHECKED = List.of("byte-order-mark.csv", "windows-line-endings.csv",
            "quoted-commas.csv", "quoted-quotes.csv", "quoted-line-breaks.csv", "trailing-empty-line.csv",
            "surrounding-spaces.csv", "exponent-notation.csv", "all-missing-column.csv", "very-long-column-names.csv",
            "non-ascii-column-names.csv", "no-final-line-break.csv", "old-mac-line-endings.csv");

    static Path corpus() {
        try {
            return Path.of(AwkwardInputTest.class.getResource("/awkward-input").toURI());
        } catch (URISyntaxException e) {
            throw new IllegalStateException(e);
        }
    }

    static Table load(String name) {
        return new CsvTableReader().read(corpus().resolve(name));
    }

    static double[] numbers(Table t, String column) {
        return assertInstanceOf(NumericColumn.class, t.column(column)).values();
    }

    /** The cell values of a categorical column, row by row. */
    static List<String> texts(Table t, String column) {
        CategoricalColumn c = assertInstanceOf(CategoricalColumn.class, t.column(column));
        return java.util.Arrays.stream(c.codes()).mapToObj(k -> k < 0 ? null : c.levels().get(k)).toList();
    }

    static List<String> names(Table t) {
        return t.columns().stream().map(Column::name).toList();
    }

    @Test
    void everyFileOfTheCorpusHasItsTest() throws IOException {
        try (Stream<Path> files = Files.list(corpus())) {
            List<String> present = files.map(p -> p.getFileName().toString()).filter(n -> n.endsWith(".csv"))
                    .sorted().toList();
            assertEquals(CHECKED.stream().sorted().toList(), present);
        }
        assertTrue(CHECKED.size() >= 10);
    }

    @Test
    void byteOrderMark() {
        Table t = load("byte-order-mark.csv");
        assertEquals(List.of("station", "pm25", "district"), names(t));
        assertEquals(List.of("river-1", "hill-2"), texts(t, "station"));
        assertArrayEquals(new double[] {12.5, 8}, numbers(t, "pm25"));
    }

    @Test
    void windowsLineEndings() {
        Table t = load("windows-line-endings.csv");
        assertEquals(List.of("school", "attendance", "term"), names(t));
        assertArrayEquals(new double[] {0.91, 0.87, 0.95}, numbers(t, "attendance"));
        assertEquals(List.of("spring", "autumn", "spring"), texts(t, "term"));
    }

    @Test
    void quotedCommas() {
        Table t = load("quoted-commas.csv");
        assertEquals(List.of("12 Elm Road, North", "Unit 3, 7 Quay St, Harbour", "Market Square"), texts(t, "address"));
        assertArrayEquals(new double[] {0.44, 0.51, 0.39}, numbers(t, "turnout"));
    }

    @Test
    void quotedQuotes() {
        Table t = load("quoted-quotes.csv");
        assertEquals(List.of("the \"new\" library", "\"quoted\" start", "ends with \"quote\""), texts(t, "comment"));
        assertArrayEquals(new double[] {4, 5, 3}, numbers(t, "score"));
    }

    @Test
    void quotedLineBreaks() {
        Table t = load("quoted-line-breaks.csv");
        assertEquals(3, t.rowCount());
        assertEquals(List.of("north shore\nshallow reeds", "two\r\nline breaks\nmixed", "single line"),
                texts(t, "description"));
        assertArrayEquals(new double[] {2.5, 7, 4.25}, numbers(t, "depth"));
    }

    @Test
    void trailingEmptyLines() {
        Table t = load("trailing-empty-line.csv");
        assertEquals(2, t.rowCount());
        assertArrayEquals(new double[] {1200, 950}, numbers(t, "riders"));
    }

    @Test
    void surroundingSpaces() {
        Table t = load("surrounding-spaces.csv");
        assertEquals(List.of("bin", "fill_level", "material"), names(t));
        assertArrayEquals(new double[] {1, 2, 3}, numbers(t, "bin"));
        assertArrayEquals(new double[] {0.5, 0.75, 1}, numbers(t, "fill_level"));
        assertEquals(List.of("glass", "paper", "metal"), texts(t, "material"));
    }

    @Test
    void exponentNotation() {
        Table t = load("exponent-notation.csv");
        assertArrayEquals(new double[] {0.0012, 450, -3, 6.02e23}, numbers(t, "concentration"));
        assertArrayEquals(new double[] {1000, 25, 1, 0}, numbers(t, "count"));
    }

    @Test
    void allMissingColumn() {
        Table t = load("all-missing-column.csv");
        double[] irrigation = numbers(t, "irrigation");
        assertEquals(4, irrigation.length);
        assertEquals(4, t.column("irrigation").missingCount());
        assertArrayEquals(new double[] {3.2, 2.9, 3.5, 3.1}, numbers(t, "yield"));
    }

    @Test
    void veryLongColumnNames() {
        Table t = load("very-long-column-names.csv");
        String library = "share_of_households_within_walking_distance_of_a_public_library_".repeat(4) + "in_2020";
        String bus = "average_minutes_spent_waiting_for_the_first_bus_of_the_morning_".repeat(4) + "weekday";
        assertEquals(List.of("area", library, bus), names(t));
        assertEquals(263, library.length());
        assertArrayEquals(new double[] {0.62, 0.48}, numbers(t, library));
        assertArrayEquals(new double[] {11.5, 14}, numbers(t, bus));
    }

    @Test
    void nonAsciiColumnNames() {
        Table t = load("non-ascii-column-names.csv");
        assertEquals(List.of("température", "城市", "ålder", "número_de_árboles"), names(t));
        assertArrayEquals(new double[] {21.5, 19, 23.25}, numbers(t, "température"));
        assertEquals(List.of("北京", "Zürich", "São Paulo"), texts(t, "城市"));
        assertArrayEquals(new double[] {340, 120, 560}, numbers(t, "número_de_árboles"));
    }

    @Test
    void noFinalLineBreak() {
        Table t = load("no-final-line-break.csv");
        assertArrayEquals(new double[] {2019, 2020}, numbers(t, "year"));
        assertArrayEquals(new double[] {812, 760}, numbers(t, "rainfall_mm"));
    }

    @Test
    void oldMacLineEndings() {
        Table t = load("old-mac-line-endings.csv");
        assertEquals(List.of("quiet", "busy"), texts(t, "zone"));
        assertArrayEquals(new double[] {41, 68}, numbers(t, "noise_db"));
    }
}
