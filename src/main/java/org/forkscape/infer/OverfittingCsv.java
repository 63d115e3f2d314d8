package org.forkscape.infer;

import java.io.IOException;
import java.io.OutputStream;
import java.nio.file.Path;
import java.util.List;
import org.apache.commons.csv.CSVPrinter;
import org.forkscape.run.AtomicFiles;
import org.forkscape.run.CsvCells;
import org.forkscape.run.ResultTable;

/**
 * Writes overfitting.csv: one row per row of specifications.csv, in the same order, with the
 * {@link Overfitting} yardstick; empty cells for specifications without an estimate.
 */
public final class OverfittingCsv {
    public static final String FILE = "overfitting.csv";
    public static final List<String> HEADER = List.of("spec", "r2", "r2_null_expectation", "adj_r2",
            "model_p_value", "rows_per_coefficient", "few_rows");

    private OverfittingCsv() {
    }

    public static void write(ResultTable results, Path folder) {
        AtomicFiles.write(folder.resolve(FILE), out -> write(results, out));
    }

    static void write(ResultTable r, OutputStream stream) throws IOException {
        CSVPrinter csv = CsvCells.printer(stream);
        csv.printRecord(HEADER);
        for (int slot = 0; slot < r.size(); slot++) {
            String spec = r.specNumber(slot).toString();
            if (!r.fitted(slot)) {
                csv.printRecord(spec, "", "", "", "", "", "");
                continue;
            }
            Overfitting o = Overfitting.of(r, slot);
            csv.printRecord(spec, CsvCells.number(o.r2()), CsvCells.number(o.r2NullExpectation()),
                    CsvCells.number(o.adjustedR2()), CsvCells.number(o.modelPValue()), CsvCells.number(o.rowsPerCoefficient()),
                    o.fewRows() ? "yes" : "no");
        }
        csv.flush();
    }
}
