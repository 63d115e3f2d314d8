package org.forkscape.plan;

import java.io.IOException;
import java.nio.ByteBuffer;
import java.nio.charset.CharacterCodingException;
import java.nio.charset.CodingErrorAction;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.InvalidPathException;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.Collection;
import java.util.HashSet;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.Set;
import org.forkscape.InputException;
import org.forkscape.data.Table;
import tools.jackson.core.JacksonException;
import tools.jackson.core.StreamReadFeature;
import tools.jackson.core.TokenStreamLocation;
import tools.jackson.databind.JsonNode;
import tools.jackson.databind.json.JsonMapper;

/**
 * Reads a plan file and checks its structure: every problem is a {@link PlanException} whose location is
 * the JSON path of the field (for example {@code decisions[2].alternatives[0].column}), or the line and
 * column when the text is not JSON at all. The reading goes on past a problem to the next field and
 * throws once, at the end, with the first problem and every other one ({@link PlanException#all()}).
 * Checks that need the data (column names and types) are {@link PlanChecker}'s.
 */
public final class PlanReader {
    /** A key written twice is refused: JSON parsers differ on which copy wins, so the plan would be ambiguous. */
    private static final JsonMapper JSON = JsonMapper.builder()
            .enable(StreamReadFeature.STRICT_DUPLICATE_DETECTION)
            .build();
    private static final Set<String> TOP_KEYS = Set.of("title", "description", "data", "confidence", "missing",
            "decisions", "sample", "seed", "maxSpecifications", "nullDraws", "nullMethod", "nullCluster", "reported");
    private static final List<String> KINDS = List.of("outcome", "predictor", "controls", "sample", "errors", "absorb",
            "model", "weights");
    private static final Map<String, List<String>> DECISION_KEYS = Map.of(
            "outcome", List.of("name", "kind", "alternatives"),
            "predictor", List.of("name", "kind", "alternatives"),
            "controls", List.of("name", "kind", "required", "optional", "combine", "sets"),
            "sample", List.of("name", "kind", "alternatives"),
            "errors", List.of("name", "kind", "alternatives"),
            "absorb", List.of("name", "kind", "alternatives"),
            "model", List.of("name", "kind", "alternatives"),
            "weights", List.of("name", "kind", "alternatives"));
    /** Output columns of specifications.csv that a decision name must not shadow. */
    public static final Set<String> RESERVED_NAMES = Set.of("spec", "estimate", "std_error", "statistic", "df",
            "p_value", "ci_low", "ci_high", "std_estimate", "effect", "effect_std_error", "n_obs", "n_params", "r2", "adj_r2",
            "model_p_value", "deviance", "status");
    /** Optional controls in one all-subsets decision: 2^40 subsets is beyond any specification cap already. */
    static final int MAX_OPTIONAL_CONTROLS = 40;
    /** The defaults of the plan's optional top-level settings, which the plan form shows in its empty fields. */
    public static final double DEFAULT_CONFIDENCE = 0.95;
    public static final long DEFAULT_SEED = 1L;
    public static final long DEFAULT_SAMPLE = 0;
    public static final int DEFAULT_NULL_DRAWS = 0;
    public static final String DEFAULT_NULL_METHOD = "bootstrap";

    private final boolean confineDataToPlanFolder;

    /**
     * @param confineDataToPlanFolder when true (a shared server), a {@code data} path may not leave the
     *                                plan's folder
     */
    public PlanReader(boolean confineDataToPlanFolder) {
        this.confineDataToPlanFolder = confineDataToPlanFolder;
    }

    public Plan read(Path planFile) {
        return read(readText(planFile), planFile.toAbsolutePath().getParent());
    }

    /**
     * The text of a plan file, without a leading byte-order mark. A missing or unreadable file, or one
     * that is not UTF-8, is a {@link PlanException} whose message names the file.
     */
    public static String readText(Path planFile) {
        return text(readBytes(planFile), planFile);
    }

