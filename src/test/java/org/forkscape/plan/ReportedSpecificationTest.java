package org.forkscape.plan;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNull;

import java.util.List;
import java.util.Map;
import org.junit.jupiter.api.Test;

/** The plan's {@code reported} key: read to one choice per decision, and each mistake at its JSON path. */
class ReportedSpecificationTest {
    private static final String CONTROLS = "{\"name\": \"covariates\", \"kind\": \"controls\", "
            + "\"optional\": [\"age\", \"income\", \"density\"]}";
    private static final String ROWS = "{\"name\": \"rows\", \"kind\": \"sample\", \"alternatives\": ["
            + "{\"label\": \"all\", \"keep\": \"density > 0\"}, {\"label\": \"urban\", \"keep\": \"density > 2\"}]}";

    private static String plan(String reported) {
        return PlanReaderTest.plan("\"reported\": " + reported, CONTROLS, ROWS);
    }

    @Test
    void aPlanWithoutTheKeyReportsNothing() {
        assertNull(PlanReaderTest.read(PlanReaderTest.plan("", CONTROLS)).reported());
    }

    @Test
    void labelsBecomeOneChoicePerDecisionAndTheSubsetItsBitMask() {
        Plan p = PlanReaderTest.read(plan("{\"outcome\": \"turnout\", \"key\": \"mailers\", "
                + "\"covariates\": \"density + age\", \"rows\": \"urban\"}"));
        // age is optional control 0 and density 2: the mask 0b101
        assertEquals(List.of(0L, 0L, 5L, 1L), p.reported().choices());
        assertEquals(Map.of("outcome", "turnout", "key", "mailers", "covariates", "age + density", "rows", "urban"),
                p.reported().labels(p.decisions()));
        SpecificationSpace space = new SpecificationSpace(p);
        long[] back = new long[4];
        space.decode(space.encode(p.reported().toArray()), back);
        assertEquals(p.reported().choices(), java.util.Arrays.stream(back).boxed().toList());
    }

    @Test
    void noneIsTheEmptySubset() {
        Plan p = PlanReaderTest.read(plan("{\"outcome\": \"turnout\", \"key\": \"mailers\", "
                + "\"covariates\": \"none\", \"rows\": \"all\"}"));
        assertEquals(List.of(0L, 0L, 0L, 0L), p.reported().choices());
    }

    @Test
    void notAnObjectIsAProblemAtTheKey() {
        PlanReaderTest.fails(plan("[\"turnout\"]"), "reported", "must be an object");
    }

    @Test
    void aDecisionLeftOutIsAProblemAtTheKey() {
        PlanReaderTest.fails(plan("{\"outcome\": \"turnout\", \"key\": \"mailers\", \"rows\": \"all\"}"),
                "reported", "no label for the decision covariates");
    }

    @Test
    void anUnknownDecisionIsAProblemAtItsPath() {
        PlanReaderTest.fails(plan("{\"outcome\": \"turnout\", \"key\": \"mailers\", \"covariates\": \"none\", "
                + "\"rows\": \"all\", \"row\": \"all\"}"), "reported.row", "did you mean \"rows\"");
    }

    @Test
    void anUnknownLabelIsAProblemAtItsDecision() {
        PlanReaderTest.fails(plan("{\"outcome\": \"turnout\", \"key\": \"mailers\", \"covariates\": \"none\", "
                + "\"rows\": \"urbn\"}"), "reported.rows", "did you mean \"urban\"");
    }

    @Test
    void anUnknownOptionalControlIsAProblemAtItsDecision() {
        PlanReaderTest.fails(plan("{\"outcome\": \"turnout\", \"key\": \"mailers\", \"covariates\": \"age + wealth\", "
                + "\"rows\": \"all\"}"), "reported.covariates", "\"wealth\" is not an optional control");
    }

    @Test
    void aLabelThatIsNotTextIsAProblemAtItsDecision() {
        PlanReaderTest.fails(plan("{\"outcome\": \"turnout\", \"key\": 1, \"covariates\": \"none\", "
                + "\"rows\": \"all\"}"), "reported.key", "found the number 1");
    }

    @Test
    void everyProblemIsCollected() {
        PlanException e = PlanReaderTest.failure(plan("{\"outcome\": \"vote\", \"key\": \"mailers\", "
                + "\"covariates\": \"none\"}"));
        assertEquals(List.of("reported.outcome", "reported"), e.all().stream().map(PlanException::where).toList());
    }
}
