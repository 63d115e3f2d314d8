package org.forkscape.plan;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNull;

import java.nio.file.Path;
import java.util.List;
import org.junit.jupiter.api.Test;

/** A plan's factors, and each specification's level of them against the decisions' own labels. */
class FactorTest {
    @Test
    void aPlansFactorsAreItsDecisionsInOrderWithOneFactorPerOptionalControl() {
        List<Factor> factors = Factor.listOf(SpecificationSpaceTest.plan(2));
        assertEquals(List.of("y", "x", "c0", "c1", "se"), factors.stream().map(Factor::name).toList());
        for (int f = 0; f < factors.size(); f++) {
            assertEquals(f, factors.get(f).id());
        }
        Factor c1 = factors.get(3);
        assertEquals("c", c1.decision());
        assertEquals(2, c1.decisionIndex());
        assertEquals(1, c1.controlBit());
        assertEquals(List.of("without", "with"), c1.levels());
        assertEquals("with c1", c1.describe(1));
        Factor x = factors.get(1);
        assertNull(x.control());
        assertEquals(List.of("x1", "x2", "x3"), x.levels());
        assertEquals("x = x3", x.describe(2));
    }

    @Test
    void everySpecificationsLevelsAgreeWithTheDecisionsLabels() {
        Plan plan = SpecificationSpaceTest.plan(2);
        SpecificationSpace space = new SpecificationSpace(plan);
        long[] choices = new long[space.decisionCount()];
        for (long index = 0; index < space.size(); index++) {
            space.decode(index, choices);
            for (Factor f : Factor.listOf(plan)) {
                Decision d = plan.decisions().get(f.decisionIndex());
                long choice = choices[f.decisionIndex()];
                if (f.isControl()) {
                    int expected = ((Decision.Controls) d).chosen(choice).contains(f.control()) ? 1 : 0;
                    assertEquals(expected, f.levelOf(choices), f.name() + " of specification " + index);
                } else {
                    assertEquals(d.label(choice), f.levels().get(f.levelOf(choices)), f.name() + " of " + index);
                }
            }
        }
    }

    @Test
    void namedSetsOfControlsAreOneFactor() {
        Plan plan = new PlanReader(false).read("{\"data\": \"d.csv\", \"decisions\": ["
                + "{\"name\": \"y\", \"kind\": \"outcome\", \"alternatives\": [{\"label\": \"y1\", \"column\": \"y1\"}]},"
                + "{\"name\": \"x\", \"kind\": \"predictor\", \"alternatives\": [{\"label\": \"x1\", \"column\": \"x1\"}]},"
                + "{\"name\": \"ctx\", \"kind\": \"controls\", \"combine\": \"sets\", "
                + "\"sets\": {\"none\": [], \"both\": [\"a\", \"b\"]}}]}", Path.of("."));
        Factor ctx = Factor.listOf(plan).get(2);
        assertNull(ctx.control());
        assertEquals(List.of("none", "both"), ctx.levels());
        assertEquals("both", ctx.reportLabel(1));
        assertArrayEquals(new int[] {0, 1}, ctx.reportOrder());
    }

    @Test
    void theInferenceReportNamesAControlsLevelsInThenOut() {
        // the wording and order of src/test/r/influence-aov.R: factor(..., levels = c("in", "out"))
        Factor c0 = Factor.listOf(SpecificationSpaceTest.plan(2)).get(2);
        assertArrayEquals(new int[] {1, 0}, c0.reportOrder());
        assertEquals("in", c0.reportLabel(1));
        assertEquals("out", c0.reportLabel(0));
    }
}
