package org.forkscape.compare;

import static org.junit.jupiter.api.Assertions.assertEquals;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import org.forkscape.run.Json;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * The compare page's curves, on two hand-written run folders: one pair per outcome label, estimates sorted
 * and placed at the middle of their rank, B's own specifications marked, unfitted ones left out, and a long
 * curve thinned to evenly spaced ranks that keep its lowest and highest.
 */
class ComparisonCurvesTest {
    @TempDir
    Path dir;

    private RunFiles run(String name, List<String> outcomes, String rows) throws IOException {
        Path folder = Files.createDirectories(dir.resolve(name));
        String alternatives = String.join(", ", outcomes.stream().map(o -> "{\"label\": \"" + o + "\", \"column\": \""
                + o + "\"}").toList());
        String plan = "{\"decisions\": [{\"name\": \"outcome\", \"kind\": \"outcome\", \"alternatives\": ["
                + alternatives + "]}, {\"name\": \"errors\", \"kind\": \"errors\", \"alternatives\": [\"classical\"]},"
                + "{\"name\": \"rows\", \"kind\": \"sample\", \"alternatives\": []}]}";
        Files.writeString(folder.resolve("specifications.csv"), "spec,outcome,errors,rows,estimate,status\n" + rows);
        return new RunFiles(folder, Json.MAPPER.readTree(plan), Json.MAPPER.readTree("{}"),
                folder.resolve("specifications.csv"));
    }

    @Test
    void eachGroupsCurvesAreSortedPlacedAndMarked() throws IOException {
        RunFiles a = run("a", List.of("turnout"), "1,turnout,classical,r1,0.3,ok\n2,turnout,classical,r2,0.1,ok\n"
                + "3,turnout,classical,r3,,failed\n");
        RunFiles b = run("b", List.of("turnout", "change"), "1,turnout,classical,r1,0.3,ok\n2,turnout,classical,r2,0.1,ok\n"
                + "3,turnout,classical,r4,0.2,ok\n4,change,classical,r1,-1,ok\n");
        ComparisonCurves curves = Comparison.of(a, b).curves(100);
        assertEquals(List.of("turnout", "change"), curves.groups().stream().map(ComparisonCurves.Group::title).toList());
        ComparisonCurves.Group turnout = curves.groups().get(0);
        assertEquals(2, turnout.a().count(), "the failed specification is not drawn");
        assertEquals(List.of(0.1, 0.3), turnout.a().points().stream().map(ComparisonCurves.Point::estimate).toList());
        assertEquals(List.of(25.0, 75.0), turnout.a().points().stream().map(ComparisonCurves.Point::percentile).toList());
        assertEquals(List.of(false, true, false), turnout.b().points().stream().map(ComparisonCurves.Point::added)
                .toList(), "r4 is B's own");
        assertEquals(0, curves.groups().get(1).a().count(), "A has no such group");
    }

    @Test
    void aLongCurveIsDrawnFromEvenlySpacedRanks() throws IOException {
        StringBuilder rows = new StringBuilder();
        for (int i = 1; i <= 10; i++) {
            rows.append(i).append(",turnout,classical,r").append(i).append(',').append(11 - i).append(",ok\n");
        }
        RunFiles a = run("a", List.of("turnout"), rows.toString());
        ComparisonCurves.Curve curve = Comparison.of(a, a).curves(4).groups().get(0).a();
        assertEquals(10, curve.count());
        // ranks 0, 3, 6 and 9 of 10: round(j * 9 / 3)
        assertEquals(List.of(1.0, 4.0, 7.0, 10.0), curve.points().stream().map(ComparisonCurves.Point::estimate).toList());
        assertEquals(List.of(5.0, 35.0, 65.0, 95.0), curve.points().stream().map(ComparisonCurves.Point::percentile)
                .toList());
    }
}
