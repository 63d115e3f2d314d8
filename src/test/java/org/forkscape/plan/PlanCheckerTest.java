package org.forkscape.plan;

import static org.junit.jupiter.api.Assertions.assertDoesNotThrow;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.ByteArrayInputStream;
import java.nio.charset.StandardCharsets;
import java.nio.file.Path;
import java.util.List;
import org.forkscape.data.CsvTableReader;
import org.forkscape.data.NumericColumn;
import org.forkscape.data.Table;
import org.junit.jupiter.api.Test;

/** The plan against its data: each column exists, with the nearest name suggested, and suits its role. */
class PlanCheckerTest {
    private static final Table SCHOOLS = new CsvTableReader().read(new ByteArrayInputStream((
            "attendance,tutoring,class_size,district,sector,grade_band,passed,fees\n"
                    + "0.91,2,24,east,public,primary,yes,10\n"
                    + "0.87,0,28,west,private,middle,no,12\n"
                    + "0.95,3,22,east,public,upper,yes,n/a\n"
                    + "0.80,1,30,north,private,primary,no,14\n"
                    + "0.89,2,26,west,public,middle,yes,9\n").getBytes(StandardCharsets.UTF_8)), "schools.csv");

    static Plan plan(String outcome, String predictor, String... decisions) {
        StringBuilder b = new StringBuilder("{\"data\": \"schools.csv\", \"decisions\": [")
                .append("{\"name\": \"y\", \"kind\": \"outcome\", \"alternatives\": [").append(outcome).append("]}, ")
                .append("{\"name\": \"x\", \"kind\": \"predictor\", \"alternatives\": [").append(predictor).append("]}");
        for (String d : decisions) {
            b.append(", ").append(d);
        }
        return new PlanReader(false).read(b.append("]}").toString(), Path.of("."));
    }

    static String column(String name) {
        return "{\"label\": \"" + name + "\", \"column\": \"" + name + "\"}";
    }

    static void fails(Plan plan, String path, String fragment) {
        PlanException e = assertThrows(PlanException.class, () -> PlanChecker.check(plan, SCHOOLS));
        assertEquals(path, e.where(), e.getMessage());
        assertTrue(e.problem().contains(fragment), "expected \"" + fragment + "\" in: " + e.getMessage());
    }

    @Test
    void aPlanThatFitsItsDataPasses() {
        assertDoesNotThrow(() -> PlanChecker.check(plan(column("attendance"), column("tutoring"),
                "{\"name\": \"c\", \"kind\": \"controls\", \"required\": [\"class_size\"], \"optional\": [\"sector\"]}",
                "{\"name\": \"r\", \"kind\": \"sample\", \"alternatives\": [{\"label\": \"all\"}, {\"label\": \"east\", "
                        + "\"keep\": \"district == \\\"east\\\"\"}, {\"label\": \"t\", \"trim\": {\"column\": \"class_size\", "
                        + "\"z\": 2}}]}",
                "{\"name\": \"se\", \"kind\": \"errors\", \"alternatives\": [\"HC1\", \"cluster:district\"]}",
                "{\"name\": \"fe\", \"kind\": \"absorb\", \"alternatives\": [{\"label\": \"d\", \"columns\": [\"district\"]}]}"),
                SCHOOLS));
    }

    /**
     * Two absorbed columns: every error type passes, HC2 and HC3 too (their leverages are exact), and the GLMs
     * too, but for their null draws.
     */
    @Test
    void whatTwoAbsorbedColumnsCannotBeFittedWithIsRefusedAtItsField() {
        String both = "{\"name\": \"fe\", \"kind\": \"absorb\", \"alternatives\": [{\"label\": \"none\", "
                + "\"columns\": []}, {\"label\": \"district and band\", \"columns\": [\"district\", \"grade_band\"]}]}";
        assertDoesNotThrow(() -> PlanChecker.check(plan(column("attendance"), column("tutoring"),
                "{\"name\": \"se\", \"kind\": \"errors\", \"alternatives\": [\"classical\", \"HC0\", \"HC1\", "
                        + "\"HC2\", \"HC3\", \"cluster:district\", \"cluster:district+sector\"]}", both), SCHOOLS));
        assertDoesNotThrow(() -> PlanChecker.check(plan(column("passed"), column("tutoring"),
                "{\"name\": \"m\", \"kind\": \"model\", \"alternatives\": [\"ols\", \"logit\"]}", both), SCHOOLS));
        glmBesideSeveralColumns(both, "decisions[3].alternatives[1].columns");
    }

