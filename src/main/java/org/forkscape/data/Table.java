package org.forkscape.data;

import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Optional;

/** A loaded data set: named columns of equal length, in file order. Immutable once built. */
public final class Table {
    private final String source;
    private final List<Column> columns;
    private final Map<String, Column> byName = new LinkedHashMap<>();
    private final int rows;

    public Table(String source, List<Column> columns) {
        this.source = source;
        this.columns = List.copyOf(columns);
        this.rows = columns.isEmpty() ? 0 : columns.get(0).size();
        for (Column c : columns) {
            if (c.size() != rows) {
                throw new IllegalArgumentException("column " + c.name() + " has " + c.size() + " rows, expected " + rows);
            }
            if (byName.put(c.name(), c) != null) {
                throw new IllegalArgumentException("duplicate column " + c.name());
            }
        }
    }

    /** Where the table came from (a file name), for messages. */
    public String source() {
        return source;
    }

    public int rowCount() {
        return rows;
    }

    public List<Column> columns() {
        return columns;
    }

    public Optional<Column> find(String name) {
        return Optional.ofNullable(byName.get(name));
    }

    /** The column of that name; callers validate names first (the plan reader does). */
    public Column column(String name) {
        Column c = byName.get(name);
        if (c == null) {
            throw new IllegalArgumentException("no column " + name);
        }
        return c;
    }

    /** Levenshtein distance, for "did you mean" suggestions here and in plan messages. */
    public static int editDistance(String a, String b) {
        return EditDistance.between(a, b);
    }

    /**
     * The column name closest to {@code name} by edit distance (case-insensitive), for "did you mean"
     * suggestions, or empty when nothing is reasonably close.
     */
    public Optional<String> nearestName(String name) {
        String best = null;
        int bestDistance = Integer.MAX_VALUE;
        for (String candidate : byName.keySet()) {
            int d = EditDistance.between(name.toLowerCase(), candidate.toLowerCase());
            if (d < bestDistance) {
                bestDistance = d;
                best = candidate;
            }
        }
        if (best == null || bestDistance > Math.max(2, name.length() / 2)) {
            return Optional.empty();
        }
        return Optional.of(best);
    }
}
