package org.forkscape.reference;

import java.io.ByteArrayOutputStream;
import java.io.IOException;
import java.io.StringReader;
import java.io.UncheckedIOException;
import java.nio.charset.StandardCharsets;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.concurrent.atomic.AtomicBoolean;
import org.apache.commons.csv.CSVFormat;
import org.apache.commons.csv.CSVParser;
import org.apache.commons.csv.CSVRecord;
import org.forkscape.plan.Decision;
import org.forkscape.plan.Plan;
import org.forkscape.run.MultiverseRunner;
import org.forkscape.run.RunProgress;
import org.forkscape.run.RunResult;
import org.forkscape.run.SpecificationsCsv;

/**
 * A plan run through the engine and read back from the specifications.csv it writes, so that a check reads
 * the columns by their documented names (the GLM contract's effect, effect_std_error and deviance among
 * them) exactly as a user gets them.
 */
final class WrittenSpecifications {
    private final List<String> decisionNames;
    private final Map<String, Map<String, String>> byLabels = new LinkedHashMap<>();

    private WrittenSpecifications(Plan plan, String csv) {
        decisionNames = plan.decisions().stream().map(Decision::name).toList();
        CSVFormat format = CSVFormat.RFC4180.builder().setHeader().setSkipHeaderRecord(true).get();
        try (CSVParser parser = CSVParser.builder().setReader(new StringReader(csv)).setFormat(format).get()) {
            for (CSVRecord r : parser) {
                Map<String, String> row = new LinkedHashMap<>(r.toMap());
                byLabels.put(key(row), row);
            }
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
    }

    /** Runs every specification of the committed plan {@code reference/glm/<name>-plan.json} on two threads. */
    static WrittenSpecifications of(String name) {
        Plan plan = ReferenceFiles.plan("glm/" + name + "-plan.json");
        RunResult run = new MultiverseRunner(2).run(plan, ReferenceFiles.table(plan), RunProgress.SILENT,
                new AtomicBoolean());
        ByteArrayOutputStream out = new ByteArrayOutputStream();
        try {
            SpecificationsCsv.write(run, out);
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
        return new WrittenSpecifications(plan, out.toString(StandardCharsets.UTF_8));
    }

    /** The decision labels of a row (of this file or of a reference file with the same decision columns). */
    String key(Map<String, String> row) {
        return String.join(" | ", decisionNames.stream().map(row::get).toList());
    }

    /** The written row with the same decision labels as {@code reference}, or null. */
    Map<String, String> rowLike(Map<String, String> reference) {
        return byLabels.get(key(reference));
    }

    Map<String, Map<String, String>> rows() {
        return byLabels;
    }
}
