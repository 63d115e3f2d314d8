package org.forkscape.bench;

import java.io.IOException;
import java.io.InputStream;
import java.io.StringReader;
import java.io.UncheckedIOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.StandardCopyOption;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;
import java.util.concurrent.TimeUnit;
import org.apache.commons.csv.CSVFormat;
import org.apache.commons.csv.CSVParser;
import org.apache.commons.csv.CSVRecord;

/**
 * R's {@code glm} with {@code sandwich::vcovHC(type = "HC1")} timed on the same data file, by running the
 * bundled {@code time-glm.R} through {@code Rscript} from the PATH: it fits the given specifications one by
 * one for a time budget and reports, per specification, the key coefficient, its standard error, glm's
 * iterations and the seconds of {@code glm} + {@code vcovHC} and of {@code glm.fit} alone.
 */
final class RGlmTiming {
    /** The script's exit status when sandwich is missing. */
    private static final int NO_SANDWICH = 3;

    /** One specification as R fitted it. */
    record Spec(long mask, double estimate, double stdError, int iterations, double glmSeconds,
            double glmFitSeconds) {
    }

    /** What R measured, or why it could not: exactly one of {@code specs} and {@code skipped} is non-null. */
    record Outcome(String version, List<Spec> specs, String skipped) {
        static Outcome skipped(String why) {
            return new Outcome(null, null, why);
        }

        /** Specifications per second of {@code glm} + {@code vcovHC}. */
        double glmRate() {
            return specs.size() / specs.stream().mapToDouble(Spec::glmSeconds).sum();
        }

        /** Specifications per second of {@code glm.fit} alone. */
        double glmFitRate() {
            return specs.size() / specs.stream().mapToDouble(Spec::glmFitSeconds).sum();
        }

        double meanIterations() {
            return specs.stream().mapToInt(Spec::iterations).average().orElse(Double.NaN);
        }
    }

    private RGlmTiming() {
    }

    /**
     * Fits {@code masks} in order until {@code budgetSeconds} of glm time are spent (at least three).
     * The script, the mask list, R's output and its error stream go to {@code work}.
     */
    static Outcome time(Path data, long[] masks, double budgetSeconds, Path work) {
        try {
            Path script = work.resolve("time-glm.R");
            try (InputStream in = RGlmTiming.class.getResourceAsStream("time-glm.R")) {
                Files.copy(in, script, StandardCopyOption.REPLACE_EXISTING);
            }
            Path maskFile = work.resolve("r-glm-masks.txt");
            StringBuilder lines = new StringBuilder();
            for (long m : masks) {
                lines.append(m).append('\n');
            }
            Files.writeString(maskFile, lines, StandardCharsets.UTF_8);
            Path result = work.resolve("r-glm-" + data.getFileName().toString().replace(".csv", "") + ".csv");
            Files.deleteIfExists(result);
            Path errors = work.resolve("r-glm-stderr.txt");
            Process process;
            try {
                process = new ProcessBuilder("Rscript", script.toString(), data.toString(), maskFile.toString(),
                        String.format(Locale.ROOT, "%.1f", budgetSeconds), result.toString())
                        .redirectOutput(ProcessBuilder.Redirect.DISCARD)
                        .redirectError(errors.toFile()).start();
            } catch (IOException e) {
                return Outcome.skipped("Rscript is not on the PATH");
            }
            if (!process.waitFor((long) (3 * budgetSeconds) + 300, TimeUnit.SECONDS)) {
                process.destroyForcibly();
                return Outcome.skipped("Rscript did not finish within " + ((long) (3 * budgetSeconds) + 300) + " s");
            }
            if (process.exitValue() == NO_SANDWICH) {
                return Outcome.skipped("the R package sandwich is not installed (Debian: r-cran-sandwich)");
            }
            if (process.exitValue() != 0) {
                List<String> said = Files.readAllLines(errors, StandardCharsets.UTF_8);
                return Outcome.skipped("Rscript exited with status " + process.exitValue()
                        + (said.isEmpty() ? "" : ": " + said.get(said.size() - 1)) + " (see " + errors + ")");
            }
            return read(result);
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
            return Outcome.skipped("interrupted while R was running");
        }
    }

    /** R's output: a comment line naming R and sandwich, then the specifications as CSV. */
    private static Outcome read(Path result) throws IOException {
        List<String> lines = Files.readAllLines(result, StandardCharsets.UTF_8);
        List<Spec> specs = new ArrayList<>();
        try (CSVParser parser = CSVFormat.DEFAULT.builder().setHeader().setSkipHeaderRecord(true).get()
                .parse(new StringReader(String.join("\n", lines.subList(1, lines.size()))))) {
            for (CSVRecord r : parser) {
                specs.add(new Spec(Long.parseLong(r.get("mask")), Double.parseDouble(r.get("estimate")),
                        Double.parseDouble(r.get("std_error")), Integer.parseInt(r.get("iterations")),
                        Double.parseDouble(r.get("glm_seconds")), Double.parseDouble(r.get("glm_fit_seconds"))));
            }
        }
        return new Outcome(lines.get(0).substring(2), specs, null);
    }
}