    /**
     * Logit, probit and Poisson beside two or more absorbed columns: every error type, HC2 and HC3 too, but no null
     * draws, refused at the absorbed columns.
     */
    private void glmBesideSeveralColumns(String absorb, String columnsPath) {
        String model = "{\"name\": \"m\", \"kind\": \"model\", \"alternatives\": [\"ols\", \"poisson\"]}";
        assertDoesNotThrow(() -> PlanChecker.check(plan(column("attendance"), column("tutoring"), model,
                "{\"name\": \"se\", \"kind\": \"errors\", \"alternatives\": [\"classical\", \"HC0\", \"HC1\", "
                        + "\"HC2\", \"HC3\", \"cluster:district\", \"cluster:district+sector\"]}", absorb), SCHOOLS));
        Plan withDraws = plan(column("attendance"), column("tutoring"), model, absorb);
        fails(withDraws.withNull(10, withDraws.nullMethod(), withDraws.nullCluster(), withDraws.seed()), columnsPath,
                "null draws are not made for logit, probit and poisson");
    }

    /**
     * HC2 and HC3 beside two absorbed columns whose smaller one has more levels than the leverages' dense
     * factorisation allows: refused at each such error type, naming both columns' level counts (over the rows
     * where both have a value) and the way out; at the limit itself the plan passes.
     */
    @Test
    void leveragesBesideTwoColumnsWithTooManyLevelsAreRefusedAtTheErrorType() {
        int limit = AbsorbChoice.MAX_LEVERAGE_LEVELS;
        Table wide = unitsAndPeriods(limit + 1);
        String both = "{\"name\": \"fe\", \"kind\": \"absorb\", \"alternatives\": [{\"label\": \"unit and period\", "
                + "\"columns\": [\"unit\", \"period\"]}]}";
        String errors = "{\"name\": \"se\", \"kind\": \"errors\", \"alternatives\": [\"HC1\", \"HC2\", \"HC3\"]}";
        Plan plan = plan(column("y"), column("x"), errors, both);
        PlanException e = assertThrows(PlanException.class, () -> PlanChecker.check(plan, wide));
        assertEquals(List.of("decisions[2].alternatives[1]", "decisions[2].alternatives[2]"),
                e.all().stream().map(PlanException::where).toList());
        assertEquals("\"HC2\" beside two absorbed columns needs each row's leverage, computed exactly from a "
                + "factorisation over the levels of the column with fewer of them; here \"unit\" has 2,002 and "
                + "\"period\" 2,001 levels (decisions[3].alternatives[0], unit and period), more than the 2,000 that "
                + "keep it cheap; use HC0, HC1 or cluster errors, or absorb one column and enter the other as a "
                + "categorical control", e.problem());
        assertDoesNotThrow(() -> PlanChecker.check(plan, unitsAndPeriods(limit)));
    }

    /**
     * Three absorbed columns: every error type passes, HC2 and HC3 too (their leverages are exact), and the
     * GLMs.
     */
    @Test
    void whatThreeAbsorbedColumnsCannotBeFittedWithIsRefusedAtItsField() {
        String three = "{\"name\": \"fe\", \"kind\": \"absorb\", \"alternatives\": [{\"label\": \"all three\", "
                + "\"columns\": [\"district\", \"grade_band\", \"sector\"]}]}";
        assertDoesNotThrow(() -> PlanChecker.check(plan(column("attendance"), column("tutoring"),
                "{\"name\": \"se\", \"kind\": \"errors\", \"alternatives\": [\"classical\", \"HC0\", \"HC1\", "
                        + "\"HC2\", \"HC3\", \"cluster:district\", \"cluster:district+sector\"]}", three), SCHOOLS));
        assertDoesNotThrow(() -> PlanChecker.check(plan(column("passed"), column("tutoring"),
                "{\"name\": \"m\", \"kind\": \"model\", \"alternatives\": [\"ols\", \"logit\"]}", three), SCHOOLS));
    }

