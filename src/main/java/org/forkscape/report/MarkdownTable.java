package org.forkscape.report;

import java.util.List;
import org.forkscape.Version;

/** The headline table as Markdown (pipe tables, as GitHub and pandoc read them). */
final class MarkdownTable {
    private MarkdownTable() {
    }

    static String of(HeadlineTable table, String runWords) {
        StringBuilder b = new StringBuilder();
        b.append(escape(TableText.caption(table))).append("\n\n");
        line(b, TableText.HEADER);
        b.append("|---|").append("---:|".repeat(TableText.HEADER.size() - 1)).append('\n');
        for (List<String> row : TableText.rows(table)) {
            line(b, row);
        }
        if (!table.jointTests().isEmpty()) {
            b.append('\n').append(escape(TableText.testsCaption(table))).append("\n\n");
            line(b, TableText.TEST_HEADER);
            b.append("|---|---:|---:|---:|---|\n");
            for (List<String> row : TableText.tests(table)) {
                line(b, row);
            }
        }
        b.append("\nForkscape ").append(Version.current()).append(", ").append(escape(runWords)).append(".\n");
        return b.toString();
    }

    private static void line(StringBuilder b, List<String> cells) {
        b.append('|');
        for (String c : cells) {
            b.append(' ').append(escape(c)).append(" |");
        }
        b.append('\n');
    }

    /** Text safe in a table cell: a pipe, backslash or line break would end the cell or the row. */
    static String escape(String text) {
        return text.replace("\\", "\\\\").replace("|", "\\|").replace("\r", " ").replace("\n", " ")
                .replace("*", "\\*").replace("_", "\\_");
    }
}
