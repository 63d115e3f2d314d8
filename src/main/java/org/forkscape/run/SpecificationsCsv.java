package org.forkscape.run;

import java.io.IOException;
import java.io.OutputStream;
import java.nio.file.Path;
import java.nio.charset.StandardCharsets;
import java.util.ArrayDeque;
import java.util.ArrayList;
import java.util.Deque;
import java.util.List;
import java.util.concurrent.ExecutionException;
import java.util.concurrent.ExecutorService;
import java.util.concurrent.Executors;
import java.util.concurrent.Future;
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

    /** Rows formatted per task: large enough that a task outweighs its hand-over, small enough to keep the cores even. */
    private static final int BLOCK = 4096;

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
        write(run, file, 1, RunProgress.SILENT);
    }

    /**
     * Writes the file from {@code threads} threads: blocks of rows are formatted apart (shortest decimals and
     * p-values are most of the cost) and written in their order, so the bytes are those of one thread.
     *
     * @param progress receives the rows written out of the run's specifications
     */
    public static void write(RunResult run, Path file, int threads, RunProgress progress) {
        AtomicFiles.write(file, out -> write(run, out, threads, progress));
    }

    public static void write(RunResult run, OutputStream stream) throws IOException {
        write(run, stream, 1, RunProgress.SILENT);
    }

    private static void write(RunResult run, OutputStream stream, int threads, RunProgress progress)
            throws IOException {
        Rows rows = new Rows(run);
        StringBuilder header = new StringBuilder();
        CSVPrinter csv = CsvCells.printer(header);
        csv.printRecord(header(run.plan().decisions()).stream().map(SpreadsheetSafe::text).toList());
        stream.write(header.toString().getBytes(StandardCharsets.UTF_8));
        int size = run.results().size();
        int blocks = (size + BLOCK - 1) / BLOCK;
        if (threads <= 1 || blocks <= 1) {
            for (int b = 0; b < blocks; b++) {
                stream.write(rows.block(b));
                progress.update(Math.min(size, (b + 1L) * BLOCK), size);
            }
            return;
        }
        ExecutorService pool = Executors.newFixedThreadPool(threads, r -> {
            Thread t = new Thread(r, "forkscape-write");
            t.setDaemon(true);
            return t;
        });
        try {
            Deque<Future<byte[]>> ahead = new ArrayDeque<>();
            int next = 0;
            for (int b = 0; b < blocks; b++) {
                while (next < blocks && ahead.size() < 2 * threads) {
                    int block = next++;
                    ahead.add(pool.submit(() -> rows.block(block)));
                }
                stream.write(result(ahead.poll()));
                progress.update(Math.min(size, (b + 1L) * BLOCK), size);
            }
        } finally {
            WorkerPools.stop(pool);
        }
    }

    private static byte[] result(Future<byte[]> block) throws IOException {
        try {
            return block.get();
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
            throw new RunCancelledException();
        } catch (ExecutionException e) {
            if (e.getCause() instanceof IOException io) {
                throw io;
            }
            if (e.getCause() instanceof RuntimeException re) {
                throw re;
            }
            throw new IllegalStateException(e.getCause());
        }
    }

    /** The rows of one run, formatted a block at a time; each block is independent of the others. */
    private static final class Rows {
        private final List<Decision> decisions;
        private final SpecificationSpace space;
        private final ResultTable r;
        private final double confidence;

        Rows(RunResult run) {
            decisions = run.plan().decisions();
            space = run.models().space();
            r = run.results();
            confidence = run.plan().confidence();
        }

        /** The UTF-8 bytes of block {@code b}'s rows: a printer over a char buffer, encoded once per block. */
        byte[] block(int b) throws IOException {
            StringBuilder text = new StringBuilder(BLOCK * 256);
            CSVPrinter csv = CsvCells.printer(text);
            long[] choices = new long[decisions.size()];
            int end = Math.min(r.size(), (b + 1) * BLOCK);
            for (int slot = b * BLOCK; slot < end; slot++) {
                space.decode(r.specIndex(slot), choices);
                csv.print(r.specNumber(slot).toString());
                for (int d = 0; d < decisions.size(); d++) {
                    csv.print(SpreadsheetSafe.text(decisions.get(d).label(choices[d])));
                }
                boolean ok = r.fitted(slot);
                csv.print(CsvCells.number(r.estimate(slot)));
                csv.print(ok ? CsvCells.number(r.stdError(slot)) : "");
                csv.print(ok ? CsvCells.number(r.statistic(slot)) : "");
                csv.print(ok && Double.isFinite(r.df(slot)) ? CsvCells.number(r.df(slot)) : "");
                csv.print(ok ? CsvCells.number(r.pValue(slot)) : "");
                csv.print(ok ? CsvCells.number(r.ciLow(slot, confidence)) : "");
                csv.print(ok ? CsvCells.number(r.ciHigh(slot, confidence)) : "");
                csv.print(CsvCells.number(r.standardizedEstimate(slot)));
                csv.print(CsvCells.number(r.effect(slot)));
                csv.print(ok ? CsvCells.number(r.effectStdError(slot)) : "");
                csv.print(Integer.toString(r.nObs(slot)));
                csv.print(Integer.toString(r.nParams(slot)));
                csv.print(CsvCells.number(r.r2(slot)));
                csv.print(CsvCells.number(r.adjustedR2(slot)));
                csv.print(CsvCells.number(r.modelPValue(slot)));
                csv.print(CsvCells.number(r.deviance(slot)));
                csv.print(SpreadsheetSafe.text(r.status(slot)));
                csv.println();
            }
            return text.toString().getBytes(StandardCharsets.UTF_8);
        }
    }
}
