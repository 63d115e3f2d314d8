package org.forkscape.plan;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertInstanceOf;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import java.util.Map;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.CsvSource;

/** Every plan key, its default, and each structural mistake with the JSON path it is reported at. */
class PlanReaderTest {
    private static final Path FOLDER = Path.of("/analyses/civic").toAbsolutePath();
    private static final String OUTCOME = "{\"name\": \"outcome\", \"kind\": \"outcome\", \"alternatives\": "
            + "[{\"label\": \"turnout\", \"column\": \"turnout\"}]}";
    private static final String PREDICTOR = "{\"name\": \"key\", \"kind\": \"predictor\", \"alternatives\": "
            + "[{\"label\": \"mailers\", \"column\": \"mailers\"}]}";

    static Plan read(String json) {
        return new PlanReader(false).read(json, FOLDER);
    }

    /** A plan with the given decisions after the outcome and predictor, and extra top-level keys. */
    static String plan(String extraTop, String... decisions) {
        StringBuilder b = new StringBuilder("{\"data\": \"wards.csv\"");
        if (!extraTop.isEmpty()) {
            b.append(", ").append(extraTop);
        }
        b.append(", \"decisions\": [").append(OUTCOME).append(", ").append(PREDICTOR);
        for (String d : decisions) {
            b.append(", ").append(d);
        }
        return b.append("]}").toString();
    }

    static PlanException failure(String json) {
        return assertThrows(PlanException.class, () -> read(json));
    }

    static void fails(String json, String path, String fragment) {
        PlanException e = failure(json);
        assertEquals(path, e.where(), e.getMessage());
        assertTrue(e.problem().contains(fragment), "expected \"" + fragment + "\" in: " + e.getMessage());
    }

    /**
     * The plan form's fresh plan: two empty alternatives, a bad seed and an unknown key. One reading finds
     * every problem in the order of the text, and the first is the one the command line prints.
     */
    @Test
    void oneReadingFindsEveryProblemInOrderAndTheFirstLeads() {
        String json = "{\"data\": \"wards.csv\", \"seeed\": 3, \"seed\": 1.5, \"decisions\": ["
                + "{\"name\": \"outcome\", \"kind\": \"outcome\", \"alternatives\": [{\"label\": \"\", \"column\": \"\"}]}, "
                + "{\"name\": \"\", \"kind\": \"predictor\", \"alternatives\": [{\"label\": \"x\", \"column\": \"x\"}, "
                + "{\"label\": \"x\", \"column\": \"\", \"transform\": \"cube\"}]}]}";
        PlanException e = failure(json);
        assertEquals(List.of("seeed", "decisions[0].alternatives[0].label", "decisions[0].alternatives[0].column",
                "decisions[1].name", "decisions[1].alternatives[1].label", "decisions[1].alternatives[1].column",
                "decisions[1].alternatives[1].transform", "seed"),
                e.all().stream().map(PlanException::where).toList());
        assertEquals("seeed", e.where());
        assertTrue(e.problem().startsWith("unknown key; did you mean \"seed\"?"), e.problem());
        assertEquals(e.all().get(0).getMessage(), e.getMessage());
    }

    @Test
    void aPlanWithOneProblemListsThatOneAlone() {
        PlanException e = failure(plan("\"seed\": \"one\""));
        assertEquals(List.of("seed"), e.all().stream().map(PlanException::where).toList());
    }

    @Test
    void aMinimalPlanTakesEveryDefault() {
        Plan p = read(plan(""));
        assertEquals(FOLDER.resolve("wards.csv"), p.dataFile());
        assertEquals(0.95, p.confidence());
        assertEquals(0.05, p.alpha(), 1e-15);
        assertEquals(MissingRows.PER_SPECIFICATION, p.missing());
        assertEquals(0, p.sampleSize());
        assertEquals(1, p.seed());
        assertEquals(Plan.DEFAULT_MAX_SPECIFICATIONS, p.maxSpecifications());
        assertEquals(1_000_000L, p.maxSpecifications());
        assertEquals(0, p.nullDraws());
        assertEquals("bootstrap", p.nullMethod());
        assertNull(p.nullCluster());
        assertEquals(2, p.decisions().size());
        VariableChoice turnout = p.outcome().alternatives().get(0);
        assertEquals(new VariableChoice("turnout", "turnout", Transform.NONE), turnout);
        assertEquals("mailers", p.predictor().alternatives().get(0).column());
    }

