package org.forkscape.data;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTimeoutPreemptively;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.junit.jupiter.api.Assertions.fail;

import java.io.ByteArrayInputStream;
import java.io.ByteArrayOutputStream;
import java.io.IOException;
import java.io.OutputStreamWriter;
import java.io.UncheckedIOException;
import java.nio.charset.StandardCharsets;
import java.time.Duration;
import java.util.ArrayList;
import java.util.HashSet;
import java.util.List;
import java.util.Set;
import java.util.SplittableRandom;
import java.util.TreeSet;
import org.apache.commons.csv.CSVFormat;
import org.apache.commons.csv.CSVPrinter;
import org.junit.jupiter.api.Test;

/**
 * Seeded random files: each either loads or raises a {@link DataException} naming the file; nothing
 * else is ever thrown. Tables written by Apache Commons CSV's own RFC 4180 printer, an implementation
 * outside this project, must load back with exactly the names, types and values written. The timeout
 * on each batch only detects a hang; it is far above the time a batch takes.
 */
class CsvFuzzTest {
    private static final int CASES_PER_BATCH = 5_000;
    private static final Duration HANG = Duration.ofMinutes(2);
    private static final Set<String> MISSING = Set.of("", "NA", "NaN", ".");
    private static final String STRUCTURE = ",\"\n\r a1.";
    private static final String[] PIECES = {",", ",", "\"", "\"\"", "\n", "\r\n", "\r", " ", "a", "b", "1", "2.5", "-",
            "e", "1e5", ".", "NA", "NaN", "x y", "é", "日", "\t", "\uFEFF", "1e999", "+", "0"};

    @Test
    void randomTextLoadsOrGivesADataError() {
        assertTimeoutPreemptively(HANG, () -> {
            SplittableRandom random = new SplittableRandom(101);
            int loaded = 0;
            for (int i = 0; i < CASES_PER_BATCH; i++) {
                StringBuilder b = new StringBuilder();
                int n = random.nextInt(60);
                for (int k = 0; k < n; k++) {
                    b.append(PIECES[random.nextInt(PIECES.length)]);
                }
                loaded += survive(b.toString().getBytes(StandardCharsets.UTF_8), limits(random)) == null ? 0 : 1;
            }
            assertBothOutcomes(loaded);
        });
    }

    @Test
    void randomBytesLoadOrGiveADataError() {
        assertTimeoutPreemptively(HANG, () -> {
            SplittableRandom random = new SplittableRandom(202);
            for (int i = 0; i < CASES_PER_BATCH; i++) {
                byte[] bytes = new byte[random.nextInt(80)];
                for (int k = 0; k < bytes.length; k++) {
                    int kind = random.nextInt(5);
                    bytes[k] = (byte) (kind == 0 ? random.nextInt(256) : kind == 1 ? random.nextInt(0x80, 0x100)
                            : STRUCTURE.charAt(random.nextInt(STRUCTURE.length())));
                }
                survive(bytes, CsvLimits.DEFAULT);
            }
        });
    }

    @Test
    void tablesWrittenByCommonsCsvLoadBackExactly() {
        assertTimeoutPreemptively(HANG, () -> {
            SplittableRandom random = new SplittableRandom(303);
            int[] numericAndText = new int[2];
            for (int i = 0; i < CASES_PER_BATCH; i++) {
                for (Column c : roundTrip(random).columns()) {
                    numericAndText[c instanceof NumericColumn ? 0 : 1]++;
                }
            }
            assertTrue(numericAndText[0] > CASES_PER_BATCH && numericAndText[1] > CASES_PER_BATCH,
                    java.util.Arrays.toString(numericAndText));
        });
    }

    @Test
    void mutatedValidFilesLoadOrGiveADataError() {
        assertTimeoutPreemptively(HANG, () -> {
            SplittableRandom random = new SplittableRandom(404);
            int loaded = 0;
            for (int i = 0; i < CASES_PER_BATCH; i++) {
                List<List<String>> rows = randomTable(random);
                StringBuilder b = new StringBuilder(new String(print(rows), StandardCharsets.UTF_8));
                int edits = 1 + random.nextInt(5);
                for (int e = 0; e < edits && b.length() > 0; e++) {
                    int at = random.nextInt(b.length());
                    switch (random.nextInt(4)) {
                        case 0 -> b.deleteCharAt(at);
                        case 1 -> b.insert(at, PIECES[random.nextInt(PIECES.length)]);
                        case 2 -> b.setCharAt(at, '"');
                        default -> b.insert(at, b.substring(at, Math.min(b.length(), at + random.nextInt(10))));
                    }
                }
                loaded += survive(b.toString().getBytes(StandardCharsets.UTF_8), limits(random)) == null ? 0 : 1;
            }
            assertBothOutcomes(loaded);
        });
    }

    /** The generator is useful only if it makes both loadable and broken files in fair numbers. */
    private static void assertBothOutcomes(int loaded) {
        assertTrue(loaded > CASES_PER_BATCH / 20, loaded + " loaded");
        assertTrue(CASES_PER_BATCH - loaded > CASES_PER_BATCH / 20, (CASES_PER_BATCH - loaded) + " refused");
    }

