package org.forkscape.plan;

import static org.forkscape.plan.PlanCheckerTest.column;
import static org.junit.jupiter.api.Assertions.assertDoesNotThrow;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.ByteArrayInputStream;
import java.nio.charset.StandardCharsets;
import java.nio.file.Path;
import org.forkscape.data.CsvTableReader;
import org.forkscape.data.Table;
import org.junit.jupiter.api.Test;

/**
 * The plans the check refuses because every specification would fail (CR1 needs two clusters, common
 * practice; a key predictor without variation is collinear with the intercept), and those it lets run
 * because some specification can be fitted.
 */
class BoundToFailTest {
    private static final Table WARDS = new CsvTableReader().read(new ByteArrayInputStream((
            "turnout,canvass,flat,late,borough,district\n"
                    + "0.61,2,5,0.3,north,east\n"
                    + "0.58,2,5,0.4,north,west\n"
                    + "0.66,3,5,,north,east\n"
                    + "0.52,1,5,,north,west\n"
                    + "0.63,4,5,,north,east\n").getBytes(StandardCharsets.UTF_8)), "wards.csv");

    private static Plan plan(String outcomes, String predictors, String errors) {
        return new PlanReader(false).read("{\"data\": \"wards.csv\", \"decisions\": ["
                + "{\"name\": \"y\", \"kind\": \"outcome\", \"alternatives\": [" + outcomes + "]}, "
                + "{\"name\": \"x\", \"kind\": \"predictor\", \"alternatives\": [" + predictors + "]}, "
                + "{\"name\": \"e\", \"kind\": \"errors\", \"alternatives\": [" + errors + "]}]}", Path.of("."));
    }

    private static PlanException refused(Plan plan) {
        return assertThrows(PlanException.class, () -> PlanChecker.check(plan, WARDS));
    }

    @Test
    void errorsClusteredOnASingleClusterOnlyAreRefusedAtTheErrorsDecision() {
        PlanException e = refused(plan(column("turnout"), column("canvass"), "\"cluster:borough\""));
        assertEquals("decisions[2]", e.where());
        assertEquals("every specification is bound to fail: its errors cluster on \"borough\", which has a single "
                + "value in the data, and cluster-robust errors need at least two clusters; cluster on a column with "
                + "several groups, or add an error type that does not cluster (such as HC1)", e.problem());
        assertTrue(refused(plan(column("turnout"), column("canvass"), "\"cluster:borough\", \"cluster:flat\""))
                .problem().contains("every error type clusters on a column with at most one value in the data "
                        + "(\"borough\", \"flat\")"));
        // a multi-way type has a single cluster when one of its columns has
        assertTrue(refused(plan(column("turnout"), column("canvass"), "\"cluster:district+borough\""))
                .problem().contains("its errors cluster on \"borough\", which has a single value"));
        assertDoesNotThrow(() -> PlanChecker.check(plan(column("turnout"), column("canvass"),
                "\"cluster:district+canvass\""), WARDS));
        // one error type that can be computed is enough for the run to fit something
        assertDoesNotThrow(() -> PlanChecker.check(plan(column("turnout"), column("canvass"),
                "\"cluster:borough\", \"HC1\""), WARDS));
        assertDoesNotThrow(() -> PlanChecker.check(plan(column("turnout"), column("canvass"),
                "\"cluster:borough\", \"cluster:district\""), WARDS));
    }

    @Test
    void aKeyPredictorWithoutVariationInTheOutcomesRowsIsRefusedAtItsColumn() {
        PlanException e = refused(plan(column("turnout"), column("flat"), "\"HC1\""));
        assertEquals("decisions[1].alternatives[0].column", e.where());
        assertTrue(e.problem().startsWith("every specification is bound to fail: the key predictor \"flat\" takes at "
                + "most one value in the rows that have an outcome"), e.problem());
        // canvass varies, but not in the two rows where "late" is recorded
        assertTrue(refused(plan(column("late"), column("canvass"), "\"HC1\"")).problem().contains("\"canvass\""));
        assertDoesNotThrow(() -> PlanChecker.check(plan(column("late") + ", " + column("turnout"), column("canvass"),
                "\"HC1\""), WARDS));
        assertDoesNotThrow(() -> PlanChecker.check(plan(column("turnout"), column("flat") + ", " + column("canvass"),
                "\"HC1\""), WARDS));
    }

    @Test
    void anOutcomeWithoutVariationIsRefusedAtItsColumn() {
        PlanException e = refused(plan(column("flat"), column("canvass"), "\"HC1\""));
        assertEquals("decisions[0].alternatives[0].column", e.where());
        assertTrue(e.problem().startsWith("every specification is bound to fail: the outcome \"flat\" takes at most "
                + "one value in the rows that have a key predictor"), e.problem());
    }
}
