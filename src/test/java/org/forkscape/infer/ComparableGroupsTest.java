package org.forkscape.infer;

import static org.junit.jupiter.api.Assertions.assertEquals;

import java.util.List;
import java.util.Map;
import org.forkscape.data.Column;
import org.forkscape.data.NumericColumn;
import org.forkscape.data.Table;
import org.forkscape.run.ResultTable;
import org.forkscape.run.RunResult;
import org.junit.jupiter.api.Test;

/**
 * Comparable groups are the same outcome on exactly the same rows: a control with missing values splits
 * a variant's specifications by the rows they use, unless the plan asks for common rows.
 */
class ComparableGroupsTest {
    private static final String PLAN = """
            {"data": "simulated.csv", %s
             "decisions": [
               {"name": "outcome", "kind": "outcome", "alternatives": [
                  {"label": "score", "column": "y"}, {"label": "second", "column": "y2"}]},
               {"name": "key", "kind": "predictor", "alternatives": [{"label": "x", "column": "x"}]},
               {"name": "controls", "kind": "controls", "optional": ["a", "b"]}
             ]}
            """;

    private static Table withMissingA() {
        Table t = Scenarios.table(60, 0.3, 9, 4);
        double[] a = ((NumericColumn) t.column("a")).values().clone();
        for (int i = 0; i < a.length; i += 6) {
            a[i] = Double.NaN;
        }
        List<Column> cols = t.columns().stream().map(c -> c.name().equals("a") ? (Column) new NumericColumn("a", a) : c)
                .toList();
        return new Table(t.source(), cols);
    }

    @Test
    void missingValuesSplitTheRowsPerSpecification() {
        RunResult run = Scenarios.run(String.format(PLAN, ""), withMissingA());
        List<ComparableGroups.Group> groups = ComparableGroups.of(RunVariants.of(run), 0.95);
        assertEquals(4, groups.size(), "two outcomes x (with a: 50 rows, without a: 60 rows)");
        ResultTable r = run.results();
        for (ComparableGroups.Group g : groups) {
            assertEquals(2, g.members().length);
            for (int m : g.members()) {
                assertEquals(g.nObs(), r.nObs(m));
            }
            // a is in both or in neither member, so b is the only optional control
            assertEquals(List.of("b"), List.copyOf(g.inclusion().keySet()));
            double bicWithout = GroupWeights.bic(r.rss(g.members()[0]), r.nObs(g.members()[0]), r.nParams(g.members()[0]));
            double bicWith = GroupWeights.bic(r.rss(g.members()[1]), r.nObs(g.members()[1]), r.nParams(g.members()[1]));
            double expected = Math.exp(-bicWith / 2) / (Math.exp(-bicWith / 2) + Math.exp(-bicWithout / 2));
            assertEquals(expected, g.inclusion().get("b"), 1e-12);
            // Leamer's bounds of the group: over its own members only
            double lower = Math.min(r.ciLow(g.members()[0], 0.95), r.ciLow(g.members()[1], 0.95));
            double upper = Math.max(r.ciHigh(g.members()[0], 0.95), r.ciHigh(g.members()[1], 0.95));
            assertEquals(lower, g.bounds().lower());
            assertEquals(upper, g.bounds().upper());
        }
        assertEquals(Map.of(), groups.get(0).rows());
    }

    /** A logit coefficient and a least-squares one are not one coefficient: each model is a group of its own. */
    @Test
    void eachModelAndEachPredictorCodingIsAGroupOfItsOwn() {
        String plan = """
                {"data": "simulated.csv", "missing": "common", "decisions": [
                  {"name": "outcome", "kind": "outcome", "alternatives": [{"label": "passed", "column": "pass"}]},
                  {"name": "key", "kind": "predictor", "alternatives": [
                     {"label": "raw", "column": "x"}, {"label": "standardized", "column": "x", "transform": "standardize"}]},
                  {"name": "controls", "kind": "controls", "optional": ["a", "b"]},
                  {"name": "model", "kind": "model", "alternatives": ["ols", "logit"]}]}
                """;
        RunResult run = Scenarios.run(plan, Scenarios.table(80, 0.5, 3, 4));
        List<ComparableGroups.Group> groups = ComparableGroups.of(RunVariants.of(run), 0.95);
        assertEquals(4, groups.size(), "2 codings x 2 models, 4 control sets each");
        assertEquals(List.of("raw/ols", "raw/logit", "standardized/ols", "standardized/logit"),
                groups.stream().map(g -> g.predictor() + "/" + g.model()).toList());
        for (ComparableGroups.Group g : groups) {
            assertEquals(4, g.members().length);
            for (int m : g.members()) {
                assertEquals(g.model(), run.results().family(m).spelling());
            }
        }
    }

    @Test
    void commonRowsMakeOneGroupPerOutcome() {
        RunResult run = Scenarios.run(String.format(PLAN, "\"missing\": \"common\","), withMissingA());
        List<ComparableGroups.Group> groups = ComparableGroups.of(RunVariants.of(run), 0.95);
        assertEquals(2, groups.size());
        assertEquals("score", groups.get(0).outcome());
        assertEquals(4, groups.get(0).members().length);
        assertEquals(50, groups.get(0).nObs());
        assertEquals(List.of("a", "b"), List.copyOf(groups.get(0).inclusion().keySet()));
    }
}
