package org.forkscape.data;

/**
 * Caps that keep one upload from exhausting a shared server.
 *
 * @param maxColumns columns in the header
 * @param maxCells   rows times columns
 */
public record CsvLimits(int maxColumns, long maxCells) {
    /** 10,000 columns and 200 million cells: far above any regression data set, far below the heap. */
    public static final CsvLimits DEFAULT = new CsvLimits(10_000, 200_000_000L);
}
