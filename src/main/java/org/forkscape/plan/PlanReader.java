package org.forkscape.plan;

import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.HashSet;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Set;
import tools.jackson.core.JacksonException;
import tools.jackson.core.TokenStreamLocation;
import tools.jackson.databind.JsonNode;
import tools.jackson.databind.json.JsonMapper;

/**
 * Reads a plan file and checks its structure: every problem is a {@link PlanException} whose location is
 * the JSON path of the field (for example {@code decisions[2].alternatives[0].column}). Checks that need
 * the data (column names and types) are {@link PlanChecker}'s.
 */
public final class PlanReader {
    private static final JsonMapper JSON = JsonMapper.builder().build();
    private static final Set<String> TOP_KEYS = Set.of("title", "description", "data", "confidence", "missing",
            "decisions", "sample", "seed", "maxSpecifications", "nullDraws", "nullMethod", "nullCluster");
    private static final List<String> KINDS = List.of("outcome", "predictor", "controls", "sample", "errors", "absorb");
    /** Output columns of specifications.csv that a decision name must not shadow. */
    public static final Set<String> RESERVED_NAMES = Set.of("spec", "estimate", "std_error", "statistic", "df",
            "p_value", "ci_low", "ci_high", "n_obs", "n_params", "r2", "adj_r2", "model_p_value", "status");

    private final boolean confineDataToPlanFolder;

    /**
     * @param confineDataToPlanFolder when true (a shared server), a {@code data} path may not leave the
     *                                plan's folder
     */
    public PlanReader(boolean confineDataToPlanFolder) {
        this.confineDataToPlanFolder = confineDataToPlanFolder;
    }

    public Plan read(Path planFile) {
        String text;
        try {
            text = Files.readString(planFile, StandardCharsets.UTF_8);
        } catch (IOException e) {
            throw new PlanException("", "cannot read the plan file " + planFile + ": " + e.getMessage());
        }
        Path folder = planFile.toAbsolutePath().getParent();
        return read(text, folder);
    }

    /** Reads plan JSON whose relative {@code data} path is resolved against {@code folder}. */
    public Plan read(String json, Path folder) {
        JsonNode root;
        try {
            root = JSON.readTree(json);
        } catch (JacksonException e) {
            TokenStreamLocation at = e.getLocation();
            String where = at == null ? "" : "line " + at.getLineNr() + ", column " + at.getColumnNr();
            String why = e.getOriginalMessage();
            if (why != null && why.toLowerCase().contains("nesting depth")) {
                why = "the JSON nests too deeply";
            }
            throw new PlanException(where, "is not valid JSON: " + why);
        }
        if (root == null || !root.isObject()) {
            throw new PlanException("", "a plan is a JSON object with at least \"data\" and \"decisions\"");
        }
        for (String key : root.propertyNames()) {
            if (!TOP_KEYS.contains(key)) {
                throw new PlanException(key, "unknown key" + suggest(key, TOP_KEYS));
            }
        }
        Path dataFile = dataFile(root, folder);
        double confidence = number(root, "confidence", "confidence", 0.95);
        if (!(confidence > 0 && confidence < 1)) {
            throw new PlanException("confidence", "must lie strictly between 0 and 1, as in 0.95; found " + confidence);
        }
        MissingRows missing = missing(root);
        List<Decision> decisions = decisions(root.get("decisions"));
        long sample = wholeNumber(root, "sample", 0, 1, Long.MAX_VALUE);
        long seed = wholeNumber(root, "seed", 1L, Long.MIN_VALUE, Long.MAX_VALUE);
        long cap = wholeNumber(root, "maxSpecifications", Plan.DEFAULT_MAX_SPECIFICATIONS, 1, Long.MAX_VALUE);
        int draws = (int) wholeNumber(root, "nullDraws", 0, 0, Integer.MAX_VALUE);
        String method = text(root, "nullMethod", "nullMethod", "bootstrap");
        if (!method.equals("bootstrap") && !method.equals("permute")) {
            throw new PlanException("nullMethod", "must be \"bootstrap\" or \"permute\"; found \"" + method + "\"");
        }
        String cluster = root.has("nullCluster") ? text(root, "nullCluster", "nullCluster", null) : null;
        return new Plan(dataFile, confidence, missing, decisions, sample, seed, cap, draws, method, cluster);
    }

