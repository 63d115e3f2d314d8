package org.forkscape.compare;

import java.util.ArrayList;
import java.util.Comparator;
import java.util.LinkedHashMap;
import java.util.LinkedHashSet;
import java.util.List;
import java.util.Map;
import java.util.Set;

/**
 * Both runs' curves for the compare page, one pair per comparable group: the specifications of one outcome,
 * key-predictor and model label (matched by label, as {@link Headlines} matches groups), because estimates
 * as fitted share units only within such a group. Each curve is its fitted estimates sorted, placed at
 * their percentile rank (the middle of each rank, {@code 100 (i + 0.5) / n}) so that runs of different
 * sizes span one axis; B's specifications that A does not have are marked as added. Above {@code maxPoints}
 * a curve is drawn from that many evenly spaced ranks, the lowest and highest among them.
 *
 * @param groups A's groups first, then those only B has
 */
public record ComparisonCurves(List<Group> groups) {
    private static final Set<String> GROUP_KINDS = Set.of("outcome", "predictor", "model");

    /** One specification on a curve; {@code added} only on B's curve, for a specification A does not have. */
    public record Point(double percentile, double estimate, String spec, boolean added) {
    }

    /** One run's curve in a group: how many fitted specifications it has, and the points drawn. */
    public record Curve(int count, List<Point> points) {
    }

    /** One comparable group: its labels by decision name, and each run's curve (empty when it has none there). */
    public record Group(String title, Map<String, String> labels, Curve a, Curve b) {
    }

    static ComparisonCurves of(RunComparison c, int maxPoints) {
        if (maxPoints < 2) {
            throw new IllegalArgumentException("maxPoints must be at least 2, found " + maxPoints);
        }
        Set<String> names = new LinkedHashSet<>();
        c.a().decisions().stream().filter(d -> GROUP_KINDS.contains(d.kind())).forEach(d -> names.add(d.name()));
        c.b().decisions().stream().filter(d -> GROUP_KINDS.contains(d.kind())).forEach(d -> names.add(d.name()));
        Map<List<String>, List<Placed>> inA = new LinkedHashMap<>();
        Map<List<String>, List<Placed>> inB = new LinkedHashMap<>();
        for (RunComparison.MatchedRow row : c.rows()) {
            List<String> key = names.stream().map(n -> row.labels().getOrDefault(n, "")).toList();
            place(row.inA(), false, key, inA);
            place(row.inB(), row.inA() == null, key, inB);
        }
        List<List<String>> keys = new ArrayList<>(inA.keySet());
        inB.keySet().stream().filter(k -> !inA.containsKey(k)).forEach(keys::add);
        List<Group> groups = new ArrayList<>();
        for (List<String> key : keys) {
            Map<String, String> labels = new LinkedHashMap<>();
            List<String> named = new ArrayList<>(names);
            for (int i = 0; i < named.size(); i++) {
                labels.put(named.get(i), key.get(i));
            }
            groups.add(new Group(String.join(", ", key.stream().filter(l -> !l.isEmpty()).toList()), labels,
                    curve(inA.getOrDefault(key, List.of()), maxPoints), curve(inB.getOrDefault(key, List.of()), maxPoints)));
        }
        return new ComparisonCurves(groups);
    }

    private record Placed(double estimate, String spec, boolean added) {
    }

    /** A specification that was fitted has a finite estimate in specifications.csv; the others are not drawn. */
    private static void place(SpecificationRow row, boolean added, List<String> key, Map<List<String>, List<Placed>> into) {
        if (row == null) {
            return;
        }
        double estimate;
        try {
            estimate = Double.parseDouble(row.cells().getOrDefault("estimate", ""));
        } catch (NumberFormatException e) {
            return;
        }
        if (Double.isFinite(estimate)) {
            into.computeIfAbsent(key, k -> new ArrayList<>()).add(new Placed(estimate, row.spec(), added));
        }
    }

    private static Curve curve(List<Placed> placed, int maxPoints) {
        List<Placed> sorted = new ArrayList<>(placed);
        sorted.sort(Comparator.comparingDouble(Placed::estimate));
        int n = sorted.size();
        int shown = Math.min(n, maxPoints);
        List<Point> points = new ArrayList<>(shown);
        for (int j = 0; j < shown; j++) {
            int i = shown == n ? j : (int) Math.round((double) j * (n - 1) / (shown - 1));
            Placed p = sorted.get(i);
            points.add(new Point(100.0 * (i + 0.5) / n, p.estimate(), p.spec(), p.added()));
        }
        return new Curve(n, points);
    }
}
