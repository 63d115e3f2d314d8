package org.forkscape.data;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertInstanceOf;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.forkscape.data.SameTable.assertSameTable;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.SplittableRandom;
import org.apache.parquet.column.Encoding;
import org.apache.parquet.conf.PlainParquetConfiguration;
import org.apache.parquet.hadoop.ParquetFileReader;
import org.apache.parquet.hadoop.metadata.BlockMetaData;
import org.apache.parquet.hadoop.metadata.ColumnChunkMetaData;
import org.apache.parquet.hadoop.metadata.CompressionCodecName;
import org.apache.parquet.io.LocalInputFile;
import org.apache.parquet.ParquetReadOptions;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * The Parquet reader against the CSV reader on the same cells: every file here is written by Apache
 * Parquet's own writer ({@link ParquetFiles}), its CSV twin by this test from the same cells, and the two
 * tables must be identical, bit for bit. The numbers themselves are checked against the JDK's
 * {@link Double#parseDouble} of their decimal text (correctly rounded, Java SE API specification) and the
 * levels against {@link String#compareTo} order.
 */
class ParquetTableReaderTest {
    @TempDir
    Path dir;

    private static final String TYPES = "message m { required int32 pupils; optional int64 budget; "
            + "optional int32 small (UINT_32); optional float ratio; optional double score; optional boolean urban; "
            + "optional int32 fee (DECIMAL(7,2)); optional int64 grant (DECIMAL(15,3)); "
            + "optional fixed_len_byte_array(9) levy (DECIMAL(20,4)); optional binary big (DECIMAL(30,6)); "
            + "optional binary region (STRING); optional binary kind (ENUM); }";

    /** Seeded invented rows: schools by region, with nulls in every optional column. */
    private static List<List<Object>> typedRows(int n, long seed) {
        SplittableRandom r = new SplittableRandom(seed);
        String[] regions = {"north", "south", " east ", "west", "NA", "centre"};
        List<List<Object>> rows = new ArrayList<>();
        for (int i = 0; i < n; i++) {
            rows.add(Arrays.asList(
                    r.nextInt(-50, 900),
                    maybe(r, r.nextLong(-4_000_000_000L, 9_007_199_254_740_993L)),
                    maybe(r, r.nextInt(0, 1 << 20)),
                    maybe(r, List.of(0.1f, 0.5f, 1.25f, 3.3f, -7.77f).get(r.nextInt(5))),
                    maybe(r, r.nextInt(10) == 0 ? 1e-300 * r.nextDouble() : r.nextGaussian() * 100),
                    maybe(r, r.nextBoolean()),
                    maybe(r, new java.math.BigDecimal(r.nextInt(-9_999_999, 9_999_999)).movePointLeft(2).toPlainString()),
                    maybe(r, new java.math.BigDecimal(r.nextLong(-999_999_999_999L, 999_999_999_999L)).movePointLeft(3)
                            .toPlainString()),
                    maybe(r, new java.math.BigDecimal(r.nextLong()).movePointLeft(4).toPlainString()),
                    maybe(r, new java.math.BigDecimal(r.nextLong()).multiply(java.math.BigDecimal.valueOf(r.nextLong()))
                            .movePointLeft(6).toPlainString()),
                    maybe(r, regions[r.nextInt(regions.length)]),
                    maybe(r, r.nextBoolean() ? "primary" : "secondary")));
        }
        return rows;
    }

    private static Object maybe(SplittableRandom r, Object value) {
        return r.nextInt(8) == 0 ? null : value;
    }

    /**
     * The CSV a user would export the same cells to: a null as an empty cell, booleans as 1 and 0, a float as
     * its shortest decimal (what tools print for it), every other value as its decimal or its text.
     */
    private static String csvOf(String header, List<List<Object>> rows) {
        StringBuilder b = new StringBuilder(header).append('\n');
        for (List<Object> row : rows) {
            for (int j = 0; j < row.size(); j++) {
                Object cell = row.get(j);
                b.append(j == 0 ? "" : ",").append(cell == null ? "" : cell instanceof Boolean t ? (t ? "1" : "0")
                        : cell.toString());
            }
            b.append('\n');
        }
        return b.toString();
    }

    private static final String TYPES_HEADER = "pupils,budget,small,ratio,score,urban,fee,grant,levy,big,region,kind";

    private Table csv(String name, String text) throws IOException {
        Path file = dir.resolve(name);
        Files.writeString(file, text);
        return new CsvTableReader().read(file);
    }

    @Test
    void everyTypeReadsAsTheSameCellsReadFromCsv() throws IOException {
        List<List<Object>> rows = typedRows(3_000, 11);
        Path file = ParquetFiles.write(dir.resolve("schools.parquet"), TYPES, rows);
        Table parquet = new ParquetTableReader().read(file);
        Table csv = csv("schools.csv", csvOf(TYPES_HEADER, rows));
        assertSameTable(csv, parquet);
        assertEquals("schools.parquet", parquet.source());
        for (String text : List.of("region", "kind")) {
            assertInstanceOf(CategoricalColumn.class, parquet.column(text), "STRING and ENUM are text");
        }
        for (String number : List.of("pupils", "budget", "small", "ratio", "score", "urban", "fee", "grant", "levy", "big")) {
            assertInstanceOf(NumericColumn.class, parquet.column(number), number + " is a number");
        }
    }

    /**
     * A float becomes the double of its shortest decimal on every Java release: -8.1109158E8 is what Java 17's
     * Float.toString writes for the float whose shortest decimal is -8.110916E8 (found by comparing the two
     * on random floats; Java 19 and later write the shortest, from memory), and the two decimals are
     * different doubles.
     */
    @Test
    void aFloatIsTheDoubleOfItsShortestDecimal() {
        float f = -8.1109158E8f;
        assertEquals(f, -8.110916E8f, 0.0f, "one float");
        Table t = new ParquetTableReader().read(ParquetFiles.write(dir.resolve("f.parquet"),
                "message m { required float ratio; }", List.of(List.of(f))));
        assertEquals(-8.110916E8, ((NumericColumn) t.column("ratio")).values()[0], 0.0);
    }

    /**
     * A STRING column of numeric texts is text because the file declares it, not because of a stray cell: no
     * hint names its few non-numeric levels as the cells to fix (the CSV copy's column has that hint).
     */
    @Test
    void aStringColumnOfNumbersHasNoStrayTextHint() throws IOException {
        List<List<Object>> rows = new ArrayList<>();
        for (int i = 0; i < 30; i++) {
            rows.add(List.of(i == 7 ? "n/a" : Integer.toString(i)));
        }
        Table parquet = new ParquetTableReader().read(ParquetFiles.write(dir.resolve("codes.parquet"),
                "message m { required binary code (STRING); }", rows));
        assertEquals(List.of(), ((CategoricalColumn) parquet.column("code")).strayTextLevels());
        Table csv = csv("codes.csv", csvOf("code", rows));
        assertEquals(List.of("n/a"), ((CategoricalColumn) csv.column("code")).strayTextLevels());
    }

    @Test
    void numbersAreTheNearestDoubleOfTheirDecimalTextAndNullsAreMissing() {
        List<List<Object>> rows = typedRows(500, 12);
        Table t = new ParquetTableReader().read(ParquetFiles.write(dir.resolve("s.parquet"), TYPES, rows));
        List<String> names = List.of(TYPES_HEADER.split(","));
        int nulls = 0;
        for (int j = 0; j < 10; j++) {
            double[] values = ((NumericColumn) t.column(names.get(j))).values();
            for (int i = 0; i < rows.size(); i++) {
                Object cell = rows.get(i).get(j);
                // source: Java SE API, Double.parseDouble (the nearest double to the decimal's exact value)
                double expected = cell == null ? Double.NaN
                        : cell instanceof Boolean b ? (b ? 1 : 0) : Double.parseDouble(cell.toString());
                assertEquals(expected, values[i], 0.0, names.get(j) + " row " + i);
                nulls += cell == null ? 1 : 0;
            }
        }
        assertTrue(nulls > 100, "the rows hold nulls: " + nulls);
        CategoricalColumn region = (CategoricalColumn) t.column("region");
        // stripped as CSV cells are, "NA" missing as in CSV, levels in String.compareTo order
        assertEquals(List.of("centre", "east", "north", "south", "west"), region.levels());
        for (int i = 0; i < rows.size(); i++) {
            Object cell = rows.get(i).get(10);
            boolean missing = cell == null || cell.equals("NA");
            assertEquals(missing, region.codes()[i] < 0, "row " + i);
            if (!missing) {
                assertEquals(cell.toString().strip(), region.levels().get(region.codes()[i]));
            }
        }
    }

    @Test
    void dictionaryAndPlainEncodedTextGiveOneTable() throws IOException {
        List<List<Object>> rows = typedRows(2_000, 13);
        Path dictionary = ParquetFiles.write(dir.resolve("d.parquet"), TYPES, rows);
        Path plain = ParquetFiles.write(dir.resolve("p.parquet"), TYPES, rows,
                ParquetFiles.Options.DEFAULT.withDictionary(false));
        assertTrue(encodings(dictionary, "region").stream().anyMatch(Encoding::usesDictionary),
                "the first file's text is dictionary-encoded");
        assertFalse(encodings(plain, "region").stream().anyMatch(Encoding::usesDictionary),
                "the second file's text is plain");
        assertSameTable(new ParquetTableReader().read(dictionary), new ParquetTableReader().read(plain));
    }

    private static List<Encoding> encodings(Path file, String column) throws IOException {
        try (ParquetFileReader r = ParquetFileReader.open(new LocalInputFile(file),
                ParquetReadOptions.builder(new PlainParquetConfiguration()).build())) {
            List<Encoding> out = new ArrayList<>();
            for (BlockMetaData b : r.getFooter().getBlocks()) {
                for (ColumnChunkMetaData c : b.getColumns()) {
                    if (c.getPath().toDotString().equals(column)) {
                        out.addAll(c.getEncodings());
                    }
                }
            }
            return out;
        }
    }

    @Test
    void everyCodecThisBuildShipsReadsTheSameTable() throws IOException {
        List<List<Object>> rows = typedRows(1_000, 14);
        Table expected = csv("c.csv", csvOf(TYPES_HEADER, rows));
        for (CompressionCodecName codec : List.of(CompressionCodecName.UNCOMPRESSED, CompressionCodecName.SNAPPY,
                CompressionCodecName.GZIP, CompressionCodecName.ZSTD, CompressionCodecName.LZ4_RAW)) {
            Path file = ParquetFiles.write(dir.resolve(codec + ".parquet"), TYPES, rows,
                    ParquetFiles.Options.DEFAULT.withCodec(codec));
            assertSameTable(expected, new ParquetTableReader().read(file));
        }
    }

    @Test
    void aFolderOfPartsReadsAsItsPartsInNameOrder() throws IOException {
        List<List<Object>> rows = typedRows(2_500, 15);
        Path folder = Files.createDirectory(dir.resolve("schools"));
        // part names out of order on purpose; a marker and a checksum file beside them are not parts
        ParquetFiles.write(folder.resolve("part-00002.parquet"), TYPES, rows.subList(1_700, 2_500));
        ParquetFiles.write(folder.resolve("part-00000.parquet"), TYPES, rows.subList(0, 900),
                ParquetFiles.Options.DEFAULT.withRowsPerGroup(100));
        ParquetFiles.write(folder.resolve("part-00001.parquet"), TYPES, rows.subList(900, 1_700),
                ParquetFiles.Options.DEFAULT.withCodec(CompressionCodecName.ZSTD));
        Files.writeString(folder.resolve("_SUCCESS"), "");
        Files.writeString(folder.resolve(".part-00000.parquet.crc"), "x");
        assertTrue(rowGroups(folder.resolve("part-00000.parquet")) > 1, "the first part has several row groups");
        Table parts = new ParquetTableReader().read(folder);
        assertSameTable(csv("all.csv", csvOf(TYPES_HEADER, rows)), parts);
        assertSameTable(parts, DataFiles.read(folder));
    }

    private static int rowGroups(Path file) throws IOException {
        try (ParquetFileReader r = ParquetFileReader.open(new LocalInputFile(file),
                ParquetReadOptions.builder(new PlainParquetConfiguration()).build())) {
            return r.getFooter().getBlocks().size();
        }
    }

    @Test
    void partsWithOtherColumnsAreRefusedNamingThePart() throws IOException {
        Path folder = Files.createDirectory(dir.resolve("mixed"));
        ParquetFiles.write(folder.resolve("a.parquet"), "message m { required double x; required double y; }",
                List.of(List.of(1.0, 2.0)));
        ParquetFiles.write(folder.resolve("b.parquet"), "message m { required double x; required binary y (STRING); }",
                List.of(List.of(1.0, "two")));
        DataException e = assertThrows(DataException.class, () -> new ParquetTableReader().read(folder));
        assertEquals("mixed, part b.parquet", e.where());
        assertTrue(e.problem().startsWith("has other columns than a.parquet (x DOUBLE, y BINARY (STRING) against "
                + "x DOUBLE, y DOUBLE)"), e.problem());
    }

    @Test
    void anEmptyFolderAndAMissingPathAreRefused() throws IOException {
        Path empty = Files.createDirectory(dir.resolve("empty"));
        Files.writeString(empty.resolve("notes.txt"), "no parts here");
        DataException e = assertThrows(DataException.class, () -> DataFiles.read(empty));
        assertTrue(e.problem().startsWith("is a folder without Parquet part files"), e.problem());
        DataException missing = assertThrows(DataException.class, () -> DataFiles.read(dir.resolve("gone.parquet")));
        assertTrue(missing.problem().startsWith("no such data file or folder"), missing.problem());
    }

    @Test
    void aCorruptFileIsOneSentenceNamingTheFile() throws IOException {
        List<List<Object>> rows = typedRows(2_000, 16);
        byte[] good = Files.readAllBytes(ParquetFiles.write(dir.resolve("good.parquet"), TYPES, rows,
                ParquetFiles.Options.DEFAULT.withCodec(CompressionCodecName.UNCOMPRESSED)));
        Path cut = dir.resolve("cut.parquet");
        Files.write(cut, Arrays.copyOf(good, good.length / 2));
        Path text = dir.resolve("text.parquet");
        Files.writeString(text, "region,score\nnorth,1\n");
        Path flipped = dir.resolve("flipped.parquet");
        byte[] bad = good.clone();
        for (int i = 200; i < 260; i++) {
            bad[i] ^= (byte) 0x5A;
        }
        Files.write(flipped, bad);
        for (Path file : List.of(cut, text, flipped)) {
            DataException e = assertThrows(DataException.class, () -> new ParquetTableReader().read(file),
                    file.toString());
            String name = file.getFileName().toString();
            assertEquals(name, e.where());
            String expected = file == flipped ? "is not a readable Parquet file (" : "is not a Parquet file: it does "
                    + "not begin and end with PAR1";
            assertTrue(e.problem().startsWith(expected), e.problem());
            assertFalse(e.getMessage().contains(dir.toString()), "no server path: " + e.getMessage());
            assertEquals(1, e.getMessage().lines().count(), e.getMessage());
        }
    }

    @Test
    void aParquetFileNamedAsCsvIsToldToBeRenamed() throws IOException {
        Path file = ParquetFiles.write(dir.resolve("s.parquet"), TYPES, typedRows(10, 18));
        Path misnamed = Files.move(file, dir.resolve("schools.csv"));
        DataException e = assertThrows(DataException.class, () -> DataFiles.read(misnamed));
        assertEquals("schools.csv", e.where());
        assertTrue(e.problem().startsWith("looks like a Parquet file (it begins with PAR1)"), e.problem());
    }

    @Test
    void anUnsupportedTypeIsRefusedNamingTheColumnAndItsType() {
        String[][] cases = {
            {"message m { required double x; optional int32 visit (DATE); }", "visit", "has the Parquet type INT32 (DATE)"},
            {"message m { required double x; optional int96 stamp; }", "stamp", "has the Parquet type INT96 (a legacy timestamp)"},
            {"message m { required double x; optional binary blob; }", "blob",
                "has the Parquet type BINARY (bytes without a STRING annotation)"},
            {"message m { required double x; optional int64 at (TIMESTAMP(MILLIS,true)); }", "at",
                "has the Parquet type INT64 (TIMESTAMP(MILLIS,TRUE))"},
            {"message m { required double x; optional group tags (LIST) { repeated group list { optional binary element (STRING); } } }",
                "tags", "is a nested column (LIST)"},
            {"message m { required double x; repeated int32 counts; }", "counts", "is a repeated column"},
            {"message m { required double x; optional binary shape (GEOMETRY); }", "shape",
                "has the Parquet type BINARY (GEOMETRY"},
        };
        for (String[] c : cases) {
            Path file = dir.resolve(c[1] + ".parquet");
            ParquetFiles.write(file, c[0], List.of());
            DataException e = assertThrows(DataException.class, () -> new ParquetTableReader().read(file), c[1]);
            assertEquals(c[1] + ".parquet, column \"" + c[1] + "\"", e.where());
            assertTrue(e.problem().startsWith(c[2]), e.problem());
            assertTrue(e.problem().contains("which Forkscape does not read"), e.problem());
        }
    }

    @Test
    void textThatIsNotUtf8IsRefusedAtItsRow() {
        // 0xC3 0x28: a two-byte lead followed by a byte that cannot continue it (Unicode 15, table 3-7)
        Path file = ParquetFiles.write(dir.resolve("bytes.parquet"), "message m { optional binary region (STRING); }",
                List.of(List.of("north"), List.of(new byte[] {(byte) 0xC3, 0x28})));
        DataException e = assertThrows(DataException.class, () -> new ParquetTableReader().read(file));
        assertEquals("bytes.parquet, row 2", e.where());
        assertEquals("the text in column \"region\" is not valid UTF-8, which a Parquet STRING must be", e.problem());
    }

    @Test
    void anInfiniteValueIsRefusedAtItsRowAndNaNIsMissing() {
        String schema = "message m { required double x; }";
        Table t = new ParquetTableReader().read(ParquetFiles.write(dir.resolve("nan.parquet"), schema,
                List.of(List.of(1.0), List.of(Double.NaN))));
        assertTrue(t.column("x").isMissing(1), "NaN is missing, as the CSV reader reads NaN");
        Path inf = ParquetFiles.write(dir.resolve("inf.parquet"), schema,
                List.of(List.of(1.0), List.of(2.0), List.of(Double.POSITIVE_INFINITY)));
        DataException e = assertThrows(DataException.class, () -> new ParquetTableReader().read(inf));
        assertEquals("inf.parquet, row 3", e.where());
        assertTrue(e.problem().contains("column \"x\" is not a finite number"), e.problem());
    }

    @Test
    void theCapsAndTheMemoryAllowanceApplyAsToCsv() {
        List<List<Object>> rows = typedRows(400, 17);
        Path file = ParquetFiles.write(dir.resolve("caps.parquet"), TYPES, rows);
        DataException columns = assertThrows(DataException.class,
                () -> new ParquetTableReader(new CsvLimits(5, 1_000_000)).read(file));
        assertEquals("has 12 columns; at most 5 are accepted", columns.problem());
        DataException cells = assertThrows(DataException.class,
                () -> new ParquetTableReader(new CsvLimits(100, 12 * 400 - 1)).read(file));
        assertTrue(cells.problem().startsWith("has more than 4,799 cells"), cells.problem());
        Path empty = ParquetFiles.write(dir.resolve("empty.parquet"), TYPES, List.of());
        assertEquals("has columns but no data rows",
                assertThrows(DataException.class, () -> new ParquetTableReader().read(empty)).problem());

        long[] asked = {0};
        MemoryAllowance counting = bytes -> {
            asked[0] = Math.max(asked[0], bytes);
            return bytes;
        };
        Table t = new ParquetTableReader().read(file, "caps.parquet", counting);
        TableFootprint footprint = new ParquetTableReader().footprint(file, "caps.parquet");
        assertEquals(400, footprint.rows());
        assertEquals(12, footprint.columns());
        assertTrue(asked[0] >= TableFootprint.heldBy(t), "asked for at least what the table holds: " + asked[0]);
        assertTrue(asked[0] >= footprint.bytes(), "the footprint is part of what is asked for");
        RuntimeException refusal = new DataException("caps.parquet", "would hold too much");
        MemoryAllowance small = bytes -> {
            throw refusal;
        };
        assertEquals(refusal, assertThrows(DataException.class,
                () -> new ParquetTableReader().read(file, "caps.parquet", small)));
    }
}