    @Test
    void everyTopLevelKeyIsRead() {
        Plan p = read(plan("\"title\": \"Mailers and turnout\", \"description\": \"declared in advance\", "
                + "\"confidence\": 0.9, \"missing\": \"common\", \"sample\": 500, \"seed\": -42, "
                + "\"maxSpecifications\": 2000, \"nullDraws\": 200, \"nullMethod\": \"permute\", "
                + "\"nullCluster\": \"district\""));
        assertEquals(0.9, p.confidence());
        assertEquals(MissingRows.COMMON, p.missing());
        assertEquals(500, p.sampleSize());
        assertEquals(-42, p.seed());
        assertEquals(2000, p.maxSpecifications());
        assertEquals(200, p.nullDraws());
        assertEquals("permute", p.nullMethod());
        assertEquals("district", p.nullCluster());
    }

    @Test
    void everyDecisionKindIsRead() {
        Plan p = read(plan("",
                "{\"name\": \"ctl\", \"kind\": \"controls\", \"required\": [\"age\"], \"optional\": [\"income\", \"density\"]}",
                "{\"name\": \"sets\", \"kind\": \"controls\", \"combine\": \"sets\", \"sets\": {\"lean\": [], "
                        + "\"full\": [\"rain\", \"tenure\"]}}",
                "{\"name\": \"rows\", \"kind\": \"sample\", \"alternatives\": [{\"label\": \"all\"}, {\"label\": \"urban\", "
                        + "\"keep\": \"density > 100 and region != \\\"rural\\\"\"}, {\"label\": \"trimmed\", "
                        + "\"trim\": {\"column\": \"income\", \"z\": 3}}]}",
                "{\"name\": \"se\", \"kind\": \"errors\", \"alternatives\": [\"classical\", \"HC0\", \"hc1\", \"HC2\", "
                        + "\"HC3\", \"cluster: district\"]}",
                "{\"name\": \"fe\", \"kind\": \"absorb\", \"alternatives\": [{\"label\": \"none\", \"columns\": []}, "
                        + "{\"label\": \"district\", \"columns\": [\"district\"]}]}"));
        assertEquals(7, p.decisions().size());
        Decision.Controls ctl = assertInstanceOf(Decision.Controls.class, p.decisions().get(2));
        assertEquals(List.of("age"), ctl.required());
        assertEquals(4, ctl.alternativeCount());
        assertEquals(List.of("none", "income", "density", "income + density"),
                List.of(ctl.label(0), ctl.label(1), ctl.label(2), ctl.label(3)));
        assertEquals(List.of("income", "density"), ctl.chosen(3));
        Decision.Controls sets = assertInstanceOf(Decision.Controls.class, p.decisions().get(3));
        assertEquals(Map.of("lean", List.of(), "full", List.of("rain", "tenure")), sets.sets());
        assertEquals("full", sets.label(1));
        assertEquals(List.of("rain", "tenure"), sets.chosen(1));
        Decision.Sample rows = assertInstanceOf(Decision.Sample.class, p.decisions().get(4));
        assertInstanceOf(SampleRule.AllRows.class, rows.alternatives().get(0));
        SampleRule.KeepRows urban = assertInstanceOf(SampleRule.KeepRows.class, rows.alternatives().get(1));
        assertEquals(List.of("density", "region"), List.copyOf(urban.expression().columns()));
        assertEquals(new SampleRule.TrimRows("trimmed", "income", 3), rows.alternatives().get(2));
        Decision.Errors se = assertInstanceOf(Decision.Errors.class, p.decisions().get(5));
        assertEquals(List.of("classical", "HC0", "HC1", "HC2", "HC3", "cluster:district"),
                se.alternatives().stream().map(ErrorType::label).toList());
        assertEquals("district", se.alternatives().get(5).clusterColumn());
        Decision.Absorb fe = assertInstanceOf(Decision.Absorb.class, p.decisions().get(6));
        assertEquals(List.of(), fe.alternatives().get(0).columns());
        assertEquals(List.of("district"), fe.alternatives().get(1).columns());
    }

