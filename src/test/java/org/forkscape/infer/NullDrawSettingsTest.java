package org.forkscape.infer;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.forkscape.plan.Plan;
import org.junit.jupiter.api.Test;

/** Which unit the null draws take from the plan's keys and its errors decision. */
class NullDrawSettingsTest {
    private static NullDrawSettings of(String errors, String keys) {
        return NullDrawSettings.of(plan(errors, keys));
    }

    private static Plan plan(String errors, String keys) {
        return Scenarios.plan("""
                {"data": "simulated.csv", "nullDraws": 10, %s
                 "decisions": [
                   {"name": "outcome", "kind": "outcome", "alternatives": [{"label": "y", "column": "y"}]},
                   {"name": "key", "kind": "predictor", "alternatives": [{"label": "x", "column": "x"}]},
                   {"name": "errors", "kind": "errors", "alternatives": [%s]}
                 ]}
                """.formatted(keys, errors));
    }

    @Test
    void theOneColumnTheErrorsClusterOnIsResampledByDefault() {
        NullDrawSettings s = of("\"HC1\", \"cluster:g\", \"classical\"", "");
        assertEquals("g", s.clusterColumn());
        assertTrue(s.byDefault());
    }

    @Test
    void aNamedColumnOrTheWordRowsIsHonoured() {
        NullDrawSettings column = of("\"cluster:g\"", "\"nullCluster\": \"district\",");
        assertEquals("district", column.clusterColumn());
        assertFalse(column.byDefault());
        NullDrawSettings rows = of("\"cluster:g\"", "\"nullCluster\": \"rows\",");
        assertNull(rows.clusterColumn());
        assertFalse(rows.byDefault());
    }

    @Test
    void rowsWhenThereIsNoSingleColumnOrTheMethodCannotMoveClusters() {
        assertNull(of("\"classical\", \"HC1\"", "").clusterColumn());
        assertNull(of("\"cluster:g\", \"cluster:district\"", "").clusterColumn());
        assertNull(of("\"cluster:g\"", "\"nullMethod\": \"permute\",").clusterColumn());
        of("\"cluster:g\"", "\"nullMethod\": \"permute\",").check(plan("\"cluster:g\"", ""), 100, "nullDraws",
                "nullCluster");
        of("\"cluster:g\"", "\"nullMethod\": \"permute\", \"nullCluster\": \"rows\",").check(plan("\"cluster:g\"", ""),
                100, "nullDraws", "nullCluster");
    }

    @Test
    void drawsTakeErrorsClusteredOnSeveralColumnsForEveryModel() {
        Plan twoWay = plan("\"HC1\", \"cluster:g+district\"", "");
        NullDrawSettings settings = NullDrawSettings.of(twoWay);
        settings.check(twoWay, 100, "nullDraws", "nullCluster");
        assertNull(settings.clusterColumn(), "no single column to resample: single rows, with the warning");
        Plan logit = Scenarios.plan("""
                {"data": "simulated.csv", "nullDraws": 10,
                 "decisions": [
                   {"name": "outcome", "kind": "outcome", "alternatives": [{"label": "y", "column": "y"}]},
                   {"name": "key", "kind": "predictor", "alternatives": [{"label": "x", "column": "x"}]},
                   {"name": "model", "kind": "model", "alternatives": ["ols", "logit"]},
                   {"name": "errors", "kind": "errors", "alternatives": ["HC1", "cluster:g+district"]}
                 ]}
                """);
        NullDrawSettings.of(logit).check(logit, 100, "nullDraws", "nullCluster");
    }

    /** Draws beside two absorbed columns run, by either method (each draw demeans again; TwoWayDrawsTest). */
    @Test
    void drawsAreAcceptedWhenTwoColumnsAreAbsorbed() {
        for (String method : new String[] {"bootstrap", "permute"}) {
            Plan plan = Scenarios.plan("""
                    {"data": "simulated.csv", "nullDraws": 10, "nullMethod": "%s",
                     "decisions": [
                       {"name": "outcome", "kind": "outcome", "alternatives": [{"label": "y", "column": "y"}]},
                       {"name": "key", "kind": "predictor", "alternatives": [{"label": "x", "column": "x"}]},
                       {"name": "effects", "kind": "absorb", "alternatives": [{"label": "g", "columns": ["g"]},
                         {"label": "g and district", "columns": ["g", "district"]}]}
                     ]}
                    """.formatted(method));
            assertEquals("decisions[2].alternatives[1], g and district", plan.severalAbsorbedPath());
            NullDrawSettings.of(plan).check(plan, 100, "nullDraws", "nullCluster");
        }
    }
}
