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
    private final boolean elsewhere;

    public Table(String source, List<Column> columns) {
        this(source, columns, columns.isEmpty() ? 0 : columns.get(0).size());
    }

    /**
     * The columns of a table whose {@code rows} rows are held elsewhere (on a cluster): each column has its
     * name, its kind and, when categorical, its levels, and no rows. Plans are checked against it, and the
     * data variants are built where the rows are.
     */
    public static Table withoutRows(String source, List<Column> columns, int rows) {
        return new Table(source, columns, rows, true);
    }

    private Table(String source, List<Column> columns, int rows) {
        this(source, columns, rows, false);
    }

    private Table(String source, List<Column> columns, int rows, boolean elsewhere) {
        this.source = source;
        this.columns = List.copyOf(columns);
        this.rows = rows;
        this.elsewhere = elsewhere;
        for (Column c : columns) {
            if (c.size() != (elsewhere ? 0 : rows)) {
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

    /** Whether the columns hold the rows (false for {@link #withoutRows}). */
    public boolean holdsRows() {
        return !elsewhere;
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