    /**
     * Three absorbed columns whose levels outside the one with most of them exceed the exact rank's limit (over
     * the rows where all three have a value): refused at the list of columns, with every count and the way out;
     * at the limit itself the plan passes.
     */
    @Test
    void threeColumnsWithTooManyLevelsOutsideTheLargestAreRefusedAtTheColumns() {
        int limit = AbsorbChoice.MAX_RANK_LEVELS;
        String three = "{\"name\": \"fe\", \"kind\": \"absorb\", \"alternatives\": [{\"label\": \"three-way\", "
                + "\"columns\": [\"unit\", \"period\", \"region\"]}]}";
        Plan plan = plan(column("y"), column("x"), three);
        // periods + 1 units, periods periods and 2 regions: periods + 2 levels outside the units
        PlanException e = assertThrows(PlanException.class, () -> PlanChecker.check(plan,
                unitsPeriodsAndRegions(limit - 1)));
        assertEquals("decisions[2].alternatives[0].columns", e.where());
        assertEquals("three-way: the exact rank of 3 absorbed columns' dummies eliminates a dense matrix over the "
                + "levels outside the column with most of them; here \"unit\" has 2,000, \"period\" has 1,999 and "
                + "\"region\" has 2 levels, so 2,001 lie outside it, more than the 2,000 that keep it cheap; absorb "
                + "the two columns with most levels and enter the others as categorical controls", e.problem());
        assertDoesNotThrow(() -> PlanChecker.check(plan, unitsPeriodsAndRegions(limit - 2)));
    }

    private static Table unitsPeriodsAndRegions(int periods) {
        StringBuilder csv = new StringBuilder("y,x,unit,period,region\n");
        for (int t = 0; t < periods; t++) {
            csv.append(t % 7).append(',').append(t % 5).append(",u").append(t).append(",p").append(t).append(",r")
                    .append(t % 2).append('\n');
        }
        csv.append("1,2,extra,p0,r0\n");
        csv.append("1,2,unseen,,r1\n");
        return new CsvTableReader().read(new ByteArrayInputStream(csv.toString().getBytes(StandardCharsets.UTF_8)),
                "panel.csv");
    }

    /**
     * {@code periods} periods, each with its own unit and one unit seen in the first: periods + 1 units where
     * both columns have a value, and a row whose period is missing with one more unit, which is not counted.
     */
    private static Table unitsAndPeriods(int periods) {
        StringBuilder csv = new StringBuilder("y,x,unit,period\n");
        for (int t = 0; t < periods; t++) {
            csv.append(t % 7).append(',').append(t % 5).append(",u").append(t).append(",p").append(t).append('\n');
        }
        csv.append("1,2,extra,p0\n");
        csv.append("1,2,unseen,\n");
        return new CsvTableReader().read(new ByteArrayInputStream(csv.toString().getBytes(StandardCharsets.UTF_8)),
                "panel.csv");
    }

    @Test
    void oneCheckFindsEveryColumnProblemInPlanOrder() {
        Plan plan = plan(column("atendance") + ", " + column("district"), column("tutoring"),
                "{\"name\": \"c\", \"kind\": \"controls\", \"required\": [\"clas_size\"], \"optional\": [\"tutoring\"]}",
                "{\"name\": \"se\", \"kind\": \"errors\", \"alternatives\": [\"HC1\", \"cluster:distrct\"]}");
        PlanException e = assertThrows(PlanException.class, () -> PlanChecker.check(plan, SCHOOLS));
        assertEquals(List.of("decisions[0].alternatives[0].column", "decisions[0].alternatives[1].column",
                "decisions[2].required[0]", "decisions[2].optional[0]", "decisions[3].alternatives[1]"),
                e.all().stream().map(PlanException::where).toList());
        assertEquals("decisions[0].alternatives[0].column", e.where());
    }

