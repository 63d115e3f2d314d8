package org.forkscape.run;

import java.io.IOException;
import java.io.Reader;
import java.io.UncheckedIOException;
import java.math.BigInteger;
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
import org.forkscape.plan.Decision;
import org.forkscape.plan.ModelFamily;
import org.forkscape.plan.Plan;
import org.forkscape.plan.SpecificationSpace;

/**
 * Reads a finished run back from the specifications.csv that {@link SpecificationsCsv} wrote, so that a
 * run opens after a restart exactly as it was: numbers are written as the shortest decimal that reads
 * back to the same double, and the t statistic, p-value and interval are derived from the stored
 * estimate, standard error and degrees of freedom just as for a fresh run. The residual sum of squares is
 * the deviance column; the model F statistic is derived from R-squared (a generalized linear model's
 * likelihood-ratio p-value is read as written); the ratio of standard deviations from the standardized
 * estimate over the estimate (so the standardized estimate reads back to within rounding, about 1e-16
 * relative). An empty df is the standard normal reference for a generalized linear model.
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
            Columns c = new Columns(plan, models.space(), file);
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
            ResultTable results = new ResultTable(rows, rows == inPlan ? null : Arrays.copyOf(c.index, rows),
                    plan.generalized(), models.space());
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
                ModelFamily family = c.family[i];
                boolean normal = !family.leastSquares() && status.status() == FitStatus.OK;
                double df = normal ? Double.POSITIVE_INFINITY : c.df[i];
                double modelF = family.leastSquares() ? modelF(c.r2[i], c.nObs[i], c.nParams[i]) : Double.NaN;
                results.set(i, new KeyFit(c.estimate[i], c.stdError[i], df, c.nObs[i], c.nParams[i], c.r2[i],
                        c.deviance[i], modelF, status.status(), status.detail(), note, false, VarianceRoute.NONE,
                        c.stdEstimate[i] / c.estimate[i], family, c.effect[i], c.effectStdError[i],
                        family.leastSquares() ? Double.NaN : c.modelP[i]));
            }
            return new RunResult(plan, table, models, results, 0, Map.of(), seconds);
        } catch (IOException e) {
            throw new UncheckedIOException("cannot read " + file + ": " + e.getMessage(), e);
        }
    }

    /** The stored columns, grown as rows are read (no object per row). */
    private static final class Columns {
        private static final int ESTIMATE = at("estimate");
        private static final int STD_ERROR = at("std_error");
        private static final int DF = at("df");
        private static final int STD_ESTIMATE = at("std_estimate");
        private static final int EFFECT = at("effect");
        private static final int EFFECT_STD_ERROR = at("effect_std_error");
        private static final int N_OBS = at("n_obs");
        private static final int N_PARAMS = at("n_params");
        private static final int R2 = at("r2");
        private static final int MODEL_P = at("model_p_value");
        private static final int DEVIANCE = at("deviance");
        private static final int STATUS = at("status");
        /** The model decision's column (1-based, after spec), or -1 when every specification is least squares. */
        private final int modelColumn;
        int size;
        long[] index = new long[1024];
        double[] estimate = new double[1024];
        double[] stdEstimate = new double[1024];
        double[] stdError = new double[1024];
        double[] df = new double[1024];
        int[] nObs = new int[1024];
        int[] nParams = new int[1024];
        double[] r2 = new double[1024];
        double[] effect = new double[1024];
        double[] effectStdError = new double[1024];
        double[] modelP = new double[1024];
        double[] deviance = new double[1024];
        ModelFamily[] family = new ModelFamily[1024];
        String[] status = new String[1024];
        final Map<String, String> statuses = new HashMap<>();

        private final SpecificationSpace space;
        private final Path file;

        Columns(Plan plan, SpecificationSpace space, Path file) {
            this.space = space;
            this.file = file;
            int at = -1;
            for (int d = 0; d < plan.decisions().size(); d++) {
                if (plan.decisions().get(d) instanceof Decision.Model) {
                    at = 1 + d;
                }
            }
            modelColumn = at;
        }

        /** The key of the row's specification: its index, or beyond a long its rank in the plan's sample. */
        private long key(CSVRecord r) {
            if (!space.beyondLong()) {
                return Long.parseLong(r.get(0)) - 1;
            }
            long key = space.key(new BigInteger(r.get(0)));
            if (key < 0) {
                throw new IllegalStateException(file + ", line " + r.getRecordNumber() + ": specification " + r.get(0)
                        + " is not in the seeded sample of this run's plan");
            }
            return key;
        }

        private static int at(String column) {
            return SpecificationsCsv.STAT_COLUMNS.indexOf(column);
        }

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
                effect = Arrays.copyOf(effect, n);
                effectStdError = Arrays.copyOf(effectStdError, n);
                modelP = Arrays.copyOf(modelP, n);
                deviance = Arrays.copyOf(deviance, n);
                family = Arrays.copyOf(family, n);
                status = Arrays.copyOf(status, n);
            }
            index[size] = key(r);
            estimate[size] = number(r.get(from + ESTIMATE));
            stdError[size] = number(r.get(from + STD_ERROR));
            df[size] = number(r.get(from + DF));
            stdEstimate[size] = number(r.get(from + STD_ESTIMATE));
            effect[size] = number(r.get(from + EFFECT));
            effectStdError[size] = number(r.get(from + EFFECT_STD_ERROR));
            nObs[size] = Integer.parseInt(r.get(from + N_OBS));
            nParams[size] = Integer.parseInt(r.get(from + N_PARAMS));
            r2[size] = number(r.get(from + R2));
            modelP[size] = number(r.get(from + MODEL_P));
            deviance[size] = number(r.get(from + DEVIANCE));
            family[size] = modelColumn < 0 ? ModelFamily.OLS : family(r.get(modelColumn));
            status[size] = statuses.computeIfAbsent(r.get(from + STATUS), s -> s);
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

    private static ModelFamily family(String spelling) {
        for (ModelFamily f : ModelFamily.values()) {
            if (f.spelling().equals(spelling)) {
                return f;
            }
        }
        throw new IllegalStateException("not a model of this run's plan: " + spelling);
    }

    private static double number(String cell) {
        return cell.isEmpty() ? Double.NaN : Double.parseDouble(cell);
    }
}
