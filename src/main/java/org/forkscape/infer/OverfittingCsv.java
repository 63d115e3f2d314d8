package org.forkscape.infer;

import java.io.IOException;
import java.io.OutputStream;
import java.io.OutputStreamWriter;
import java.io.Writer;
import java.nio.charset.StandardCharsets;
import java.nio.file.Path;
import java.util.List;
import org.apache.commons.csv.CSVFormat;
import org.apache.commons.csv.CSVPrinter;
import org.forkscape.run.AtomicFiles;
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
        Writer writer = new OutputStreamWriter(stream, StandardCharsets.UTF_8);
        CSVPrinter csv = new CSVPrinter(writer, CSVFormat.RFC4180.builder().setRecordSeparator("\n").get());
        csv.printRecord(HEADER);
        for (int slot = 0; slot < r.size(); slot++) {
            String spec = Long.toString(r.specIndex(slot) + 1);
            if (!r.fitted(slot)) {
                csv.printRecord(spec, "", "", "", "", "", "");
                continue;
            }
            Overfitting o = Overfitting.of(r, slot);
            csv.printRecord(spec, Numbers.cell(o.r2()), Numbers.cell(o.r2NullExpectation()),
                    Numbers.cell(o.adjustedR2()), Numbers.cell(o.modelPValue()), Numbers.cell(o.rowsPerCoefficient()),
                    o.fewRows() ? "yes" : "no");
        }
        csv.flush();
    }
}
