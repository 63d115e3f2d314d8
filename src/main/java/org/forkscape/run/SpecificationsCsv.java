package org.forkscape.run;

import java.io.IOException;
import java.io.OutputStream;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import org.apache.commons.csv.CSVPrinter;
import org.forkscape.plan.Decision;
import org.forkscape.plan.SpecificationSpace;

/**
 * Writes specifications.csv: one row per specification, a column per decision holding the chosen
 * alternative's label, then the key estimate, the fit statistics, the standardized estimate and the average
 * marginal effect. Undefined numbers are empty cells; so is df under the standard normal reference of a
 * generalized linear model.
 */
public final class SpecificationsCsv {
    public static final List<String> STAT_COLUMNS = List.of("estimate", "std_error", "statistic", "df", "p_value",
            "ci_low", "ci_high", "std_estimate", "effect", "effect_std_error", "n_obs", "n_params", "r2", "adj_r2",
            "model_p_value", "deviance", "status");

    private SpecificationsCsv() {
    }

    public static List<String> header(List<Decision> decisions) {
        List<String> header = new ArrayList<>();
        header.add("spec");
        decisions.forEach(d -> header.add(d.name()));
        header.addAll(STAT_COLUMNS);
        return header;
    }

    public static void write(RunResult run, Path file) {
        AtomicFiles.write(file, out -> write(run, out));
    }

    public static void write(RunResult run, OutputStream stream) throws IOException {
        List<Decision> decisions = run.plan().decisions();
        SpecificationSpace space = run.models().space();
        ResultTable r = run.results();
        double confidence = run.plan().confidence();
        CSVPrinter csv = CsvCells.printer(stream);
        csv.printRecord(header(decisions).stream().map(SpreadsheetSafe::text).toList());
        long[] choices = new long[decisions.size()];
        List<String> row = new ArrayList<>(decisions.size() + 15);
        for (int slot = 0; slot < r.size(); slot++) {
            row.clear();
            long index = r.specIndex(slot);
            space.decode(index, choices);
            row.add(r.specNumber(slot).toString());
            for (int d = 0; d < decisions.size(); d++) {
                row.add(SpreadsheetSafe.text(decisions.get(d).label(choices[d])));
            }
            boolean ok = r.fitted(slot);
            row.add(CsvCells.number(r.estimate(slot)));
            row.add(ok ? CsvCells.number(r.stdError(slot)) : "");
            row.add(ok ? CsvCells.number(r.statistic(slot)) : "");
            row.add(ok && Double.isFinite(r.df(slot)) ? CsvCells.number(r.df(slot)) : "");
            row.add(ok ? CsvCells.number(r.pValue(slot)) : "");
            row.add(ok ? CsvCells.number(r.ciLow(slot, confidence)) : "");
            row.add(ok ? CsvCells.number(r.ciHigh(slot, confidence)) : "");
            row.add(CsvCells.number(r.standardizedEstimate(slot)));
            row.add(CsvCells.number(r.effect(slot)));
            row.add(ok ? CsvCells.number(r.effectStdError(slot)) : "");
            row.add(Integer.toString(r.nObs(slot)));
            row.add(Integer.toString(r.nParams(slot)));
            row.add(CsvCells.number(r.r2(slot)));
            row.add(CsvCells.number(r.adjustedR2(slot)));
            row.add(CsvCells.number(r.modelPValue(slot)));
            row.add(CsvCells.number(r.deviance(slot)));
            row.add(SpreadsheetSafe.text(r.status(slot)));
            csv.printRecord(row);
        }
        csv.flush();
    }
}
