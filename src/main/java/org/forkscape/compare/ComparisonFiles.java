package org.forkscape.compare;

import java.nio.file.Path;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import org.apache.commons.csv.CSVPrinter;
import org.forkscape.run.AtomicFiles;
import org.forkscape.run.CsvCells;
import org.forkscape.run.Json;

/** compare.csv and compare.json, each written atomically; compare.json last, so that it marks a whole comparison. */
public final class ComparisonFiles {
    public static final String CSV = "compare.csv";
    public static final String JSON = "compare.json";
    private static final List<String> SIDE_COLUMNS = List.of("estimate", "std_error", "p_value");

    private ComparisonFiles() {
    }

    /**
     * Compares two run folders whose three files the caller has found and parsed, writes both files into
     * {@code out} and returns the sentence.
     */
    public static String write(RunFiles a, RunFiles b, Path out) {
        return Comparison.of(a, b).write(out);
    }

    static void write(RunComparison c, String sentence, Path out) {
        AtomicFiles.write(out.resolve(CSV), stream -> {
            CSVPrinter csv = CsvCells.printer(stream);
            List<String> header = new ArrayList<>(c.decisionNames());
            header.addAll(List.of("in_a", "in_b", "spec_a", "spec_b"));
            SIDE_COLUMNS.forEach(col -> header.addAll(List.of(col + "_a", col + "_b")));
            header.add("identical");
            csv.printRecord(header);
            for (RunComparison.MatchedRow row : c.rows()) {
                List<String> cells = new ArrayList<>();
                c.decisionNames().forEach(n -> cells.add(row.labels().getOrDefault(n, "")));
                cells.add(row.inA() == null ? "no" : "yes");
                cells.add(row.inB() == null ? "no" : "yes");
                cells.add(row.inA() == null ? "" : row.inA().spec());
                cells.add(row.inB() == null ? "" : row.inB().spec());
                for (String col : SIDE_COLUMNS) {
                    cells.add(row.inA() == null ? "" : row.inA().cells().getOrDefault(col, ""));
                    cells.add(row.inB() == null ? "" : row.inB().cells().getOrDefault(col, ""));
                }
                cells.add(row.shared() ? (row.identical() ? "yes" : "no") : "");
                csv.printRecord(cells);
            }
            csv.flush();
        });
        Json.write(out.resolve(JSON), json(c, sentence));
    }

    static Map<String, Object> json(RunComparison c, String sentence) {
        Map<String, Object> json = new LinkedHashMap<>();
        json.put("a", c.a().folder().toString());
        json.put("b", c.b().folder().toString());
        json.put("sentence", sentence);
        json.put("plan", c.plan().toJson());
        Map<String, Object> specs = new LinkedHashMap<>();
        specs.put("a", c.a().rows().size());
        specs.put("b", c.b().rows().size());
        specs.put("shared", c.shared());
        specs.put("only_a", c.onlyInA());
        specs.put("only_b", c.onlyInB());
        List<RunComparison.MatchedRow> differing = c.differing();
        specs.put("shared_identical", c.shared() > 0 && differing.isEmpty());
        specs.put("shared_differing", differing.size());
        specs.put("differences", differing.stream().limit(RunComparison.LISTED_DIFFERENCES).map(r -> {
            Map<String, Object> d = new LinkedHashMap<>();
            d.put("labels", r.labels());
            d.put("spec_a", r.inA().spec());
            d.put("spec_b", r.inB().spec());
            d.put("column", r.difference().column());
            d.put("value_a", r.difference().valueA());
            d.put("value_b", r.difference().valueB());
            return d;
        }).toList());
        json.put("specifications", specs);
        Map<String, Object> headline = new LinkedHashMap<>();
        headline.put("a", Headlines.wholeRun(c.a().summary()));
        headline.put("b", Headlines.wholeRun(c.b().summary()));
        json.put("headline", headline);
        json.put("groups", Headlines.groups(c.a().summary(), c.b().summary()));
        return json;
    }
}