    @ParameterizedTest
    @CsvSource(delimiter = '|', value = {
            "log|log", "log1p|log1p", "sqrt|sqrt", "standardize|standardize", "none|none", "LOG|log",
            "winsorize:0.05|winsorize:0.05", "winsorize:.1|winsorize:0.1"})
    void transformsAreRead(String written, String spelling) {
        Plan p = read("{\"data\": \"d.csv\", \"decisions\": [{\"name\": \"y\", \"kind\": \"outcome\", \"alternatives\": "
                + "[{\"label\": \"y\", \"column\": \"y\", \"transform\": \"" + written + "\"}]}, " + PREDICTOR + "]}");
        assertEquals(spelling, p.outcome().alternatives().get(0).transform().spelling());
    }

    @ParameterizedTest
    @CsvSource(delimiter = '|', value = {
            "square|unknown transform \"square\"",
            "winsorize|unknown transform",
            "winsorize:abc|winsorize needs a fraction",
            "winsorize:0x1p-3|winsorize needs a fraction",
            "winsorize:0.5|strictly between 0 and 0.5",
            "winsorize:0|strictly between 0 and 0.5"})
    void badTransformsNameTheirField(String written, String fragment) {
        fails("{\"data\": \"d.csv\", \"decisions\": [{\"name\": \"y\", \"kind\": \"outcome\", \"alternatives\": "
                + "[{\"label\": \"y\", \"column\": \"y\", \"transform\": \"" + written + "\"}]}, " + PREDICTOR + "]}",
                "decisions[0].alternatives[0].transform", fragment);
    }

    @Test
    void textThatIsNotJsonNamesLineAndColumnInPlainWords() {
        fails("{\"data\": \"d.csv\",\n}", "line 2, column 1", "no trailing comma");
        fails("{\"data\": \"d.csv\"\n \"decisions\": []}", "line 2, column 2", "a comma is missing");
        fails("{'data': 'd.csv'}", "line 1, column 2", "double quotes, not single quotes");
        fails("// my plan\n{}", "line 1, column 1", "no comments");
        fails("{\"data\": \"d.csv\"} {}", "line 1, column 19", "more text after");
        fails("{\"data\": \"d.csv\",\n \"decisions\": [", "line 2, column 16", "before every");
        fails("{\"data\": \"d.csv\", \"data\": \"e.csv\"}", "line 1, column 25", "the key \"data\" appears twice");
        fails("{\"data\": yes}", "line 1, column 10", "\"yes\" is not a JSON value");
        fails("{\"confidence\": 095}", "line 1, column 17", "cannot start with 0");
    }

    @Test
    void deeplyNestedJsonIsRefusedWithoutOverflowingTheStack() {
        PlanException e = failure("{\"description\": " + "[".repeat(100_000));
        assertTrue(e.problem().contains("levels deep"), e.getMessage());
    }

    @Test
    void aPlanIsAnObject() {
        fails("[]", "", "a plan is a JSON object");
        fails("", "", "a plan is a JSON object");
        fails("\"plan\"", "", "a plan is a JSON object");
    }

