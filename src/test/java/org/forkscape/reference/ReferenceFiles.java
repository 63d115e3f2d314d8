package org.forkscape.reference;

import java.io.IOException;
import java.io.Reader;
import java.io.UncheckedIOException;
import java.net.URISyntaxException;
import java.net.URL;
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
import org.forkscape.data.CsvTableReader;
import org.forkscape.data.Table;
import org.forkscape.plan.Plan;
import org.forkscape.plan.PlanReader;

/**
 * The committed reference files under {@code src/test/resources/reference/}: data sets exported from R,
 * hand-written plans, and the values that {@code src/test/r/make-reference.R} computed for them.
 */
public final class ReferenceFiles {
    private ReferenceFiles() {
    }

    public static Path path(String name) {
        URL url = ReferenceFiles.class.getResource("/reference/" + name);
        if (url == null) {
            throw new IllegalStateException("missing reference file " + name);
        }
        try {
            return Path.of(url.toURI());
        } catch (URISyntaxException e) {
            throw new IllegalStateException(e);
        }
    }

    static Plan plan(String name) {
        return new PlanReader(false).read(path(name));
    }

    static Table table(Plan plan) {
        return new CsvTableReader().read(plan.dataFile());
    }

    static Table table(String name) {
        return new CsvTableReader().read(path(name));
    }

    /** The rows of a CSV file with a header, as header-to-cell maps in file order. */
    public static List<Map<String, String>> rows(String name) {
        CSVFormat format = CSVFormat.RFC4180.builder().setHeader().setSkipHeaderRecord(true).get();
        try (Reader in = Files.newBufferedReader(path(name), StandardCharsets.UTF_8);
                CSVParser parser = CSVParser.builder().setReader(in).setFormat(format).get()) {
            List<Map<String, String>> out = new ArrayList<>();
            for (CSVRecord r : parser) {
                out.add(new LinkedHashMap<>(r.toMap()));
            }
            return out;
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
    }

    /** The R and sandwich versions that produced the committed values, as one line for messages. */
    public static String versions() {
        return versions("versions.txt");
    }

    /** A committed version record (one tool a line), as one line for messages. */
    public static String versions(String name) {
        try {
            return String.join("; ", Files.readAllLines(path(name), StandardCharsets.UTF_8));
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
    }

    /** A cell as a number: empty means undefined (NaN). */
    static double number(String cell) {
        return cell == null || cell.isEmpty() ? Double.NaN : Double.parseDouble(cell);
    }

    /** Each slot of a run by its decision labels joined with " | ", as the reference files name specifications. */
    public static Map<String, Integer> slotsByLabels(org.forkscape.run.RunResult run) {
        org.forkscape.plan.SpecificationSpace space = run.models().space();
        List<org.forkscape.plan.Decision> decisions = run.plan().decisions();
        long[] choices = new long[space.decisionCount()];
        Map<String, Integer> out = new java.util.HashMap<>();
        for (int slot = 0; slot < run.results().size(); slot++) {
            space.decode(run.results().specIndex(slot), choices);
            List<String> labels = new ArrayList<>();
            for (int d = 0; d < decisions.size(); d++) {
                labels.add(decisions.get(d).label(choices[d]));
            }
            out.put(String.join(" | ", labels), slot);
        }
        return out;
    }
}
