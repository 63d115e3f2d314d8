package org.forkscape.run;

import java.io.IOException;
import java.io.Reader;
import java.io.UncheckedIOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.Arrays;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import org.apache.commons.csv.CSVFormat;
import org.apache.commons.csv.CSVParser;
import org.apache.commons.csv.CSVRecord;
import org.forkscape.data.Table;
import org.forkscape.fit.FitStatus;
import org.forkscape.fit.KeyFit;
import org.forkscape.fit.SpecificationModels;
import org.forkscape.fit.VarianceRoute;
import org.forkscape.plan.Plan;

/**
 * Reads a finished run back from the specifications.csv that {@link SpecificationsCsv} wrote, so that a
 * run opens after a restart exactly as it was: numbers are written as the shortest decimal that reads
 * back to the same double, and the t statistic, p-value and interval are derived from the stored
 * estimate, standard error and degrees of freedom just as for a fresh run. The residual sum of squares is
 * not in the file and reads back as NaN; the model F statistic is derived from R-squared; the ratio of
 * standard deviations from the standardized estimate over the estimate (so the standardized estimate
 * reads back to within rounding, about 1e-16 relative).
 */
public final class SpecificationsCsvReader {
    private SpecificationsCsvReader() {
    }

    /**
     * @param plan    the plan the run used (its copy in the run folder)
     * @param table   the run's data
     * @param file    the run's specifications.csv
     * @param seconds the run's fitting time, from its summary
     */
    public static RunResult read(Plan plan, Table table, Path file, double seconds) {
        SpecificationModels models = new SpecificationModels(plan, table);
        long inPlan = models.space().size();
        List<String> header = SpecificationsCsv.header(plan.decisions());
        int statsFrom = 1 + plan.decisions().size();
        try (Reader reader = Files.newBufferedReader(file, StandardCharsets.UTF_8);
                CSVParser csv = CSVParser.builder().setReader(reader).setFormat(CSVFormat.RFC4180).get()) {
            Columns c = new Columns();
            boolean first = true;
            for (CSVRecord r : csv) {
                if (r.size() != header.size()) {
                    throw new IllegalStateException(file + ", line " + csv.getCurrentLineNumber()
                            + " does not have the columns of this run's plan");
                }
                if (first) {
                    first = false;
                    continue;
                }
                c.add(r, statsFrom);
            }
            int rows = c.size;
            ResultTable results = new ResultTable(rows, rows == inPlan ? null : Arrays.copyOf(c.index, rows));
            for (int i = 0; i < rows; i++) {
                String text = c.status[i];
                String note = "";
                if (text.startsWith("ok; ")) {
                    note = text.substring(4);
                    text = "ok";
                }
                FitStatus.Read status;
                try {
                    status = FitStatus.read(text);
                } catch (IllegalArgumentException e) {
                    throw new IllegalStateException(file + ", line " + (i + 2) + ": " + e.getMessage(), e);
                }
                results.set(i, new KeyFit(c.estimate[i], c.stdError[i], c.df[i], c.nObs[i], c.nParams[i], c.r2[i],
                        Double.NaN, modelF(c.r2[i], c.nObs[i], c.nParams[i]), status.status(), status.detail(), note,
                        false, VarianceRoute.NONE, c.stdEstimate[i] / c.estimate[i]));
            }
            return new RunResult(plan, table, models, results, 0, Map.of(), seconds);
        } catch (IOException e) {
            throw new UncheckedIOException("cannot read " + file + ": " + e.getMessage(), e);
        }
    }

    /** The stored columns, grown as rows are read (no object per row). */
    private static final class Columns {
        int size;
        long[] index = new long[1024];
        double[] estimate = new double[1024];
        double[] stdEstimate = new double[1024];
        double[] stdError = new double[1024];
        double[] df = new double[1024];
        int[] nObs = new int[1024];
        int[] nParams = new int[1024];
        double[] r2 = new double[1024];
        String[] status = new String[1024];
        final Map<String, String> statuses = new HashMap<>();

        void add(CSVRecord r, int from) {
            if (size == index.length) {
                int n = size * 2;
                index = Arrays.copyOf(index, n);
                estimate = Arrays.copyOf(estimate, n);
                stdEstimate = Arrays.copyOf(stdEstimate, n);
                stdError = Arrays.copyOf(stdError, n);
                df = Arrays.copyOf(df, n);
                nObs = Arrays.copyOf(nObs, n);
                nParams = Arrays.copyOf(nParams, n);
                r2 = Arrays.copyOf(r2, n);
                status = Arrays.copyOf(status, n);
            }
            index[size] = Long.parseLong(r.get(0)) - 1;
            estimate[size] = number(r.get(from));
            stdError[size] = number(r.get(from + 1));
            df[size] = number(r.get(from + 3));
            stdEstimate[size] = number(r.get(from + 7));
            nObs[size] = Integer.parseInt(r.get(from + 8));
            nParams[size] = Integer.parseInt(r.get(from + 9));
            r2[size] = number(r.get(from + 10));
            status[size] = statuses.computeIfAbsent(r.get(from + 13), s -> s);
            size++;
        }
    }

    /**
     * The overall F statistic from R-squared, F = (R2 / (K - 1)) / ((1 - R2) / (N - K)): the file keeps its
     * p-value, and this identity gives the statistic back to rounding (the p-value then agrees with the
     * file's to about 1e-12 relative, not always to the last digit).
     */
    static double modelF(double r2, int n, int k) {
        return k > 1 && n > k ? (r2 / (k - 1)) / ((1 - r2) / (n - k)) : Double.NaN;
    }

    private static double number(String cell) {
        return cell.isEmpty() ? Double.NaN : Double.parseDouble(cell);
    }
}
