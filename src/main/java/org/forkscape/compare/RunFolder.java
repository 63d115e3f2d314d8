package org.forkscape.compare;

import java.io.IOException;
import java.io.Reader;
import java.io.UncheckedIOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import org.apache.commons.csv.CSVFormat;
import org.apache.commons.csv.CSVParser;
import org.apache.commons.csv.CSVRecord;
import org.forkscape.InputException;
import tools.jackson.databind.JsonNode;

/** What a comparison reads of one run folder: its plan's decisions, its summary.json and its specifications. */
record RunFolder(Path folder, List<PlanDecision> decisions, JsonNode summary, List<String> resultColumns,
        List<SpecificationRow> rows) {
    private static final CSVFormat FORMAT = CSVFormat.RFC4180.builder().setHeader().setSkipHeaderRecord(true).get();

    /**
     * Reads specifications.csv beside the parsed plan and summary. Every
     * decision of the plan must be a column of specifications.csv, and so must {@code spec}.
     */
    static RunFolder read(RunFiles files) {
        Path folder = files.folder();
        Path specifications = files.specifications();
        // messages name the file inside the folder as the door named it, never where the door keeps it
        String named = folder.resolve(specifications.getFileName().toString()).toString();
        JsonNode summary = files.summary();
        List<PlanDecision> decisions = PlanDecision.listOf(files.plan(), folder.resolve("plan.json").toString());
        try (Reader reader = Files.newBufferedReader(specifications, StandardCharsets.UTF_8);
                CSVParser parser = CSVParser.builder().setReader(reader).setFormat(FORMAT).get()) {
            List<String> header = parser.getHeaderNames();
            List<String> needed = new ArrayList<>(List.of("spec"));
            decisions.forEach(d -> needed.add(d.name()));
            for (String column : needed) {
                if (!header.contains(column)) {
                    throw new InputException(named, "has no column " + InputException.quoted(column)
                            + (column.equals("spec") ? "" : ", which plan.json names as a decision")
                            + "; give the --out folder of a run");
                }
            }
            List<String> resultColumns = header.stream().filter(c -> !needed.contains(c)).toList();
            List<SpecificationRow> rows = new ArrayList<>();
            for (CSVRecord record : parser) {
                if (record.size() != header.size()) {
                    throw new InputException(named + " line " + (record.getRecordNumber() + 1),
                            "has " + record.size() + " cells, the header " + header.size());
                }
                Map<String, String> labels = new LinkedHashMap<>();
                decisions.forEach(d -> labels.put(d.name(), record.get(d.name())));
                Map<String, String> cells = new LinkedHashMap<>();
                resultColumns.forEach(c -> cells.put(c, record.get(c)));
                rows.add(new SpecificationRow(record.get("spec"), labels, cells));
            }
            return new RunFolder(folder, decisions, summary, resultColumns, rows);
        } catch (IOException e) {
            throw new UncheckedIOException("cannot read " + named + ": " + e.getMessage(), e);
        } catch (IllegalArgumentException | IllegalStateException | UncheckedIOException e) {
            throw new InputException(named, "is not a readable CSV file: " + e.getMessage());
        }
    }
}