    private Path dataFile(JsonNode root, Path folder) {
        String data = text(root, "data", "data", null);
        if (data == null || data.isBlank()) {
            throw new PlanException("data", "is required: the path of the CSV file, relative to the plan file");
        }
        Path resolved;
        try {
            resolved = folder.resolve(data).normalize();
        } catch (java.nio.file.InvalidPathException e) {
            throw new PlanException("data", "\"" + data + "\" is not a usable file path");
        }
        if (confineDataToPlanFolder && (Path.of(data).isAbsolute() || !resolved.startsWith(folder.normalize()))) {
            throw new PlanException("data", "\"" + data + "\" leaves the analysis folder; give a file name inside it");
        }
        return resolved;
    }

    private static MissingRows missing(JsonNode root) {
        String m = text(root, "missing", "missing", MissingRows.PER_SPECIFICATION.spelling());
        for (MissingRows r : MissingRows.values()) {
            if (r.spelling().equals(m)) {
                return r;
            }
        }
        throw new PlanException("missing", "must be \"per-specification\" or \"common\"; found \"" + m + "\"");
    }

    private static List<Decision> decisions(JsonNode node) {
        if (node == null || !node.isArray() || node.isEmpty()) {
            throw new PlanException("decisions", "is required: a list of decisions, at least an outcome and a predictor");
        }
        List<Decision> out = new ArrayList<>();
        Set<String> names = new HashSet<>();
        for (int i = 0; i < node.size(); i++) {
            String path = "decisions[" + i + "]";
            JsonNode d = node.get(i);
            if (!d.isObject()) {
                throw new PlanException(path, "each decision is an object with \"name\" and \"kind\"");
            }
            String name = text(d, "name", path + ".name", null);
            if (name == null || name.isBlank()) {
                throw new PlanException(path + ".name", "every decision needs a name");
            }
            if (!names.add(name)) {
                throw new PlanException(path + ".name", "the decision name \"" + name + "\" is used twice");
            }
            if (RESERVED_NAMES.contains(name)) {
                throw new PlanException(path + ".name", "\"" + name + "\" is an output column of specifications.csv; "
                        + "choose another decision name");
            }
            String kind = text(d, "kind", path + ".kind", null);
            if (kind == null) {
                throw new PlanException(path + ".kind", "is required: one of " + String.join(", ", KINDS));
            }
            out.add(switch (kind) {
                case "outcome" -> new Decision.Outcome(name, variables(d, path));
                case "predictor" -> new Decision.Predictor(name, variables(d, path));
                case "controls" -> controls(d, name, path);
                case "sample" -> sample(d, name, path);
                case "errors" -> errors(d, name, path);
                case "absorb" -> absorb(d, name, path);
                default -> throw new PlanException(path + ".kind", "unknown kind \"" + kind + "\""
                        + suggest(kind, KINDS) + " (the kinds are " + String.join(", ", KINDS) + ")");
            });
        }
        requireCount(out, Decision.Outcome.class, "outcome", 1, 1);
        requireCount(out, Decision.Predictor.class, "predictor", 1, 1);
        requireCount(out, Decision.Errors.class, "errors", 0, 1);
        requireCount(out, Decision.Absorb.class, "absorb", 0, 1);
        return out;
    }

    private static void requireCount(List<Decision> ds, Class<?> kind, String spelling, int min, int max) {
        long n = ds.stream().filter(kind::isInstance).count();
        if (n < min) {
            throw new PlanException("decisions", "needs a decision of kind \"" + spelling + "\"");
        }
        if (n > max) {
            throw new PlanException("decisions", "has " + n + " decisions of kind \"" + spelling
                    + "\"; at most " + max + " is allowed (put the alternatives in one decision)");
        }
    }

    private static List<VariableChoice> variables(JsonNode d, String path) {
        JsonNode alts = alternatives(d, path);
        List<VariableChoice> out = new ArrayList<>();
        Set<String> labels = new HashSet<>();
        for (int j = 0; j < alts.size(); j++) {
            String p = path + ".alternatives[" + j + "]";
            JsonNode a = object(alts.get(j), p, "{\"label\": ..., \"column\": ..., \"transform\": ...}");
            onlyKeys(a, p, Set.of("label", "column", "transform"));
            String label = label(a, p, labels);
            String column = text(a, "column", p + ".column", null);
            if (column == null || column.isEmpty()) {
                throw new PlanException(p + ".column", "is required: the column this alternative uses");
            }
            String transform = text(a, "transform", p + ".transform", "none");
            out.add(new VariableChoice(label, column, Transform.parse(transform, p + ".transform")));
        }
        return out;
    }