    private static CsvLimits limits(SplittableRandom random) {
        return random.nextInt(10) == 0 ? new CsvLimits(1 + random.nextInt(4), 1 + random.nextInt(12)) : CsvLimits.DEFAULT;
    }

    private static Table survive(byte[] bytes, CsvLimits limits) {
        try {
            Table t = new CsvTableReader(limits).read(new ByteArrayInputStream(bytes), "f.csv");
            assertTrue(t.rowCount() > 0);
            assertFalse(t.columns().isEmpty());
            for (Column c : t.columns()) {
                assertEquals(t.rowCount(), c.size());
                assertFalse(c.name().isEmpty());
                if (c instanceof CategoricalColumn cat) {
                    assertEquals(new ArrayList<>(new TreeSet<>(cat.levels())), cat.levels());
                    for (int code : cat.codes()) {
                        assertTrue(code >= -1 && code < cat.levels().size());
                    }
                }
            }
            return t;
        } catch (DataException e) {
            assertTrue(e.getMessage().startsWith("f.csv"), e.getMessage());
            assertFalse(e.problem().isBlank());
            return null;
        } catch (RuntimeException | StackOverflowError e) {
            fail("bytes " + java.util.Arrays.toString(bytes) + " threw " + e, e);
            return null;
        }
    }

    private static Table roundTrip(SplittableRandom random) {
        List<List<String>> rows = randomTable(random);
        Table t = new CsvTableReader().read(new ByteArrayInputStream(print(rows)), "f.csv");
        List<String> header = rows.get(0);
        assertEquals(header.stream().map(String::strip).toList(), t.columns().stream().map(Column::name).toList());
        assertEquals(rows.size() - 1, t.rowCount());
        for (int j = 0; j < header.size(); j++) {
            List<String> cells = new ArrayList<>();
            for (int i = 1; i < rows.size(); i++) {
                cells.add(rows.get(i).get(j).strip());
            }
            boolean numeric = cells.stream().allMatch(c -> MISSING.contains(c) || NumberSyntax.isDecimal(c));
            Column c = t.columns().get(j);
            if (numeric) {
                double[] expected = cells.stream().mapToDouble(v -> MISSING.contains(v) ? Double.NaN
                        : Double.parseDouble(v)).toArray();
                assertArrayEquals(expected, ((NumericColumn) c).values(), String.valueOf(rows));
            } else {
                CategoricalColumn cat = (CategoricalColumn) c;
                for (int i = 0; i < cells.size(); i++) {
                    String value = cells.get(i);
                    int code = cat.codes()[i];
                    assertEquals(MISSING.contains(value) ? null : value, code < 0 ? null : cat.levels().get(code));
                }
            }
        }
        return t;
    }

    /** A header of unique names and 1-6 rows of numbers, words with awkward characters and missing cells. */
    private static List<List<String>> randomTable(SplittableRandom random) {
        int columns = 2 + random.nextInt(5);
        List<List<String>> rows = new ArrayList<>();
        List<String> header = new ArrayList<>();
        Set<String> names = new HashSet<>();
        while (header.size() < columns) {
            String name = word(random, 1);
            if (!name.isBlank() && names.add(name.strip())) {
                header.add(name);
            }
        }
        rows.add(header);
        boolean[] numericColumn = new boolean[columns];
        for (int j = 0; j < columns; j++) {
            numericColumn[j] = random.nextBoolean();
        }
        int n = 1 + random.nextInt(6);
        for (int i = 0; i < n; i++) {
            List<String> row = new ArrayList<>();
            for (int j = 0; j < columns; j++) {
                int kind = random.nextInt(10);
                if (kind == 0) {
                    row.add(new String[] {"", "NA", "NaN", ".", " NA "}[random.nextInt(5)]);
                } else if (numericColumn[j] && kind < 9) {
                    double v = random.nextInt(3) == 0 ? random.nextInt(-50, 50) : random.nextGaussian() * Math.pow(10,
                            random.nextInt(-8, 9));
                    row.add(random.nextBoolean() ? Double.toString(v) : String.format("%.6e", v));
                } else {
                    row.add(word(random, 0));
                }
            }
            rows.add(row);
        }
        return rows;
    }

    private static String word(SplittableRandom random, int minLength) {
        String alphabet = "abcxyz019 ,\"\n\r-._éß日";
        StringBuilder b = new StringBuilder();
        int n = minLength + random.nextInt(8);
        for (int k = 0; k < n; k++) {
            b.append(alphabet.charAt(random.nextInt(alphabet.length())));
        }
        return b.toString();
    }

    private static byte[] print(List<List<String>> rows) {
        ByteArrayOutputStream bytes = new ByteArrayOutputStream();
        try (CSVPrinter printer = new CSVPrinter(new OutputStreamWriter(bytes, StandardCharsets.UTF_8), CSVFormat.RFC4180)) {
            for (List<String> row : rows) {
                printer.printRecord(row);
            }
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
        return bytes.toByteArray();
    }
}
