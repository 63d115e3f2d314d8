package org.forkscape.infer;

import java.io.IOException;
import java.io.OutputStream;
import java.nio.file.Path;
import java.util.List;
import org.apache.commons.csv.CSVPrinter;
import org.forkscape.run.AtomicFiles;
import org.forkscape.run.CsvCells;

/** Writes null-draws.csv: one row per null draw with its curve statistics. */
public final class NullDrawsCsv {
    public static final String FILE = "null-draws.csv";
    public static final List<String> HEADER = List.of("draw", "fitted", "median_estimate", "dominant_sign",
            "significant_in_dominant_sign", "share_significant", "mean_z", "min_p");

    private NullDrawsCsv() {
    }

    public static void write(NullDrawResult result, Path folder) {
        AtomicFiles.write(folder.resolve(FILE), out -> write(result, out));
    }

    static void write(NullDrawResult result, OutputStream stream) throws IOException {
        CSVPrinter csv = CsvCells.printer(stream);
        csv.printRecord(HEADER);
        for (int d = 0; d < result.drawCount(); d++) {
            CurveStatistics c = result.draw(d);
            boolean any = c.fitted() > 0;
            csv.printRecord(d + 1, c.fitted(), CsvCells.number(c.median()), any ? c.dominantSignName() : "",
                    any ? Integer.toString(c.significant()) : "", CsvCells.number(c.shareSignificant()),
                    CsvCells.number(c.meanZ()), CsvCells.number(c.minP()));
        }
        csv.flush();
    }
}