    @Test
    void unknownKeysAreNamedWithTheNearestKnownOne() {
        fails(plan("\"decision\": []"), "decision", "did you mean \"decisions\"?");
        fails(plan("\"confidance\": 0.9"), "confidance", "did you mean \"confidence\"?");
        fails(plan("", "{\"name\": \"se\", \"kind\": \"errors\", \"alternative\": [\"HC1\"]}"),
                "decisions[2].alternative", "did you mean \"alternatives\"?");
        fails(plan("", "{\"name\": \"c\", \"kind\": \"controls\", \"optinal\": [\"a\"]}"),
                "decisions[2].optinal", "did you mean \"optional\"?");
        fails("{\"data\": \"d.csv\", \"decisions\": [{\"name\": \"y\", \"kind\": \"outcome\", \"transform\": \"log\", "
                + "\"alternatives\": [{\"label\": \"y\", \"column\": \"y\"}]}, " + PREDICTOR + "]}",
                "decisions[0].transform", "unknown key for a decision of kind \"outcome\"");
        fails("{\"data\": \"d.csv\", \"decisions\": [{\"name\": \"y\", \"kind\": \"outcome\", \"alternatives\": "
                + "[{\"label\": \"y\", \"colum\": \"y\"}]}, " + PREDICTOR + "]}",
                "decisions[0].alternatives[0].colum", "did you mean \"column\"?");
        fails(plan("", "{\"name\": \"r\", \"kind\": \"sample\", \"alternatives\": [{\"label\": \"t\", "
                + "\"trim\": {\"column\": \"x\", \"sd\": 3}}]}"), "decisions[2].alternatives[0].trim.sd", "unknown key");
    }

    @Test
    void wrongJsonTypesSayWhatWasFound() {
        fails("{\"data\": 5, \"decisions\": []}", "data", "must be text in double quotes; found the number 5");
        fails(plan("\"confidence\": \"0.95\""), "confidence", "must be a number; found the text \"0.95\"");
        fails("{\"data\": \"d.csv\", \"decisions\": {}}", "decisions", "must be a list [...] of decisions; found an object");
        fails("{\"data\": \"d.csv\", \"decisions\": [7]}", "decisions[0]", "found the number 7");
        fails(plan("", "{\"name\": \"se\", \"kind\": \"errors\", \"alternatives\": \"HC1\"}"),
                "decisions[2].alternatives", "found the text \"HC1\"");
        fails(plan("", "{\"name\": \"se\", \"kind\": \"errors\", \"alternatives\": [1]}"),
                "decisions[2].alternatives[0]", "each error type is text");
        fails(plan("", "{\"name\": \"c\", \"kind\": \"controls\", \"required\": \"age\"}"),
                "decisions[2].required", "must be a list [...] of column names; found the text \"age\"");
        fails(plan("", "{\"name\": \"c\", \"kind\": \"controls\", \"required\": [\"age\", 3]}"),
                "decisions[2].required[1]", "must be a column name in double quotes; found the number 3");
        fails("{\"data\": \"d.csv\", \"decisions\": [{\"name\": \"y\", \"kind\": \"outcome\", \"alternatives\": "
                + "[{\"label\": 1, \"column\": \"y\"}]}, " + PREDICTOR + "]}", "decisions[0].alternatives[0].label",
                "must be text in double quotes; found the number 1");
        fails("{\"data\": \"d.csv\", \"decisions\": [{\"name\": \"y\", \"kind\": \"outcome\", \"alternatives\": "
                + "[\"y\"]}, " + PREDICTOR + "]}", "decisions[0].alternatives[0]", "must be an object");
        fails(plan("\"seed\": 1.5"), "seed", "must be a whole number; found the number 1.5");
        fails(plan("\"sample\": true"), "sample", "must be a whole number; found true");
        fails(plan("\"title\": [\"a\"]"), "title", "must be text in double quotes; found a list");
        fails(plan("", "{\"name\": \"r\", \"kind\": \"sample\", \"alternatives\": [{\"label\": \"t\", "
                + "\"trim\": \"income\"}]}"), "decisions[2].alternatives[0].trim", "must be an object");
        fails(plan("", "{\"name\": 3, \"kind\": \"errors\", \"alternatives\": [\"HC1\"]}"), "decisions[2].name",
                "found the number 3");
    }

