package org.forkscape.cli;

import java.io.IOException;
import java.io.UncheckedIOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.Map;
import java.util.Optional;
import java.util.Set;
import org.forkscape.run.RunOutputs;
import tools.jackson.databind.JsonNode;
import tools.jackson.databind.node.ObjectNode;

/**
 * The first difference between a run folder's recorded results and the same run recomputed:
 * specifications.csv byte for byte, then summary.json key by key, leaving out what legitimately differs
 * between two runs of the same plan on the same data ({@link #IGNORED}).
 */
final class RecordedResults {
    /**
     * summary.json keys that describe how and when a run was made, not what it found: the fitting and
     * null-draw times, the command, start, Java version and threads, and the plan file's hash (the
     * re-run reads plan.json, a copy of the plan as text, whose bytes may differ from the original file's,
     * by a byte-order mark for one), and the comparison with the plan's lock (it is about the files the run
     * read, not its results, and the re-run reads the run folder's copy, which has no lock beside it).
     */
    static final List<String> IGNORED = List.of("seconds", "null.seconds", "provenance.command", "provenance.started",
            "provenance.java", "provenance.threads", "provenance.plan_sha256", "provenance.lock");

    private RecordedResults() {
    }

    static Optional<String> firstDifference(Path recorded, Path recomputed) {
        Optional<String> csv = inSpecifications(recorded.resolve(RunOutputs.SPECIFICATIONS),
                recomputed.resolve(RunOutputs.SPECIFICATIONS));
        if (csv.isPresent()) {
            return csv;
        }
        return inSummary(VerifyCommand.readJson(recorded.resolve(RunOutputs.SUMMARY)),
                VerifyCommand.readJson(recomputed.resolve(RunOutputs.SUMMARY)));
    }

    static Optional<String> inSpecifications(Path recordedFile, Path recomputedFile) {
        byte[] recordedBytes = bytes(recordedFile);
        byte[] recomputedBytes = bytes(recomputedFile);
        if (Arrays.equals(recordedBytes, recomputedBytes)) {
            return Optional.empty();
        }
        List<String> recorded = lines(recordedBytes);
        List<String> recomputed = lines(recomputedBytes);
        List<String> header = cells(recomputed.get(0));
        for (int i = 0; i < Math.max(recorded.size(), recomputed.size()); i++) {
            if (i >= recorded.size() || i >= recomputed.size()) {
                return Optional.of(String.format("specifications.csv line %d: recorded has %d lines, recomputed %d",
                        i + 1, recorded.size(), recomputed.size()));
            }
            if (!recorded.get(i).equals(recomputed.get(i))) {
                return Optional.of(lineDifference(i, header, recorded.get(i), recomputed.get(i)));
            }
        }
        return Optional.of("specifications.csv: the lines are identical, their line endings differ");
    }

    private static String lineDifference(int index, List<String> header, String recorded, String recomputed) {
        String where = "specifications.csv line " + (index + 1);
        List<String> a = cells(recorded);
        List<String> b = cells(recomputed);
        if (index > 0 && !a.isEmpty()) {
            where += " (specification " + a.get(0) + ")";
        }
        for (int c = 0; c < Math.max(a.size(), b.size()); c++) {
            String x = c < a.size() ? a.get(c) : "(absent)";
            String y = c < b.size() ? b.get(c) : "(absent)";
            if (!x.equals(y)) {
                String column = c < header.size() ? header.get(c) : "column " + (c + 1);
                return where + ", " + column + ": recorded " + x + ", recomputed " + y;
            }
        }
        return where + ": recorded " + recorded + ", recomputed " + recomputed;
    }

    /** The cells of one specifications.csv line (RFC 4180 quoting; no cell of that file holds a line break). */
    static List<String> cells(String line) {
        List<String> cells = new ArrayList<>();
        StringBuilder cell = new StringBuilder();
        boolean quoted = false;
        for (int i = 0; i < line.length(); i++) {
            char ch = line.charAt(i);
            if (quoted) {
                if (ch == '"' && i + 1 < line.length() && line.charAt(i + 1) == '"') {
                    cell.append('"');
                    i++;
                } else if (ch == '"') {
                    quoted = false;
                } else {
                    cell.append(ch);
                }
            } else if (ch == '"') {
                quoted = true;
            } else if (ch == ',') {
                cells.add(cell.toString());
                cell.setLength(0);
            } else {
                cell.append(ch);
            }
        }
        cells.add(cell.toString());
        return cells;
    }

    static Optional<String> inSummary(JsonNode recorded, JsonNode recomputed) {
        return difference("", withoutIgnored(recorded), withoutIgnored(recomputed));
    }

    private static JsonNode withoutIgnored(JsonNode summary) {
        ObjectNode copy = (ObjectNode) summary.deepCopy();
        for (String key : IGNORED) {
            int dot = key.indexOf('.');
            if (dot < 0) {
                copy.remove(key);
            } else if (copy.get(key.substring(0, dot)) instanceof ObjectNode section) {
                section.remove(key.substring(dot + 1));
            }
        }
        return copy;
    }

    private static Optional<String> difference(String path, JsonNode recorded, JsonNode recomputed) {
        if (recorded.isObject() && recomputed.isObject()) {
            for (Map.Entry<String, JsonNode> e : recorded.properties()) {
                String key = path.isEmpty() ? e.getKey() : path + "." + e.getKey();
                JsonNode other = recomputed.get(e.getKey());
                if (other == null) {
                    return Optional.of(summaryLine(key, e.getValue().toString(), "(absent)"));
                }
                Optional<String> inner = difference(key, e.getValue(), other);
                if (inner.isPresent()) {
                    return inner;
                }
            }
            Set<String> known = Set.copyOf(recorded.propertyNames());
            for (String name : recomputed.propertyNames()) {
                if (!known.contains(name)) {
                    return Optional.of(summaryLine(path.isEmpty() ? name : path + "." + name, "(absent)",
                            recomputed.get(name).toString()));
                }
            }
            return Optional.empty();
        }
        if (recorded.isArray() && recomputed.isArray()) {
            for (int i = 0; i < Math.max(recorded.size(), recomputed.size()); i++) {
                String key = path + "[" + i + "]";
                if (i >= recorded.size() || i >= recomputed.size()) {
                    return Optional.of(summaryLine(key, i < recorded.size() ? recorded.get(i).toString() : "(absent)",
                            i < recomputed.size() ? recomputed.get(i).toString() : "(absent)"));
                }
                Optional<String> inner = difference(key, recorded.get(i), recomputed.get(i));
                if (inner.isPresent()) {
                    return inner;
                }
            }
            return Optional.empty();
        }
        return recorded.equals(recomputed) ? Optional.empty()
                : Optional.of(summaryLine(path, recorded.toString(), recomputed.toString()));
    }

    private static String summaryLine(String key, String recorded, String recomputed) {
        return "summary.json " + key + ": recorded " + recorded + ", recomputed " + recomputed;
    }

    private static byte[] bytes(Path file) {
        try {
            return Files.readAllBytes(file);
        } catch (IOException e) {
            throw new UncheckedIOException(file + ": cannot read: " + e.getMessage(), e);
        }
    }

    private static List<String> lines(byte[] bytes) {
        return new String(bytes, StandardCharsets.UTF_8).lines().toList();
    }
}
