package org.forkscape.cli;

import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import org.forkscape.data.CategoricalColumn;
import org.forkscape.data.Column;
import org.forkscape.data.NumericColumn;
import org.forkscape.data.Table;

/** Rows {@code from} (inclusive) to {@code to} (exclusive) of a table, for cutting data into parts. */
final class Rows {
    private Rows() {
    }

    static Table slice(Table t, int from, int to) {
        List<Column> out = new ArrayList<>();
        for (Column c : t.columns()) {
            out.add(c instanceof NumericColumn n ? new NumericColumn(n.name(), Arrays.copyOfRange(n.values(), from, to))
                    : new CategoricalColumn(c.name(), Arrays.copyOfRange(((CategoricalColumn) c).codes(), from, to),
                            ((CategoricalColumn) c).levels()));
        }
        return new Table(t.source(), out);
    }
}
