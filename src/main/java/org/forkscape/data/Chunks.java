package org.forkscape.data;

import java.util.ArrayList;
import java.util.List;

/**
 * A growing column of primitives kept in fixed blocks, so that growing never copies what is already there
 * (doubling one array holds the old and the new copy at once), and the column's final array is assembled
 * once, block by block, when the row count is known. One block of each of a table's columns spans about
 * {@value #SPAN} cells ({@link #shiftFor}; at least 256 rows a block), so the unused end of the last blocks
 * is at most 512 KB of doubles up to 256 columns, 20 MB at 10,000, and a small table is priced small.
 */
final class Chunks {
    static final int SPAN = 1 << 16;
    private static final int MIN_SHIFT = 8;
    private static final int MAX_SHIFT = 16;

    /** log2 of the block length for a table of {@code columns} columns: 256 to 65,536 rows. */
    static int shiftFor(int columns) {
        int perColumn = SPAN / Math.max(1, columns);
        int shift = 31 - Integer.numberOfLeadingZeros(Math.max(1, perColumn));
        return Math.max(MIN_SHIFT, Math.min(MAX_SHIFT, shift));
    }

    /** What the blocks of one column of {@code rows} rows hold, {@code width} bytes an element. */
    static long bytes(long rows, int width, int shift) {
        long blocks = (rows + (1L << shift) - 1) >>> shift;
        return blocks * HeapSizes.array(1L << shift, width);
    }

    /** Numbers, NaN for missing. */
    static final class Doubles {
        private final int shift;
        private final int size;
        private final List<double[]> blocks = new ArrayList<>();

        Doubles(int shift) {
            this.shift = shift;
            this.size = 1 << shift;
        }

        /** @return the bytes newly allocated (a block, or 0) */
        long set(int row, double value) {
            long added = 0;
            if ((row >>> shift) == blocks.size()) {
                blocks.add(new double[size]);
                added = HeapSizes.array(size, Double.BYTES);
            }
            blocks.get(row >>> shift)[row & (size - 1)] = value;
            return added;
        }

        /** The first {@code rows} values as one array; the blocks are released as they are copied. */
        double[] toArray(int rows) {
            double[] out = new double[rows];
            for (int b = 0; b < blocks.size(); b++) {
                int from = b << shift;
                System.arraycopy(blocks.get(b), 0, out, from, Math.min(size, rows - from));
                blocks.set(b, null);
            }
            return out;
        }

        long bytes() {
            return (long) blocks.size() * HeapSizes.array(size, Double.BYTES);
        }
    }

    /** Level codes, -1 for missing. */
    static final class Ints {
        private final int shift;
        private final int size;
        private final List<int[]> blocks = new ArrayList<>();

        Ints(int shift) {
            this.shift = shift;
            this.size = 1 << shift;
        }

        /** @return the bytes newly allocated (a block, or 0) */
        long set(int row, int value) {
            long added = 0;
            while ((row >>> shift) >= blocks.size()) {
                blocks.add(new int[size]);
                added += HeapSizes.array(size, Integer.BYTES);
            }
            blocks.get(row >>> shift)[row & (size - 1)] = value;
            return added;
        }

        long bytes() {
            return (long) blocks.size() * HeapSizes.array(size, Integer.BYTES);
        }

        /** The first {@code rows} codes as one array, each mapped through {@code recode} (-1 stays -1). */
        int[] toArray(int rows, int[] recode) {
            int[] out = new int[rows];
            for (int b = 0; b < blocks.size(); b++) {
                int[] block = blocks.get(b);
                int from = b << shift;
                int n = Math.min(size, rows - from);
                for (int i = 0; i < n; i++) {
                    out[from + i] = block[i] < 0 ? -1 : recode[block[i]];
                }
                blocks.set(b, null);
            }
            return out;
        }
    }

    private Chunks() {
    }
}