    @Test
    void absurdNumbersAreRefused() {
        fails(plan("\"confidence\": 95"), "confidence", "strictly between 0 and 1");
        fails(plan("\"confidence\": 1"), "confidence", "strictly between 0 and 1");
        fails(plan("\"confidence\": 1e999"), "confidence", "strictly between 0 and 1");
        fails(plan("\"maxSpecifications\": 0"), "maxSpecifications", "at least 1");
        fails(plan("\"sample\": -5"), "sample", "at least 1");
        fails(plan("\"sample\": 123456789012345678901234567890"), "sample", "found 123456789012345678901234567890");
        fails(plan("\"nullDraws\": -1"), "nullDraws", "at least 0");
        fails(plan("\"nullDraws\": 1000000000000"), "nullDraws", "at most 2147483647; found 1000000000000");
        fails(plan("", "{\"name\": \"r\", \"kind\": \"sample\", \"alternatives\": [{\"label\": \"t\", "
                + "\"trim\": {\"column\": \"x\", \"z\": -2}}]}"), "decisions[2].alternatives[0].trim.z", "positive");
        fails(plan("", "{\"name\": \"r\", \"kind\": \"sample\", \"alternatives\": [{\"label\": \"t\", "
                + "\"trim\": {\"column\": \"x\", \"z\": 0}}]}"), "decisions[2].alternatives[0].trim.z", "positive");
        fails(plan("", "{\"name\": \"r\", \"kind\": \"sample\", \"alternatives\": [{\"label\": \"t\", "
                + "\"trim\": {\"column\": \"x\"}}]}"), "decisions[2].alternatives[0].trim.z", "found nothing");
        StringBuilder many = new StringBuilder();
        for (int i = 0; i < 41; i++) {
            many.append(i == 0 ? "" : ", ").append("\"c").append(i).append('"');
        }
        fails(plan("", "{\"name\": \"c\", \"kind\": \"controls\", \"optional\": [" + many + "]}"),
                "decisions[2].optional", "has 41 controls");
    }

    @Test
    void namesAndLabelsAreUniqueAndPresent() {
        fails(plan("", "{\"name\": \"key\", \"kind\": \"errors\", \"alternatives\": [\"HC1\"]}"), "decisions[2].name",
                "the decision name \"key\" is used twice");
        fails(plan("", "{\"name\": \"estimate\", \"kind\": \"errors\", \"alternatives\": [\"HC1\"]}"),
                "decisions[2].name", "is an output column of specifications.csv");
        fails(plan("", "{\"kind\": \"errors\", \"alternatives\": [\"HC1\"]}"), "decisions[2].name", "needs a name");
        fails(plan("", "{\"name\": \"se\", \"alternatives\": [\"HC1\"]}"), "decisions[2].kind", "is required");
        fails("{\"data\": \"d.csv\", \"decisions\": [{\"name\": \"y\", \"kind\": \"outcome\", \"alternatives\": "
                + "[{\"label\": \"a\", \"column\": \"y\"}, {\"label\": \"a\", \"column\": \"z\"}]}, " + PREDICTOR + "]}",
                "decisions[0].alternatives[1].label", "the label \"a\" is used twice");
        fails("{\"data\": \"d.csv\", \"decisions\": [{\"name\": \"y\", \"kind\": \"outcome\", \"alternatives\": "
                + "[{\"column\": \"y\"}]}, " + PREDICTOR + "]}", "decisions[0].alternatives[0].label", "needs a label");
        fails("{\"data\": \"d.csv\", \"decisions\": [{\"name\": \"y\", \"kind\": \"outcome\", \"alternatives\": "
                + "[{\"label\": \"y\"}]}, " + PREDICTOR + "]}", "decisions[0].alternatives[0].column", "is required");
        fails(plan("", "{\"name\": \"se\", \"kind\": \"errors\", \"alternatives\": [\"HC1\", \"hc1\"]}"),
                "decisions[2].alternatives[1]", "\"HC1\" is listed twice");
        fails(plan("", "{\"name\": \"c\", \"kind\": \"controls\", \"optional\": [\"a\", \"a\"]}"),
                "decisions[2].optional[1]", "\"a\" is listed twice");
    }