    private static Decision.Controls controls(JsonNode d, String name, String path) {
        onlyKeys(d, path, Set.of("name", "kind", "required", "optional", "combine", "sets"));
        List<String> required = columns(d.get("required"), path + ".required");
        List<String> optional = columns(d.get("optional"), path + ".optional");
        String combine = text(d, "combine", path + ".combine", "all-subsets");
        if (combine.equals("all-subsets")) {
            if (d.has("sets")) {
                throw new PlanException(path + ".sets", "is used only with \"combine\": \"sets\"");
            }
            if (optional.size() > 40) {
                throw new PlanException(path + ".optional", "has " + optional.size()
                        + " controls: every subset of more than 40 is beyond any specification cap");
            }
            return new Decision.Controls(name, required, optional, null);
        }
        if (!combine.equals("sets")) {
            throw new PlanException(path + ".combine", "must be \"all-subsets\" or \"sets\"; found \"" + combine + "\"");
        }
        if (!optional.isEmpty()) {
            throw new PlanException(path + ".optional", "is used only with \"combine\": \"all-subsets\"; with sets, "
                    + "list each set's columns under \"sets\"");
        }
        JsonNode sets = d.get("sets");
        if (sets == null || !sets.isObject() || sets.isEmpty()) {
            throw new PlanException(path + ".sets", "is required with \"combine\": \"sets\": an object "
                    + "{\"label\": [columns], ...}");
        }
        Map<String, List<String>> named = new LinkedHashMap<>();
        for (Map.Entry<String, JsonNode> e : sets.properties()) {
            if (e.getKey().isBlank()) {
                throw new PlanException(path + ".sets", "a set needs a non-empty label");
            }
            named.put(e.getKey(), columns(e.getValue(), path + ".sets." + e.getKey()));
        }
        return new Decision.Controls(name, required, List.of(), named);
    }

    private static Decision.Sample sample(JsonNode d, String name, String path) {
        JsonNode alts = alternatives(d, path);
        List<SampleRule> out = new ArrayList<>();
        Set<String> labels = new HashSet<>();
        for (int j = 0; j < alts.size(); j++) {
            String p = path + ".alternatives[" + j + "]";
            JsonNode a = object(alts.get(j), p, "{\"label\": ...} with \"keep\" or \"trim\" or neither");
            onlyKeys(a, p, Set.of("label", "keep", "trim"));
            String label = label(a, p, labels);
            if (a.has("keep") && a.has("trim")) {
                throw new PlanException(p, "give either \"keep\" or \"trim\", not both");
            }
            if (a.has("keep")) {
                String keep = text(a, "keep", p + ".keep", null);
                if (keep == null || keep.isBlank()) {
                    throw new PlanException(p + ".keep", "needs an expression, as in income > 0");
                }
                out.add(new SampleRule.KeepRows(label, RowExpression.parse(keep, p + ".keep")));
            } else if (a.has("trim")) {
                JsonNode t = object(a.get("trim"), p + ".trim", "{\"column\": ..., \"z\": ...}");
                onlyKeys(t, p + ".trim", Set.of("column", "z"));
                String column = text(t, "column", p + ".trim.column", null);
                if (column == null) {
                    throw new PlanException(p + ".trim.column", "is required: the column whose z-score is trimmed");
                }
                double z = number(t, "z", p + ".trim.z", Double.NaN);
                if (!(z > 0) || Double.isInfinite(z)) {
                    throw new PlanException(p + ".trim.z", "must be a positive number of standard deviations, as in 3");
                }
                out.add(new SampleRule.TrimRows(label, column, z));
            } else {
                out.add(new SampleRule.AllRows(label));
            }
        }
        return new Decision.Sample(name, out);
    }

    private static Decision.Errors errors(JsonNode d, String name, String path) {
        JsonNode alts = alternatives(d, path);
        List<ErrorType> out = new ArrayList<>();
        Set<String> seen = new HashSet<>();
        for (int j = 0; j < alts.size(); j++) {
            String p = path + ".alternatives[" + j + "]";
            JsonNode a = alts.get(j);
            if (!a.isString()) {
                throw new PlanException(p, "each error type is a string: classical, HC0, HC1, HC2, HC3 or cluster:COLUMN");
            }
            ErrorType e = ErrorType.parse(a.stringValue(), p);
            if (!seen.add(e.label())) {
                throw new PlanException(p, "\"" + e.label() + "\" is listed twice");
            }
            out.add(e);
        }
        return new Decision.Errors(name, out);
    }