    /** A plan file's bytes as they are on disk; a missing or unreadable file is a {@link PlanException}. */
    public static byte[] readBytes(Path planFile) {
        if (!Files.isRegularFile(planFile)) {
            throw new PlanException("", "no plan file at " + planFile);
        }
        try {
            return Files.readAllBytes(planFile);
        } catch (IOException e) {
            throw new PlanException("", "cannot read the plan file " + planFile + ": " + e.getMessage());
        }
    }

    /**
     * The text of a plan file's bytes (not modified), without a leading byte-order mark; bytes that are
     * not UTF-8 are a {@link PlanException} whose message names the file.
     */
    public static String text(byte[] bytes, Path planFile) {
        try {
            return withoutByteOrderMark(StandardCharsets.UTF_8.newDecoder()
                    .onMalformedInput(CodingErrorAction.REPORT)
                    .onUnmappableCharacter(CodingErrorAction.REPORT)
                    .decode(ByteBuffer.wrap(bytes))
                    .toString());
        } catch (CharacterCodingException e) {
            throw new PlanException("", "the plan file " + planFile + " is not UTF-8 text; save it as UTF-8");
        }
    }

    /** Reads plan JSON whose relative {@code data} path is resolved against {@code folder}. */
    public Plan read(String json, Path folder) {
        JsonNode root;
        try {
            root = JSON.readTree(withoutByteOrderMark(json));
        } catch (JacksonException e) {
            TokenStreamLocation at = e.getLocation();
            String where = at == null || at.getLineNr() < 1 ? ""
                    : "line " + at.getLineNr() + ", column " + at.getColumnNr();
            throw new PlanException(where, "is not valid JSON: " + JsonErrors.plain(e.getOriginalMessage()));
        }
        if (root == null || !root.isObject()) {
            throw new PlanException("", "a plan is a JSON object {...} with at least \"data\" and \"decisions\"");
        }
        PlanProblems problems = new PlanProblems();
        for (String key : root.propertyNames()) {
            if (!TOP_KEYS.contains(key)) {
                problems.attempt(() -> {
                    throw new PlanException(InputException.cut(key), "unknown key" + suggest(key, TOP_KEYS));
                });
            }
        }
        problems.attempt(() -> text(root, "title", "title", null));
        problems.attempt(() -> text(root, "description", "description", null));
        Path dataFile = problems.attempt(() -> dataFile(root, folder), null);
        double confidence = problems.attempt(() -> {
            double c = number(root, "confidence", "confidence", DEFAULT_CONFIDENCE);
            if (!(c > 0 && c < 1)) {
                throw new PlanException("confidence", "must lie strictly between 0 and 1, as in 0.95; found " + c);
            }
            return c;
        }, DEFAULT_CONFIDENCE);
        MissingRows missing = problems.attempt(() -> missing(root), MissingRows.PER_SPECIFICATION);
        int beforeDecisions = problems.count();
        List<Decision> decisions = problems.attempt(() -> decisions(root.get("decisions"), problems), List.of());
        // against decisions that did not read, every reported label would look wrong
        ReportedSpecification reported = problems.count() > beforeDecisions ? null
                : ReportedSpecification.read(root.get("reported"), decisions, problems);
        long sample = problems.attempt(() -> wholeNumber(root, "sample", DEFAULT_SAMPLE, 1, Long.MAX_VALUE),
                DEFAULT_SAMPLE);
        long seed = problems.attempt(() -> wholeNumber(root, "seed", DEFAULT_SEED, Long.MIN_VALUE, Long.MAX_VALUE),
                DEFAULT_SEED);
        long cap = problems.attempt(() -> wholeNumber(root, "maxSpecifications", Plan.DEFAULT_MAX_SPECIFICATIONS, 1,
                Long.MAX_VALUE), Plan.DEFAULT_MAX_SPECIFICATIONS);
        int draws = (int) (long) problems.attempt(() -> wholeNumber(root, "nullDraws", DEFAULT_NULL_DRAWS, 0,
                Integer.MAX_VALUE), (long) DEFAULT_NULL_DRAWS);
        String method = problems.attempt(() -> {
            String m = text(root, "nullMethod", "nullMethod", DEFAULT_NULL_METHOD);
            if (!m.equals("bootstrap") && !m.equals("permute")) {
                throw new PlanException("nullMethod", "must be \"bootstrap\" or \"permute\"; found \"" + m + "\"");
            }
            return m;
        }, DEFAULT_NULL_METHOD);
        String cluster = problems.attempt(() -> text(root, "nullCluster", "nullCluster", null), null);
        problems.throwIfAny();
        return new Plan(dataFile, confidence, missing, decisions, sample, seed, cap, draws, method, cluster,
                reported);
    }

