package org.forkscape.data;

import java.io.IOException;
import java.nio.file.Path;

/**
 * The one place that tells the data formats apart, for every door that reads a plan's {@code data}: a
 * folder, or a file whose name ends in {@code .parquet}, is Parquet ({@link ParquetTableReader}); any other
 * file is CSV ({@link CsvTableReader}). Both give the same {@link Table} under the same {@link CsvLimits}
 * and {@link MemoryAllowance}.
 */
public final class DataFiles {
    private DataFiles() {
    }

    /** Reads a plan's data without a memory limit, naming it by its own name in messages. */
    public static Table read(Path data) {
        return read(data, nameOf(data), CsvLimits.DEFAULT, MemoryAllowance.UNLIMITED);
    }

    /** Reads data named {@code source} in messages, within {@code limits} and {@code allowance}. */
    public static Table read(Path data, String source, CsvLimits limits, MemoryAllowance allowance) {
        return ParquetParts.isParquet(data) ? new ParquetTableReader(limits).read(data, source, allowance)
                : new CsvTableReader(limits).read(data, source, allowance);
    }

    /** What reading the data will hold at most before its text levels, known before it is read. */
    public static TableFootprint footprint(Path data, String source, CsvLimits limits) throws IOException {
        return ParquetParts.isParquet(data) ? new ParquetTableReader(limits).footprint(data, source)
                : TableFootprint.of(data, limits);
    }

    /** The last segment of a path, for messages. */
    static String nameOf(Path data) {
        return data.getFileName() == null ? data.toString() : data.getFileName().toString();
    }
}