    @Test
    void anUnknownColumnIsNamedWithTheNearestOneWhereverItIsUsed() {
        fails(plan(column("atendance"), column("tutoring")), "decisions[0].alternatives[0].column",
                "\"atendance\" is not a column of schools.csv; did you mean \"attendance\"?");
        fails(plan(column("attendance"), column("Tutoring")), "decisions[1].alternatives[0].column",
                "did you mean \"tutoring\"?");
        fails(plan(column("attendance"), column("tutoring"),
                "{\"name\": \"c\", \"kind\": \"controls\", \"optional\": [\"sector\", \"clas_size\"]}"),
                "decisions[2].optional[1]", "did you mean \"class_size\"?");
        fails(plan(column("attendance"), column("tutoring"),
                "{\"name\": \"se\", \"kind\": \"errors\", \"alternatives\": [\"HC1\", \"cluster:distrct\"]}"),
                "decisions[2].alternatives[1]", "did you mean \"district\"?");
        fails(plan(column("attendance"), column("tutoring"),
                "{\"name\": \"fe\", \"kind\": \"absorb\", \"alternatives\": [{\"label\": \"d\", \"columns\": [\"sectr\"]}]}"),
                "decisions[2].alternatives[0].columns[0]", "did you mean \"sector\"?");
        fails(plan(column("attendance"), column("tutoring"),
                "{\"name\": \"r\", \"kind\": \"sample\", \"alternatives\": [{\"label\": \"t\", \"trim\": {\"column\": "
                        + "\"classsize\", \"z\": 2}}]}"),
                "decisions[2].alternatives[0].trim.column", "did you mean \"class_size\"?");
        fails(plan(column("attendance"), column("tutoring"),
                "{\"name\": \"r\", \"kind\": \"sample\", \"alternatives\": [{\"label\": \"k\", \"keep\": "
                        + "\"grade_bnd == \\\"upper\\\"\"}]}"),
                "decisions[2].alternatives[0].keep", "did you mean \"grade_band\"?");
    }

    @Test
    void everyColumnOfAMultiWayClusterIsCheckedAndGeneralizedModelsAreAccepted() {
        fails(plan(column("attendance"), column("tutoring"),
                "{\"name\": \"se\", \"kind\": \"errors\", \"alternatives\": [\"HC1\", \"cluster:district+sectr\"]}"),
                "decisions[2].alternatives[1]", "\"sectr\" is not a column of schools.csv; did you mean \"sector\"?");
        assertDoesNotThrow(() -> PlanChecker.check(plan(column("attendance"), column("tutoring"),
                "{\"name\": \"se\", \"kind\": \"errors\", \"alternatives\": [\"cluster:district+sector\"]}"), SCHOOLS));
        assertDoesNotThrow(() -> PlanChecker.check(plan(column("attendance"), column("tutoring"),
                "{\"name\": \"se\", \"kind\": \"errors\", \"alternatives\": [\"cluster:district\", "
                        + "\"cluster:district+sector\"]}",
                "{\"name\": \"m\", \"kind\": \"model\", \"alternatives\": [\"ols\", \"poisson\"]}"), SCHOOLS));
    }

    @Test
    void nothingIsSuggestedWhenNoNameIsClose() {
        PlanException e = assertThrows(PlanException.class,
                () -> PlanChecker.check(plan(column("rainfall_total"), column("tutoring")), SCHOOLS));
        assertEquals("\"rainfall_total\" is not a column of schools.csv", e.problem());
    }

    @Test
    void aCategoricalPredictorOrOutcomeNeedsExactlyTwoLevels() {
        fails(plan(column("attendance"), column("grade_band")), "decisions[1].alternatives[0].column",
                "\"grade_band\" is categorical with 3 levels; a categorical key predictor needs exactly two levels");
        fails(plan(column("district"), column("tutoring")), "decisions[0].alternatives[0].column",
                "a categorical outcome needs exactly two levels");
        assertDoesNotThrow(() -> PlanChecker.check(plan(column("passed"), column("sector")), SCHOOLS));
    }

    @Test
    void aColumnOfNumbersReadAsTextSaysWhichCellsMadeItText() {
        fails(plan(column("attendance"), column("fees")), "decisions[1].alternatives[0].column",
                "it reads as text because of the value \"n/a\" (a missing cell is written as an empty cell, NA, NaN or .)");
    }

    @Test
    void transformsApplyToNumericColumnsOnly() {
        fails(plan(column("attendance"), "{\"label\": \"s\", \"column\": \"sector\", \"transform\": \"log\"}"),
                "decisions[1].alternatives[0].transform", "transforms apply to numeric columns only");
    }

    @Test
    void aColumnHasOneRole() {
        fails(plan(column("attendance"), column("tutoring"),
                "{\"name\": \"c\", \"kind\": \"controls\", \"required\": [\"tutoring\"]}"),
                "decisions[2].required[0]", "also an alternative of the key predictor");
        fails(plan(column("attendance"), column("tutoring"),
                "{\"name\": \"c\", \"kind\": \"controls\", \"combine\": \"sets\", \"sets\": {\"s\": [\"attendance\"]}}"),
                "decisions[2].sets.s[0]", "also an alternative of the outcome");
        fails(plan(column("attendance"), column("attendance")), "decisions[1].alternatives[0].column",
                "cannot be both the outcome and the key predictor");
    }