    @Test
    void messagesCutTheUsersLongTextsInsteadOfRepeatingThem() {
        String longKind = "k".repeat(2000);
        PlanException kind = failure(plan("", "{\"name\": \"x\", \"kind\": \"" + longKind + "\", \"alternatives\": []}"));
        assertTrue(kind.getMessage().length() < 400, kind.getMessage());
        assertTrue(kind.problem().startsWith("unknown kind \"" + "k".repeat(60) + "... (2,000 characters)\""),
                kind.problem());
        String longKey = "q".repeat(5000);
        PlanException key = failure("{\"data\": \"d.csv\", \"" + longKey + "\": 1, \"decisions\": [" + OUTCOME + ", "
                + PREDICTOR + "]}");
        assertEquals("q".repeat(60) + "... (5,000 characters)", key.where());
        PlanException transform = failure("{\"data\": \"d.csv\", \"decisions\": [" + OUTCOME + ", {\"name\": \"key\", "
                + "\"kind\": \"predictor\", \"alternatives\": [{\"label\": \"m\", \"column\": \"mailers\", "
                + "\"transform\": \"" + "t".repeat(3000) + "\"}]}]}");
        assertTrue(transform.getMessage().length() < 400, transform.getMessage());
    }

    @Test
    void decisionKindsAndTheirCountsAreChecked() {
        fails(plan("", "{\"name\": \"x\", \"kind\": \"outcomes\", \"alternatives\": []}"), "decisions[2].kind",
                "unknown kind \"outcomes\"; did you mean \"outcome\"?");
        fails("{\"data\": \"d.csv\", \"decisions\": [" + OUTCOME + "]}", "decisions",
                "needs a decision of kind \"predictor\"");
        fails("{\"data\": \"d.csv\", \"decisions\": [" + PREDICTOR + "]}", "decisions",
                "needs a decision of kind \"outcome\"");
        fails(plan("", "{\"name\": \"y2\", \"kind\": \"outcome\", \"alternatives\": [{\"label\": \"b\", "
                + "\"column\": \"b\"}]}"), "decisions", "has 2 decisions of kind \"outcome\"");
        fails(plan("", "{\"name\": \"e1\", \"kind\": \"errors\", \"alternatives\": [\"HC1\"]}",
                "{\"name\": \"e2\", \"kind\": \"errors\", \"alternatives\": [\"HC2\"]}"), "decisions", "at most 1");
        fails("{\"data\": \"d.csv\", \"decisions\": []}", "decisions", "is empty");
        fails("{\"data\": \"d.csv\"}", "decisions", "is required");
        fails(plan("", "{\"name\": \"se\", \"kind\": \"errors\", \"alternatives\": []}"), "decisions[2].alternatives",
                "is empty");
        fails(plan("", "{\"name\": \"se\", \"kind\": \"errors\"}"), "decisions[2].alternatives", "is required");
    }

    @Test
    void controlsCombineRulesAreChecked() {
        fails(plan("", "{\"name\": \"c\", \"kind\": \"controls\", \"combine\": \"pairs\"}"), "decisions[2].combine",
                "\"all-subsets\" or \"sets\"");
        fails(plan("", "{\"name\": \"c\", \"kind\": \"controls\", \"combine\": \"sets\"}"), "decisions[2].sets",
                "is required with \"combine\": \"sets\"");
        fails(plan("", "{\"name\": \"c\", \"kind\": \"controls\", \"combine\": \"sets\", \"optional\": [\"a\"], "
                + "\"sets\": {\"s\": []}}"), "decisions[2].optional", "only with \"combine\": \"all-subsets\"");
        fails(plan("", "{\"name\": \"c\", \"kind\": \"controls\", \"sets\": {\"s\": []}}"), "decisions[2].sets",
                "only with \"combine\": \"sets\"");
        fails(plan("", "{\"name\": \"c\", \"kind\": \"controls\", \"combine\": \"sets\", \"sets\": {\"s\": 4}}"),
                "decisions[2].sets.s", "must be a list");
    }

