package org.forkscape.report;

import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Path;
import org.forkscape.plan.Plan;
import org.forkscape.plan.PlanReader;
import org.forkscape.run.Scale;
import org.junit.jupiter.api.Test;
import tools.jackson.databind.json.JsonMapper;

/**
 * The methods paragraph names the two-way demeaning and its sources only when a plan absorbs two columns, and the
 * exact leverages beside them only when it also has HC2 or HC3.
 */
class MethodsTextTest {
    private static Plan plan(String name) throws Exception {
        return new PlanReader(false).read(Path.of(MethodsTextTest.class.getResource("/reference/" + name).toURI()));
    }

    @Test
    void twoAbsorbedColumnsAreDescribedWithTheirSources() throws Exception {
        var summary = JsonMapper.builder().build().readTree("{\"fitted\": 640}");
        String two = MethodsText.of(plan("school-panel-plan.json"), summary, Scale.AS_FITTED);
        assertTrue(two.contains("alternating projections") && two.contains("Gaure 2013, Computational Statistics & "
                + "Data Analysis 66") && two.contains("Stata Journal 10(4)") && two.contains("connected component"), two);
        String one = MethodsText.of(plan("plot-panel-plan.json"), summary, Scale.AS_FITTED);
        assertTrue(one.contains("within transformation"), one);
        assertFalse(one.contains("alternating projections"), one);
        assertFalse(two.contains("leverages of HC2/HC3"), "no HC2/HC3 in that plan: " + two);
    }

    /** HC2 or HC3 beside two absorbed columns: the exact leverages and their source. */
    @Test
    void leveragesBesideTwoAbsorbedColumnsAreDescribed() throws Exception {
        var summary = JsonMapper.builder().build().readTree("{\"fitted\": 192}");
        String text = MethodsText.of(plan("school-panel-leverage-plan.json"), summary, Scale.AS_FITTED);
        assertTrue(text.contains("the leverages of HC2/HC3 were exact") && text.contains("Davidson & MacKinnon 2004, "
                + "Econometric Theory and Methods, sections 2.4 and 2.6"), text);
    }
}