    @Test
    void aTrimNeedsANumericColumn() {
        fails(plan(column("attendance"), column("tutoring"),
                "{\"name\": \"r\", \"kind\": \"sample\", \"alternatives\": [{\"label\": \"t\", \"trim\": {\"column\": "
                        + "\"sector\", \"z\": 2}}]}"),
                "decisions[2].alternatives[0].trim.column", "a z-score trim needs a numeric column");
    }

    @Test
    void theNullClusterColumnMustExist() {
        Plan p = new PlanReader(false).read("{\"data\": \"s.csv\", \"nullCluster\": \"distric\", \"decisions\": ["
                + "{\"name\": \"y\", \"kind\": \"outcome\", \"alternatives\": [" + column("attendance") + "]}, "
                + "{\"name\": \"x\", \"kind\": \"predictor\", \"alternatives\": [" + column("tutoring") + "]}]}", Path.of("."));
        fails(p, "nullCluster", "did you mean \"district\"?");
        Plan rows = new PlanReader(false).read("{\"data\": \"s.csv\", \"nullCluster\": \"rows\", \"decisions\": ["
                + "{\"name\": \"y\", \"kind\": \"outcome\", \"alternatives\": [" + column("attendance") + "]}, "
                + "{\"name\": \"x\", \"kind\": \"predictor\", \"alternatives\": [" + column("tutoring") + "]}]}", Path.of("."));
        assertDoesNotThrow(() -> PlanChecker.check(rows, SCHOOLS), "\"rows\" is the word for single rows, not a column");
    }

    /**
     * Weights: the column exists and is numeric; a negative or infinite weight is refused at the
     * alternative's column, naming the rows; zero and missing weights pass (a row of zero weight takes no
     * part, a missing one drops the row).
     */
    @Test
    void weightsAreNumericFiniteAndNotNegative() {
        String weights = "{\"name\": \"w\", \"kind\": \"weights\", \"alternatives\": [{\"label\": \"none\"}, "
                + "{\"label\": \"w\", \"column\": \"%s\"}]}";
        fails(plan(column("attendance"), column("tutoring"), String.format(weights, "sector")),
                "decisions[2].alternatives[1].column", "weights must be a numeric column");
        fails(plan(column("attendance"), column("tutoring"), String.format(weights, "fess")),
                "decisions[2].alternatives[1].column", "did you mean \"fees\"?");
        Table bad = new Table("survey.csv", List.of(new NumericColumn("y", new double[] {1, 2, 3, 4, 5, 6}),
                new NumericColumn("x", new double[] {0, 1, 0, 1, 1, 0}),
                new NumericColumn("w", new double[] {1, -0.5, 0, Double.POSITIVE_INFINITY, Double.NaN, -2}),
                new NumericColumn("ok", new double[] {1, 0.5, 0, 3, Double.NaN, 2})));
        Plan p = new PlanReader(false).read("{\"data\": \"survey.csv\", \"decisions\": ["
                + "{\"name\": \"y\", \"kind\": \"outcome\", \"alternatives\": [" + column("y") + "]}, "
                + "{\"name\": \"x\", \"kind\": \"predictor\", \"alternatives\": [" + column("x") + "]}, "
                + String.format(weights, "w") + "]}", Path.of("."));
        PlanException e = assertThrows(PlanException.class, () -> PlanChecker.check(p, bad));
        Plan ok = new PlanReader(false).read("{\"data\": \"survey.csv\", \"decisions\": ["
                + "{\"name\": \"y\", \"kind\": \"outcome\", \"alternatives\": [" + column("y") + "]}, "
                + "{\"name\": \"x\", \"kind\": \"predictor\", \"alternatives\": [" + column("x") + "]}, "
                + String.format(weights, "ok") + "]}", Path.of("."));
        assertDoesNotThrow(() -> PlanChecker.check(ok, bad), "zero and missing weights pass");
        assertEquals("decisions[2].alternatives[1].column", e.where());
        assertTrue(e.problem().contains("3 rows are not (data rows 2, 4, 6, counting from 1 below the header)"),
                e.problem());
    }
}
