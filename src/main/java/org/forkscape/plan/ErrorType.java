package org.forkscape.plan;

import java.util.Arrays;
import java.util.HashSet;
import java.util.List;
import java.util.Set;
import org.forkscape.InputException;

/**
 * How the key coefficient's standard error is computed.
 *
 * @param kind           the family
 * @param clusterColumns for {@link Kind#CLUSTER} the columns it clusters on, one for one-way clustering and
 *                       several (in the order written) for multi-way clustering; otherwise empty
 */
public record ErrorType(Kind kind, List<String> clusterColumns) {
    public enum Kind { CLASSICAL, HC0, HC1, HC2, HC3, CLUSTER }

    public static final ErrorType CLASSICAL = new ErrorType(Kind.CLASSICAL, List.of());

    public ErrorType {
        clusterColumns = List.copyOf(clusterColumns);
    }

    /** One-way cluster errors on {@code column}. */
    public static ErrorType cluster(String column) {
        return new ErrorType(Kind.CLUSTER, List.of(column));
    }

    /**
     * The one column of one-way cluster errors; {@code null} for every other type, multi-way clustering
     * included (whose columns are {@link #clusterColumns}).
     */
    public String clusterColumn() {
        return kind == Kind.CLUSTER && clusterColumns.size() == 1 ? clusterColumns.get(0) : null;
    }

    /** Whether this clusters on two or more columns at once. */
    public boolean multiway() {
        return clusterColumns.size() > 1;
    }

    /** The plan spelling: {@code classical}, {@code HC0}..{@code HC3}, {@code cluster:COLUMN[+COLUMN...]}. */
    public String label() {
        return switch (kind) {
            case CLASSICAL -> "classical";
            case CLUSTER -> "cluster:" + String.join("+", clusterColumns);
            default -> kind.name();
        };
    }

    static ErrorType parse(String text, String path) {
        String t = text.trim();
        if (t.equalsIgnoreCase("classical")) {
            return CLASSICAL;
        }
        for (Kind k : new Kind[] {Kind.HC0, Kind.HC1, Kind.HC2, Kind.HC3}) {
            if (t.equalsIgnoreCase(k.name())) {
                return new ErrorType(k, List.of());
            }
        }
        if (t.startsWith("cluster:") && !t.substring("cluster:".length()).isBlank()) {
            return new ErrorType(Kind.CLUSTER, columns(t.substring("cluster:".length()), path));
        }
        if (t.equals("cluster") || t.equals("cluster:")) {
            throw new PlanException(path, "cluster errors name their column, as in cluster:school (or "
                    + "cluster:school+term for two-way clustering)");
        }
        throw new PlanException(path, "unknown standard error type " + InputException.quoted(text)
                + "; use classical, HC0, HC1, HC2, HC3, cluster:COLUMN or cluster:COLUMN+COLUMN");
    }

    /**
     * The most columns one error type may cluster on: m columns take 2^m - 1 one-way variances per
     * specification, 15 at this limit.
     */
    public static final int MAX_CLUSTER_COLUMNS = 4;

    /** The {@code +}-joined column names after {@code cluster:}, each once and none empty. */
    private static List<String> columns(String joined, String path) {
        List<String> names = Arrays.stream(joined.split("\\+", -1)).map(String::trim).toList();
        if (names.size() > MAX_CLUSTER_COLUMNS) {
            throw new PlanException(path, InputException.quoted("cluster:" + joined) + " clusters on " + names.size()
                    + " columns; at most " + MAX_CLUSTER_COLUMNS + " are supported (each combination of them is one "
                    + "more variance to compute)");
        }
        Set<String> seen = new HashSet<>();
        for (String name : names) {
            if (name.isEmpty()) {
                throw new PlanException(path, "an empty cluster column in " + InputException.quoted("cluster:" + joined)
                        + "; join column names with +, as in cluster:school+term");
            }
            if (!seen.add(name)) {
                throw new PlanException(path, "the cluster column " + InputException.quoted(name)
                        + " is named twice in " + InputException.quoted("cluster:" + joined));
            }
        }
        return names;
    }
}