    private static String withoutByteOrderMark(String text) {
        return text.startsWith("\uFEFF") ? text.substring(1) : text;
    }

    private Path dataFile(JsonNode root, Path folder) {
        String data = text(root, "data", "data", null);
        if (data == null || data.isBlank()) {
            throw new PlanException("data", "is required: the path of the data (a CSV file, a Parquet file or a folder of Parquet part files), relative to the plan file");
        }
        Path resolved;
        boolean absolute;
        try {
            absolute = Path.of(data).isAbsolute();
            resolved = folder.resolve(data).normalize();
        } catch (InvalidPathException e) {
            throw new PlanException("data", InputException.quoted(data) + " is not a usable file path");
        }
        if (confineDataToPlanFolder && (absolute || !resolved.startsWith(folder.normalize())
                || leavesThroughLink(resolved, folder))) {
            throw new PlanException("data", InputException.quoted(data) + " leaves the analysis folder; give a file name inside it");
        }
        return resolved;
    }

    /** Whether an existing file lies outside the folder once symbolic links are followed. */
    private static boolean leavesThroughLink(Path file, Path folder) {
        if (!Files.exists(file)) {
            return false;
        }
        try {
            return !file.toRealPath().startsWith(folder.toRealPath());
        } catch (IOException e) {
            return true;
        }
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

    private static List<Decision> decisions(JsonNode node, PlanProblems problems) {
        if (node == null || node.isNull()) {
            throw new PlanException("decisions", "is required: a list of decisions, at least an outcome and a "
                    + "predictor");
        }
        if (!node.isArray()) {
            throw new PlanException("decisions", "must be a list [...] of decisions; found " + typeOf(node));
        }
        if (node.isEmpty()) {
            throw new PlanException("decisions", "is empty; a plan needs at least an outcome and a predictor decision");
        }
        List<Decision> out = new ArrayList<>();
        Set<String> names = new HashSet<>();
        int before = problems.count();
        for (int i = 0; i < node.size(); i++) {
            String path = "decisions[" + i + "]";
            JsonNode d = node.get(i);
            problems.attempt(() -> {
                out.add(decision(d, path, names, problems));
            });
        }
        if (problems.count() > before) {
            // a decision that did not read would make the counts below wrong
            return out;
        }
        requireCount(out, Decision.Outcome.class, "outcome", 1, 1);
        requireCount(out, Decision.Predictor.class, "predictor", 1, 1);
        requireCount(out, Decision.Errors.class, "errors", 0, 1);
        requireCount(out, Decision.Absorb.class, "absorb", 0, 1);
        requireCount(out, Decision.Model.class, "model", 0, 1);
        requireCount(out, Decision.Weights.class, "weights", 0, 1);
        return out;
    }

    /** One decision; a problem with its name is kept and its alternatives are read on. */
    private static Decision decision(JsonNode d, String path, Set<String> names, PlanProblems problems) {
        if (!d.isObject()) {
            throw new PlanException(path, "each decision is an object {\"name\": ..., \"kind\": ...}; found "
                    + typeOf(d));
        }
        String name = problems.attempt(() -> {
            String n = text(d, "name", path + ".name", null);
            if (n == null || n.isBlank()) {
                throw new PlanException(path + ".name", "is empty; every decision needs a name");
            }
            if (!names.add(n)) {
                throw new PlanException(path + ".name", "the decision name \"" + n + "\" is used twice");
            }
            if (RESERVED_NAMES.contains(n)) {
                throw new PlanException(path + ".name", "\"" + n + "\" is an output column of specifications.csv; "
                        + "choose another decision name");
            }
            return n;
        }, null);
        String kind = text(d, "kind", path + ".kind", null);
        if (kind == null) {
            throw new PlanException(path + ".kind", "is required: one of " + String.join(", ", KINDS));
        }
        List<String> keys = DECISION_KEYS.get(kind);
        if (keys == null) {
            throw new PlanException(path + ".kind", "unknown kind " + InputException.quoted(kind) + suggest(kind, KINDS)
                    + " (the kinds are " + String.join(", ", KINDS) + ")");
        }
        for (String key : d.propertyNames()) {
            if (!keys.contains(key)) {
                problems.attempt(() -> {
                    throw new PlanException(path + "." + InputException.cut(key), "unknown key for a decision of "
                            + "kind \"" + kind + "\"" + suggest(key, keys) + " (its keys are "
                            + String.join(", ", keys) + ")");
                });
            }
        }
        return switch (kind) {
            case "outcome" -> new Decision.Outcome(name, variables(d, path, problems));
            case "predictor" -> new Decision.Predictor(name, variables(d, path, problems));
            case "controls" -> controls(d, name, path, problems);
            case "sample" -> sample(d, name, path, problems);
            case "errors" -> errors(d, name, path, problems);
            case "model" -> model(d, name, path, problems);
            case "weights" -> weights(d, name, path, problems);
            default -> absorb(d, name, path, problems);
        };
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

    private static List<VariableChoice> variables(JsonNode d, String path, PlanProblems problems) {
        JsonNode alts = alternatives(d, path);
        List<VariableChoice> out = new ArrayList<>();
        Set<String> labels = new HashSet<>();
        for (int j = 0; j < alts.size(); j++) {
            String p = path + ".alternatives[" + j + "]";
            JsonNode node = alts.get(j);
            problems.attempt(() -> {
                JsonNode a = object(node, p, "{\"label\": ..., \"column\": ..., \"transform\": ...}");
                boolean keys = problems.attempt(() -> onlyKeys(a, p, Set.of("label", "column", "transform")));
                String label = problems.attempt(() -> label(a, p, labels), null);
                String column = problems.attempt(() -> {
                    String c = text(a, "column", p + ".column", null);
                    if (c == null || c.isEmpty()) {
                        throw new PlanException(p + ".column", "is required: the column this alternative uses");
                    }
                    return c;
                }, null);
                Transform transform = problems.attempt(() -> Transform.parse(text(a, "transform", p + ".transform",
                        "none"), p + ".transform"), null);
                if (keys && label != null && column != null && transform != null) {
                    out.add(new VariableChoice(label, column, transform));
                }
            });
        }
        return out;
    }

    private static Decision.Controls controls(JsonNode d, String name, String path, PlanProblems problems) {
        List<String> required = problems.attempt(() -> columns(d.get("required"), path + ".required"), List.of());
        List<String> optional = problems.attempt(() -> columns(d.get("optional"), path + ".optional"), List.of());
        String combine = text(d, "combine", path + ".combine", "all-subsets");
        if (combine.equals("all-subsets")) {
            if (d.has("sets")) {
                throw new PlanException(path + ".sets", "is used only with \"combine\": \"sets\"");
            }
            if (optional.size() > MAX_OPTIONAL_CONTROLS) {
                throw new PlanException(path + ".optional", "has " + optional.size() + " controls: every subset of "
                        + "more than " + MAX_OPTIONAL_CONTROLS + " is beyond any specification cap; use "
                        + "\"combine\": \"sets\" with the sets that matter");
            }
            return new Decision.Controls(name, required, optional, null);
        }
        if (!combine.equals("sets")) {
            throw new PlanException(path + ".combine", "must be \"all-subsets\" or \"sets\"; found \"" + combine
                    + "\"");
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
            problems.attempt(() -> {
                if (e.getKey().isBlank()) {
                    throw new PlanException(path + ".sets", "a set needs a non-empty label");
                }
                named.put(e.getKey(), columns(e.getValue(), path + ".sets." + e.getKey()));
            });
        }
        return new Decision.Controls(name, required, List.of(), named);
    }

    private static Decision.Sample sample(JsonNode d, String name, String path, PlanProblems problems) {
        JsonNode alts = alternatives(d, path);
        List<SampleRule> out = new ArrayList<>();
        Set<String> labels = new HashSet<>();
        for (int j = 0; j < alts.size(); j++) {
            String p = path + ".alternatives[" + j + "]";
            JsonNode node = alts.get(j);
            problems.attempt(() -> {
                JsonNode a = object(node, p, "{\"label\": ...} with \"keep\" or \"trim\" or neither");
                boolean keys = problems.attempt(() -> onlyKeys(a, p, Set.of("label", "keep", "trim")));
                String label = problems.attempt(() -> label(a, p, labels), null);
                SampleRule rule = problems.attempt(() -> sampleRule(a, p, label), null);
                if (keys && label != null && rule != null) {
                    out.add(rule);
                }
            });
        }
        return new Decision.Sample(name, out);
    }

    private static SampleRule sampleRule(JsonNode a, String p, String label) {
        if (a.has("keep") && a.has("trim")) {
            throw new PlanException(p, "give either \"keep\" or \"trim\", not both");
        }
        if (a.has("keep")) {
            String keep = text(a, "keep", p + ".keep", null);
            if (keep == null || keep.isBlank()) {
                throw new PlanException(p + ".keep", "needs an expression, as in income > 0");
            }
            return new SampleRule.KeepRows(label, RowExpression.parse(keep, p + ".keep"));
        }
        if (a.has("trim")) {
            JsonNode t = object(a.get("trim"), p + ".trim", "{\"column\": ..., \"z\": ...}");
            onlyKeys(t, p + ".trim", Set.of("column", "z"));
            String column = text(t, "column", p + ".trim.column", null);
            if (column == null) {
                throw new PlanException(p + ".trim.column", "is required: the column whose z-score is trimmed");
            }
            double z = number(t, "z", p + ".trim.z", Double.NaN);
            if (!(z > 0) || Double.isInfinite(z)) {
                throw new PlanException(p + ".trim.z", "must be a positive number of standard deviations, as "
                        + "in 3; found " + (Double.isNaN(z) ? "nothing" : z));
            }
            return new SampleRule.TrimRows(label, column, z);
        }
        return new SampleRule.AllRows(label);
    }

    private static Decision.Errors errors(JsonNode d, String name, String path, PlanProblems problems) {
        JsonNode alts = alternatives(d, path);
        List<ErrorType> out = new ArrayList<>();
        Set<String> seen = new HashSet<>();
        for (int j = 0; j < alts.size(); j++) {
            String p = path + ".alternatives[" + j + "]";
            JsonNode a = alts.get(j);
            problems.attempt(() -> {
                if (!a.isString()) {
                    throw new PlanException(p, "each error type is text: classical, HC0, HC1, HC2, HC3 or "
                            + "cluster:COLUMN; found " + typeOf(a));
                }
                ErrorType e = ErrorType.parse(a.stringValue(), p);
                if (!seen.add(e.label())) {
                    throw new PlanException(p, InputException.quoted(e.label()) + " is listed twice");
                }
                out.add(e);
            });
        }
        return new Decision.Errors(name, out);
    }

    private static Decision.Model model(JsonNode d, String name, String path, PlanProblems problems) {
        JsonNode alts = alternatives(d, path);
        List<ModelFamily> out = new ArrayList<>();
        for (int j = 0; j < alts.size(); j++) {
            String p = path + ".alternatives[" + j + "]";
            JsonNode a = alts.get(j);
            problems.attempt(() -> {
                if (!a.isString()) {
                    throw new PlanException(p, "each model is text: " + String.join(", ", ModelFamily.spellings())
                            + "; found " + typeOf(a));
                }
                String text = a.stringValue().trim();
                ModelFamily family = java.util.Arrays.stream(ModelFamily.values())
                        .filter(f -> f.spelling().equalsIgnoreCase(text)).findFirst()
                        .orElseThrow(() -> new PlanException(p, "unknown model " + InputException.quoted(a.stringValue())
                                + suggest(text, ModelFamily.spellings()) + "; use "
                                + String.join(", ", ModelFamily.spellings())));
                if (out.contains(family)) {
                    throw new PlanException(p, InputException.quoted(family.spelling()) + " is listed twice");
                }
                out.add(family);
            });
        }
        return new Decision.Model(name, out);
    }

    private static Decision.Absorb absorb(JsonNode d, String name, String path, PlanProblems problems) {
        JsonNode alts = alternatives(d, path);
        List<AbsorbChoice> out = new ArrayList<>();
        Set<String> labels = new HashSet<>();
        for (int j = 0; j < alts.size(); j++) {
            String p = path + ".alternatives[" + j + "]";
            JsonNode node = alts.get(j);
            problems.attempt(() -> {
                JsonNode a = object(node, p, "{\"label\": ..., \"columns\": [...]}");
                boolean keys = problems.attempt(() -> onlyKeys(a, p, Set.of("label", "columns")));
                String label = problems.attempt(() -> label(a, p, labels), null);
                List<String> columns = problems.attempt(() -> columns(a.get("columns"), p + ".columns"), null);
                if (keys && label != null && columns != null) {
                    out.add(new AbsorbChoice(label, columns));
                }
            });
        }
        return new Decision.Absorb(name, out);
    }

    /** A weights decision: alternatives {"label", "column"} (analytic weights) or {"label"} (unweighted). */
    private static Decision.Weights weights(JsonNode d, String name, String path, PlanProblems problems) {
        JsonNode alts = alternatives(d, path);
        List<WeightChoice> out = new ArrayList<>();
        Set<String> labels = new HashSet<>();
        for (int j = 0; j < alts.size(); j++) {
            String p = path + ".alternatives[" + j + "]";
            JsonNode node = alts.get(j);
            problems.attempt(() -> {
                JsonNode a = object(node, p, "{\"label\": ..., \"column\": ...} or {\"label\": ...} for unweighted");
                boolean keys = problems.attempt(() -> onlyKeys(a, p, Set.of("label", "column")));
                String label = problems.attempt(() -> label(a, p, labels), null);
                boolean columnRead = problems.attempt(() -> {
                    String c = text(a, "column", p + ".column", null);
                    if (c != null && c.isEmpty()) {
                        throw new PlanException(p + ".column", "is empty: name the weight column, or leave the key "
                                + "out for the unweighted alternative");
                    }
                });
                if (keys && label != null && columnRead) {
                    out.add(new WeightChoice(label, text(a, "column", p + ".column", null)));
                }
            });
        }
        return new Decision.Weights(name, out);
    }

    private static JsonNode alternatives(JsonNode d, String path) {
        JsonNode alts = d.get("alternatives");
        if (alts == null || alts.isNull()) {
            throw new PlanException(path + ".alternatives", "is required: a list of alternatives");
        }
        if (!alts.isArray()) {
            throw new PlanException(path + ".alternatives", "must be a list [...] of alternatives; found "
                    + typeOf(alts));
        }
        if (alts.isEmpty()) {
            throw new PlanException(path + ".alternatives", "is empty; a decision needs at least one alternative");
        }
        return alts;
    }

    private static JsonNode object(JsonNode n, String path, String shape) {
        if (n == null || !n.isObject()) {
            throw new PlanException(path, "must be an object " + shape + "; found " + typeOf(n));
        }
        return n;
    }

    private static void onlyKeys(JsonNode n, String path, Set<String> allowed) {
        for (String key : n.propertyNames()) {
            if (!allowed.contains(key)) {
                throw new PlanException(path + "." + InputException.cut(key), "unknown key" + suggest(key, allowed));
            }
        }
    }

    private static String label(JsonNode a, String path, Set<String> seen) {
        String label = text(a, "label", path + ".label", null);
        if (label == null || label.isBlank()) {
            throw new PlanException(path + ".label", "is empty; every alternative needs a label");
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
            throw new PlanException(path, "must be a list [...] of column names; found " + typeOf(n));
        }
        List<String> out = new ArrayList<>();
        for (int j = 0; j < n.size(); j++) {
            JsonNode c = n.get(j);
            if (!c.isString() || c.stringValue().isEmpty()) {
                throw new PlanException(path + "[" + j + "]", "must be a column name in double quotes; found "
                        + typeOf(c));
            }
            if (out.contains(c.stringValue())) {
                throw new PlanException(path + "[" + j + "]", InputException.quoted(c.stringValue()) + " is listed twice");
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
            throw new PlanException(path, "must be text in double quotes; found " + typeOf(v));
        }
        return v.stringValue();
    }

    private static double number(JsonNode n, String key, String path, double fallback) {
        JsonNode v = n.get(key);
        if (v == null || v.isNull()) {
            return fallback;
        }
        if (!v.isNumber()) {
            throw new PlanException(path, "must be a number; found " + typeOf(v));
        }
        return v.doubleValue();
    }

    private static long wholeNumber(JsonNode n, String key, long fallback, long min, long max) {
        JsonNode v = n.get(key);
        if (v == null || v.isNull()) {
            return fallback;
        }
        if (!v.isIntegralNumber()) {
            throw new PlanException(key, "must be a whole number; found " + typeOf(v));
        }
        String range = "must be at least " + min + (max < Long.MAX_VALUE ? " and at most " + max : "");
        if (!v.canConvertToLong()) {
            throw new PlanException(key, range + "; found " + v);
        }
        long value = v.longValue();
        if (value < min || value > max) {
            throw new PlanException(key, range + "; found " + value);
        }
        return value;
    }

    /** The JSON type of a node in words, for "found ..." in messages. */
    static String typeOf(JsonNode n) {
        if (n == null || n.isMissingNode()) {
            return "nothing";
        }
        if (n.isString()) {
            String s = n.stringValue();
            return "the text \"" + (s.length() <= 40 ? s : s.substring(0, 40) + "...") + "\"";
        }
        if (n.isNumber()) {
            return "the number " + n;
        }
        if (n.isBoolean()) {
            return n.asBoolean() ? "true" : "false";
        }
        if (n.isArray()) {
            return "a list";
        }
        if (n.isObject()) {
            return "an object";
        }
        return "null";
    }

    static String suggest(String word, Collection<String> candidates) {
        String best = null;
        int bestDistance = Integer.MAX_VALUE;
        for (String c : candidates) {
            int d = Table.editDistance(word.toLowerCase(Locale.ROOT), c.toLowerCase(Locale.ROOT));
            if (d < bestDistance) {
                bestDistance = d;
                best = c;
            }
        }
        return best != null && bestDistance <= Math.max(2, word.length() / 3) ? "; did you mean \"" + best + "\"?" : "";
    }
}