    private static Decision.Absorb absorb(JsonNode d, String name, String path) {
        JsonNode alts = alternatives(d, path);
        List<AbsorbChoice> out = new ArrayList<>();
        Set<String> labels = new HashSet<>();
        for (int j = 0; j < alts.size(); j++) {
            String p = path + ".alternatives[" + j + "]";
            JsonNode a = object(alts.get(j), p, "{\"label\": ..., \"columns\": [...]}");
            onlyKeys(a, p, Set.of("label", "columns"));
            String label = label(a, p, labels);
            List<String> columns = columns(a.get("columns"), p + ".columns");
            if (columns.size() > 1) {
                throw new PlanException(p + ".columns", "absorbing more than one fixed-effect column is not supported "
                        + "yet; absorb one column, or add the others as categorical controls");
            }
            out.add(new AbsorbChoice(label, columns));
        }
        return new Decision.Absorb(name, out);
    }

    private static JsonNode alternatives(JsonNode d, String path) {
        JsonNode alts = d.get("alternatives");
        if (alts == null || !alts.isArray()) {
            throw new PlanException(path + ".alternatives", "is required: a list of alternatives");
        }
        if (alts.isEmpty()) {
            throw new PlanException(path + ".alternatives", "is empty; a decision needs at least one alternative");
        }
        return alts;
    }

    private static JsonNode object(JsonNode n, String path, String shape) {
        if (n == null || !n.isObject()) {
            throw new PlanException(path, "must be an object " + shape);
        }
        return n;
    }

    private static void onlyKeys(JsonNode n, String path, Set<String> allowed) {
        for (String key : n.propertyNames()) {
            if (!allowed.contains(key) && !key.equals("name") && !key.equals("kind") && !key.equals("alternatives")) {
                throw new PlanException(path + "." + key, "unknown key" + suggest(key, allowed));
            }
        }
    }

    private static String label(JsonNode a, String path, Set<String> seen) {
        String label = text(a, "label", path + ".label", null);
        if (label == null || label.isBlank()) {
            throw new PlanException(path + ".label", "every alternative needs a label");
        }
        if (!seen.add(label)) {
            throw new PlanException(path + ".label", "the label \"" + label + "\" is used twice in this decision");
        }
        return label;
    }

    private static List<String> columns(JsonNode n, String path) {
        if (n == null || n.isNull()) {
            return List.of();
        }
        if (!n.isArray()) {
            throw new PlanException(path, "must be a list of column names");
        }
        List<String> out = new ArrayList<>();
        for (int j = 0; j < n.size(); j++) {
            JsonNode c = n.get(j);
            if (!c.isString() || c.stringValue().isEmpty()) {
                throw new PlanException(path + "[" + j + "]", "must be a column name (a string)");
            }
            if (out.contains(c.stringValue())) {
                throw new PlanException(path + "[" + j + "]", "\"" + c.stringValue() + "\" is listed twice");
            }
            out.add(c.stringValue());
        }
        return out;
    }

    private static String text(JsonNode n, String key, String path, String fallback) {
        JsonNode v = n.get(key);
        if (v == null || v.isNull()) {
            return fallback;
        }
        if (!v.isString()) {
            throw new PlanException(path, "must be a string; found " + v.getNodeType().name().toLowerCase());
        }
        return v.stringValue();
    }

    private static double number(JsonNode n, String key, String path, double fallback) {
        JsonNode v = n.get(key);
        if (v == null || v.isNull()) {
            return fallback;
        }
        if (!v.isNumber()) {
            throw new PlanException(path, "must be a number; found " + v.getNodeType().name().toLowerCase());
        }
        return v.doubleValue();
    }

    private static long wholeNumber(JsonNode n, String key, long fallback, long min, long max) {
        JsonNode v = n.get(key);
        if (v == null || v.isNull()) {
            return fallback;
        }
        if (!v.isIntegralNumber() || !v.canConvertToLong()) {
            throw new PlanException(key, "must be a whole number; found " + v);
        }
        long value = v.longValue();
        if (value < min || value > max) {
            throw new PlanException(key, "must be at least " + min + (max < Long.MAX_VALUE ? " and at most " + max : "")
                    + "; found " + value);
        }
        return value;
    }

    static String suggest(String word, java.util.Collection<String> candidates) {
        String best = null;
        int bestDistance = Integer.MAX_VALUE;
        for (String c : candidates) {
            int d = org.forkscape.data.Table.editDistance(word.toLowerCase(), c.toLowerCase());
            if (d < bestDistance) {
                bestDistance = d;
                best = c;
            }
        }
        return best != null && bestDistance <= Math.max(2, word.length() / 3) ? "; did you mean \"" + best + "\"?" : "";
    }
}
