package org.forkscape.data;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * The price of a file before it is parsed: its header's fields and the line ends after it (RFC 4180's
 * quoted fields and line endings, as in {@code CsvTableReaderTest}), capped by the cell limit, and never
 * below what the reader then holds for a table of numbers.
 */
class TableFootprintTest {
    @TempDir
    Path dir;

    private TableFootprint price(String text, CsvLimits limits) throws IOException {
        Path file = dir.resolve("f.csv");
        Files.write(file, text.getBytes(StandardCharsets.UTF_8));
        return TableFootprint.of(file, limits);
    }

    @Test
    void countsTheHeadersFieldsAndTheLinesAfterIt() throws IOException {
        TableFootprint plain = price("a,b,c\n1,2,3\n4,5,6\n", CsvLimits.DEFAULT);
        assertEquals(3, plain.columns());
        assertEquals(2, plain.rows());
        // a quoted comma is no separator; CR LF, a lone CR and a last line without an end are one line each
        TableFootprint awkward = price("\n  \n\"a,1\",b\r\n1,2\r3,4\n5,6", CsvLimits.DEFAULT);
        assertEquals(2, awkward.columns());
        assertEquals(3, awkward.rows());
        assertEquals(0, price("", CsvLimits.DEFAULT).bytes());
    }

    @Test
    void rowsAreCappedByTheCellLimit() throws IOException {
        TableFootprint capped = price("a,b\n1,2\n3,4\n5,6\n7,8\n", new CsvLimits(10, 5));
        assertEquals(2, capped.rows());
    }

    @Test
    void theReaderHoldsNoMoreThanThePriceForATableOfNumbers() throws IOException {
        StringBuilder csv = new StringBuilder("x,y,z\n");
        for (int i = 0; i < 50_000; i++) {
            csv.append(i).append(',').append(i * 0.5).append(",NA\n");
        }
        Path file = dir.resolve("n.csv");
        Files.writeString(file, csv);
        TableFootprint price = TableFootprint.of(file, CsvLimits.DEFAULT);
        long[] asked = {0};
        new CsvTableReader().read(file, "n.csv", bytes -> {
            asked[0] = Math.max(asked[0], bytes);
            return bytes;
        });
        assertEquals(price.bytes(), asked[0], "for numbers the price is exactly what the reader counts");
        assertTrue(TableFootprint.heldBy(new CsvTableReader().read(file)) < price.bytes());
    }
}
