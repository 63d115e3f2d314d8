package org.forkscape.data;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertInstanceOf;
import static org.junit.jupiter.api.Assertions.assertNotSame;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import java.io.Writer;
import java.lang.management.ManagementFactory;
import java.lang.management.MemoryMXBean;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import java.util.Locale;
import java.util.SplittableRandom;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * The reader's storage: text as int codes with each distinct text kept once, numbers as double arrays, and
 * no cell's text kept past its row. The heap is measured with the JDK's MemoryMXBean after full
 * collections at points spread through the reading (each time the reader asks its allowance for more), as
 * {@code MemoryEstimateTest} measures runs; the bounds per cell are those README states (8 bytes a number
 * and 4 a code, plus the blocks' unused ends and the parser's buffers).
 */
class CompactColumnsTest {
    private static final MemoryMXBean MEMORY = ManagementFactory.getMemoryMXBean();

    @Test
    void aHundredThousandRepeatsOfThreeTextsHoldThreeStringsAndIntCodes(@TempDir Path dir) throws IOException {
        String[] texts = {"north", "south", "east"};
        Path file = write(dir, 100_000, 2, (i, j) -> j == 0 ? texts[i % 3] : Integer.toString(i % 7));
        Table t = new CsvTableReader().read(file);
        CategoricalColumn zone = assertInstanceOf(CategoricalColumn.class, t.column("c0"));
        assertEquals(List.of("east", "north", "south"), zone.levels());
        assertEquals(100_000, zone.codes().length);
        assertArrayEquals(new int[] {1, 2, 0, 1}, java.util.Arrays.copyOf(zone.codes(), 4));
        assertNotSame(zone.levels().get(0), zone.levels().get(1));
        NumericColumn n = assertInstanceOf(NumericColumn.class, t.column("c1"));
        assertEquals(double[].class, n.values().getClass());
        assertEquals(6.0, n.values()[6]);
    }

    @Test
    void numbersTakeAboutEightBytesACellWhileReadingAndAfter(@TempDir Path dir) throws IOException {
        SplittableRandom r = new SplittableRandom(7);
        double[] drawn = new double[400_000 * 5];
        for (int k = 0; k < drawn.length; k++) {
            drawn[k] = Math.round(r.nextDouble() * 1e6) / 1e3;
        }
        Path file = write(dir, 400_000, 5, (i, j) -> String.format(Locale.ROOT, "%.3f", drawn[i * 5 + j]));
        Measured m = measure(file);
        // each column's 3.2 MB array is a humongous object of the G1 collector, taking whole regions
        assertTrue(m.peakPerCell() < 12, m.toString());
        assertTrue(m.retainedPerCell() < 12, m.toString());
        assertTrue(m.countedPerCell() >= 8 && m.countedPerCell() < 12, m.toString());
    }

    @Test
    void textTakesAboutFourBytesACellWhileReadingAndAfter(@TempDir Path dir) throws IOException {
        String[] texts = {"reading room", "science lab", "sports hall", "library", "music room"};
        Path file = write(dir, 400_000, 5, (i, j) -> texts[(i * 7 + j * 3) % 5]);
        Measured m = measure(file);
        assertTrue(m.peakPerCell() < 7, m.toString());
        assertTrue(m.retainedPerCell() < 5, m.toString());
        assertTrue(m.countedPerCell() >= 4 && m.countedPerCell() < 7, m.toString());
    }

    @Test
    void aNumberColumnThatTurnsToTextKeepsItsNumbersAsWritten(@TempDir Path dir) throws IOException {
        // the turn comes after several blocks, so the second reading crosses block ends too
        Path file = write(dir, 70_000, 2, (i, j) -> j == 1 ? "1" : i == 69_999 ? "n/a" : i % 2 == 0 ? "1.50" : "NA");
        CategoricalColumn c = assertInstanceOf(CategoricalColumn.class, new CsvTableReader().read(file).column("c0"));
        assertEquals(List.of("1.50", "n/a"), c.levels());
        assertEquals(0, c.codes()[0]);
        assertEquals(-1, c.codes()[1]);
        assertEquals(1, c.codes()[69_999]);
        assertEquals(35_000, c.levelCounts()[0]);
    }

    @Test
    void anAllowanceThatRefusesStopsTheReading(@TempDir Path dir) throws IOException {
        Path file = write(dir, 100_000, 3, (i, j) -> Integer.toString(i));
        long[] asked = {0};
        Refused e = assertThrows(Refused.class, () -> new CsvTableReader().read(file, "f.csv", bytes -> {
            asked[0] = bytes;
            if (bytes > 1 << 20) {
                throw new Refused();
            }
            return bytes;
        }));
        assertEquals("no more", e.getMessage());
        assertTrue(asked[0] > 1 << 20 && asked[0] < 2 << 20, "asked " + asked[0]);
    }

    private static final class Refused extends RuntimeException {
        Refused() {
            super("no more");
        }
    }

    private interface Cell {
        String at(int row, int column);
    }

    private static Path write(Path dir, int rows, int columns, Cell cell) throws IOException {
        Path file = dir.resolve("cells.csv");
        try (Writer w = Files.newBufferedWriter(file, StandardCharsets.UTF_8)) {
            for (int j = 0; j < columns; j++) {
                w.write((j > 0 ? "," : "") + "c" + j);
            }
            w.write('\n');
            for (int i = 0; i < rows; i++) {
                for (int j = 0; j < columns; j++) {
                    if (j > 0) {
                        w.write(',');
                    }
                    w.write(cell.at(i, j));
                }
                w.write('\n');
            }
        }
        return file;
    }

    private record Measured(long cells, long peak, long retained, long counted) {
        double peakPerCell() {
            return (double) peak / cells;
        }

        double retainedPerCell() {
            return (double) retained / cells;
        }

        double countedPerCell() {
            return (double) counted / cells;
        }

        @Override
        public String toString() {
            return String.format(Locale.ROOT, "bytes a cell: peak %.2f, retained %.2f, counted by the reader %.2f",
                    peakPerCell(), retainedPerCell(), countedPerCell());
        }
    }

    /** Reads the file, measuring the live heap each time the reader asks for about 1/16 of the table more. */
    private static Measured measure(Path file) {
        long before = liveHeap();
        long[] peak = {0};
        long[] counted = {0};
        long step = 1 << 20;
        Table t = new CsvTableReader().read(file, "cells.csv", bytes -> {
            peak[0] = Math.max(peak[0], liveHeap() - before);
            counted[0] = Math.max(counted[0], bytes);
            return bytes + step;
        });
        long cells = (long) t.rowCount() * t.columns().size();
        peak[0] = Math.max(peak[0], liveHeap() - before);
        long retained = liveHeap() - before;
        assertEquals(400_000, t.rowCount());
        return new Measured(cells, peak[0], retained, counted[0]);
    }

    private static long liveHeap() {
        System.gc();
        System.gc();
        return MEMORY.getHeapMemoryUsage().getUsed();
    }
}