    @Test
    void severalClusterColumnsAreJoinedWithPlus() {
        Plan p = new PlanReader(false).read(plan("", "{\"name\": \"se\", \"kind\": \"errors\", \"alternatives\": "
                + "[\"cluster:school\", \"cluster: school + term \", \"cluster:term+school+ward\"]}"), Path.of("."));
        List<ErrorType> types = ((Decision.Errors) p.decisions().get(2)).alternatives();
        assertEquals(List.of("cluster:school", "cluster:school+term", "cluster:term+school+ward"),
                types.stream().map(ErrorType::label).toList());
        assertEquals(List.of("school", "term"), types.get(1).clusterColumns());
        assertEquals("school", types.get(0).clusterColumn());
        assertEquals(null, types.get(1).clusterColumn());
        assertEquals(List.of(false, true, true), types.stream().map(ErrorType::multiway).toList());
        assertEquals("decisions[2].alternatives[1], cluster:school+term", p.multiwayClusterPath());
    }

    @Test
    void sampleErrorsAndAbsorbRulesAreChecked() {
        fails(plan("", "{\"name\": \"r\", \"kind\": \"sample\", \"alternatives\": [{\"label\": \"a\", \"keep\": \"x > 1\", "
                + "\"trim\": {\"column\": \"x\", \"z\": 3}}]}"), "decisions[2].alternatives[0]", "not both");
        fails(plan("", "{\"name\": \"r\", \"kind\": \"sample\", \"alternatives\": [{\"label\": \"a\", \"keep\": \" \"}]}"),
                "decisions[2].alternatives[0].keep", "needs an expression");
        fails(plan("", "{\"name\": \"r\", \"kind\": \"sample\", \"alternatives\": [{\"label\": \"a\", "
                + "\"keep\": \"x >\"}]}"), "decisions[2].alternatives[0].keep", "end of expression");
        fails(plan("", "{\"name\": \"se\", \"kind\": \"errors\", \"alternatives\": [\"HC4\"]}"),
                "decisions[2].alternatives[0]", "unknown standard error type \"HC4\"");
        fails(plan("", "{\"name\": \"se\", \"kind\": \"errors\", \"alternatives\": [\"cluster:\"]}"),
                "decisions[2].alternatives[0]", "as in cluster:school");
        fails(plan("", "{\"name\": \"se\", \"kind\": \"errors\", \"alternatives\": [\"cluster:school+\"]}"),
                "decisions[2].alternatives[0]", "an empty cluster column in \"cluster:school+\"");
        fails(plan("", "{\"name\": \"se\", \"kind\": \"errors\", \"alternatives\": [\"cluster:school + term+school\"]}"),
                "decisions[2].alternatives[0]", "\"school\" is named twice");
        fails(plan("", "{\"name\": \"se\", \"kind\": \"errors\", \"alternatives\": [\"cluster:a+b+c+d+e\"]}"),
                "decisions[2].alternatives[0]", "clusters on 5 columns; at most 4");
        fails(plan("", "{\"name\": \"se\", \"kind\": \"errors\", \"alternatives\": [\"cluster:a+b\", "
                + "\"cluster: a + b\"]}"), "decisions[2].alternatives[1]", "\"cluster:a+b\" is listed twice");
        fails(plan("", "{\"name\": \"fe\", \"kind\": \"absorb\", \"alternatives\": [{\"label\": \"three\", "
                + "\"columns\": [\"a\", \"b\", \"a\"]}]}"), "decisions[2].alternatives[0].columns[2]",
                "\"a\" is listed twice");
        fails(plan("", "{\"name\": \"w\", \"kind\": \"weights\", \"alternatives\": [{\"label\": \"w\", "
                + "\"column\": \"\"}]}"), "decisions[2].alternatives[0].column", "leave the key out for the unweighted");
        fails(plan("", "{\"name\": \"w\", \"kind\": \"weights\", \"alternatives\": [{\"label\": \"w\", "
                + "\"columns\": [\"w\"]}]}"), "decisions[2].alternatives[0].columns", "did you mean \"column\"?");
        fails(plan("", "{\"name\": \"w1\", \"kind\": \"weights\", \"alternatives\": [{\"label\": \"a\"}]}",
                "{\"name\": \"w2\", \"kind\": \"weights\", \"alternatives\": [{\"label\": \"b\"}]}"), "decisions",
                "has 2 decisions of kind \"weights\"; at most 1");
        Plan weighted = new PlanReader(false).read(plan("", "{\"name\": \"w\", \"kind\": \"weights\", "
                + "\"alternatives\": [{\"label\": \"none\"}, {\"label\": \"survey\", \"column\": \"wt\"}]}"),
                Path.of("."));
        Decision.Weights w = (Decision.Weights) weighted.decisions().get(2);
        assertEquals(List.of(new WeightChoice("none", null), new WeightChoice("survey", "wt")), w.alternatives());
        assertEquals("survey", w.label(1));
        fails(plan("\"missing\": \"listwise\""), "missing", "\"per-specification\" or \"common\"");
        fails(plan("\"nullMethod\": \"jackknife\""), "nullMethod", "\"bootstrap\" or \"permute\"");
    }

