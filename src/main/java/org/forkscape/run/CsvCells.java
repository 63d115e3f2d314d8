package org.forkscape.run;

import java.io.BufferedWriter;
import java.io.IOException;
import java.io.OutputStream;
import java.io.OutputStreamWriter;
import java.nio.charset.StandardCharsets;
import org.apache.commons.csv.CSVFormat;
import org.apache.commons.csv.CSVPrinter;

/** What every CSV file a run writes has in common: RFC 4180 with LF line ends, UTF-8, number cells. */
public final class CsvCells {
    private static final CSVFormat FORMAT = CSVFormat.RFC4180.builder().setRecordSeparator("\n").get();

    private CsvCells() {
    }

    /**
     * A printer onto {@code stream} (not closed by it; call {@code flush()} at the end), with a char
     * buffer in front of the encoder because the printer writes cell by cell.
     */
    public static CSVPrinter printer(OutputStream stream) throws IOException {
        return new CSVPrinter(new BufferedWriter(new OutputStreamWriter(stream, StandardCharsets.UTF_8), 1 << 16),
                FORMAT);
    }

    /** A printer appending to {@code text}: for rows formatted in memory and encoded as a block. */
    public static CSVPrinter printer(Appendable text) throws IOException {
        return new CSVPrinter(text, FORMAT);
    }

    /** Shortest decimal that reads back to the same double; empty for NaN and infinities. */
    public static String number(double v) {
        if (!Double.isFinite(v)) {
            return "";
        }
        if (v == Math.rint(v) && Math.abs(v) < 1e15) {
            return Long.toString((long) v);
        }
        return Double.toString(v);
    }
}
