package org.forkscape.check;

import java.io.IOException;
import java.io.Reader;
import java.io.UncheckedIOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.OptionalDouble;
import org.apache.commons.csv.CSVFormat;
import org.apache.commons.csv.CSVParser;
import org.apache.commons.csv.CSVRecord;
import org.forkscape.InputException;
import org.forkscape.run.RunOutputs;
import tools.jackson.core.JacksonException;
import tools.jackson.databind.JsonNode;
import tools.jackson.databind.json.JsonMapper;

/**
 * What a release check reads from a run folder that {@code run} wrote: its summary.json, and from
 * specifications.csv the fewest rows per coefficient (n_obs / n_params) over the fitted specifications.
 *
 * @param summary                  summary.json as written
 * @param fewestRowsPerCoefficient the smallest n_obs / n_params of a specification with status ok; empty when none fitted
 * @param fewestRowsSpec           the {@code spec} number that has it (empty text when none)
 */
record RunEvidence(JsonNode summary, OptionalDouble fewestRowsPerCoefficient, String fewestRowsSpec) {
    private static final JsonMapper MAPPER = JsonMapper.builder().build();
    private static final CSVFormat FORMAT = CSVFormat.RFC4180.builder().setHeader().setSkipHeaderRecord(true).get();

    static RunEvidence read(Path folder) {
        if (!Files.isDirectory(folder)) {
            throw new InputException(folder.toString(), "is not a folder; give the --out folder of a run");
        }
        JsonNode summary = summary(needed(folder, RunOutputs.SUMMARY));
        Path csv = needed(folder, RunOutputs.SPECIFICATIONS);
        double fewest = Double.POSITIVE_INFINITY;
        String spec = "";
        try (Reader reader = Files.newBufferedReader(csv, StandardCharsets.UTF_8);
             CSVParser parser = CSVParser.parse(reader, FORMAT)) {
            for (String column : new String[] {"spec", "n_obs", "n_params", "status"}) {
                if (!parser.getHeaderMap().containsKey(column)) {
                    throw new InputException(csv.toString(), "has no column " + column);
                }
            }
            for (CSVRecord row : parser) {
                if (!"ok".equals(row.get("status"))) {
                    continue;
                }
                double ratio = number(row, "n_obs", csv) / number(row, "n_params", csv);
                if (ratio < fewest) {
                    fewest = ratio;
                    spec = row.get("spec");
                }
            }
        } catch (IOException e) {
            throw new UncheckedIOException("cannot read " + csv + ": " + e.getMessage(), e);
        } catch (IllegalStateException | IllegalArgumentException e) {
            throw new InputException(csv.toString(), "is not a specifications.csv that run wrote: " + e.getMessage());
        }
        return new RunEvidence(summary, Double.isFinite(fewest) ? OptionalDouble.of(fewest) : OptionalDouble.empty(),
                spec);
    }

    private static double number(CSVRecord row, String column, Path csv) {
        try {
            double v = Double.parseDouble(row.get(column));
            if (v > 0) {
                return v;
            }
        } catch (NumberFormatException e) {
            // reported below with the line, as for a value that is not positive
        }
        throw new InputException(csv + " line " + (row.getRecordNumber() + 1) + ", " + column,
                "a fitted specification needs a positive number here; found " + InputException.quoted(row.get(column)));
    }

    private static Path needed(Path folder, String name) {
        Path file = folder.resolve(name);
        if (!Files.isRegularFile(file)) {
            throw new InputException(folder.toString(), "has no " + name + "; give the --out folder of a run");
        }
        return file;
    }

    private static JsonNode summary(Path file) {
        try {
            JsonNode node = MAPPER.readTree(file.toFile());
            if (node == null || !node.isObject()) {
                throw new InputException(file.toString(), "is not a JSON object");
            }
            return node;
        } catch (JacksonException e) {
            throw new InputException(file.toString(), "is not valid JSON: " + e.getOriginalMessage());
        }
    }

    /**
     * The curve's dominant sign, {@code positive} or {@code negative}: the null draws' observed sign when the
     * run has them, else the sign of the median estimate (positive when it is 0), as joint inference defines it.
     */
    String dominantSign() {
        JsonNode observed = summary.path("null").path("observed").path("dominant_sign");
        if (observed.isString()) {
            return observed.asString();
        }
        return summary.path("median_estimate").asDouble(0) < 0 ? "negative" : "positive";
    }
}