    @Test
    void theDataPathIsRequiredAndConfinedOnASharedServer(@TempDir Path dir) throws IOException {
        fails("{\"decisions\": []}", "data", "is required");
        fails("{\"data\": \"  \", \"decisions\": []}", "data", "is required");
        Path plans = Files.createDirectories(dir.resolve("analysis"));
        Files.writeString(plans.resolve("d.csv"), "x\n1\n");
        Files.writeString(dir.resolve("secret.csv"), "x\n1\n");
        PlanReader confined = new PlanReader(true);
        String tail = "\", \"decisions\": [" + OUTCOME + ", " + PREDICTOR + "]}";
        assertEquals(plans.resolve("d.csv"), confined.read("{\"data\": \"d.csv" + tail, plans).dataFile());
        assertEquals(plans.resolve("d.csv"), confined.read("{\"data\": \"./sub/../d.csv" + tail, plans).dataFile());
        for (String escape : List.of("../secret.csv", "sub/../../secret.csv", dir.resolve("secret.csv").toString())) {
            PlanException e = assertThrows(PlanException.class, () -> confined.read("{\"data\": \""
                    + escape.replace("\\", "\\\\") + tail, plans));
            assertEquals("data", e.where());
            assertTrue(e.problem().contains("leaves the analysis folder"), e.getMessage());
        }
        // the command line reads local files wherever they are
        assertEquals(dir.resolve("secret.csv"), new PlanReader(false).read("{\"data\": \"../secret.csv" + tail, plans)
                .dataFile());
    }

    @Test
    void aSymbolicLinkOutOfTheFolderIsConfinedToo(@TempDir Path dir) throws IOException {
        Path plans = Files.createDirectories(dir.resolve("analysis"));
        Path secret = Files.writeString(dir.resolve("secret.csv"), "x\n1\n");
        try {
            Files.createSymbolicLink(plans.resolve("link.csv"), secret);
        } catch (UnsupportedOperationException | IOException e) {
            return;
        }
        PlanException e = assertThrows(PlanException.class, () -> new PlanReader(true).read("{\"data\": \"link.csv\", "
                + "\"decisions\": [" + OUTCOME + ", " + PREDICTOR + "]}", plans));
        assertEquals("data", e.where());
    }

    @Test
    void aPlanFileIsReadAsUtf8WithOrWithoutAByteOrderMark(@TempDir Path dir) throws IOException {
        Path file = dir.resolve("plan.json");
        byte[] body = plan("\"title\": \"Wahlbeteiligung é\"").getBytes(StandardCharsets.UTF_8);
        byte[] withMark = new byte[body.length + 3];
        withMark[0] = (byte) 0xEF;
        withMark[1] = (byte) 0xBB;
        withMark[2] = (byte) 0xBF;
        System.arraycopy(body, 0, withMark, 3, body.length);
        Files.write(file, withMark);
        assertEquals(dir.resolve("wards.csv"), new PlanReader(false).read(file).dataFile());
        Files.write(file, plan("\"title\": \"caf\u00e9\"").getBytes(StandardCharsets.ISO_8859_1));
        PlanException latin = assertThrows(PlanException.class, () -> new PlanReader(false).read(file));
        assertTrue(latin.getMessage().contains("is not UTF-8 text"), latin.getMessage());
        PlanException none = assertThrows(PlanException.class, () -> new PlanReader(false).read(dir.resolve("no.json")));
        assertTrue(none.getMessage().startsWith("no plan file at "), none.getMessage());
    }
}
