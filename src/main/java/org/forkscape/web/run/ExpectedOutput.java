package org.forkscape.web.run;

import java.nio.charset.StandardCharsets;
import org.forkscape.infer.NullDrawsCsv;
import org.forkscape.infer.OverfittingCsv;
import org.forkscape.plan.Decision;
import org.forkscape.plan.Plan;
import org.forkscape.run.SpecificationsCsv;

/**
 * The most a run's result files are expected to take on disk, from its plan and count alone, so that a
 * run the workspace's disk cannot hold is refused before it fits. It leans high, as every cell is priced
 * at its widest: a number at 24 characters (the longest shortest-decimal form of a double), a label at
 * twice its UTF-8 bytes plus quotes (every character escaped), a status at 200 characters.
 */
final class ExpectedOutput {
    private static final int NUMBER = 24;
    private static final int STATUS = 200;
    private static final int INDEX = 20;
    /** summary.json, the plan's copy, the record and the log: far below this for any plan the server takes. */
    private static final long FIXED = 1L << 20;

    private ExpectedOutput() {
    }

    /** Bytes for specifications.csv, overfitting.csv and null-draws.csv of {@code specifications} fits, and the rest. */
    static long bytes(Plan plan, long specifications) {
        long labels = 0;
        for (Decision d : plan.decisions()) {
            labels += 2L * longestLabel(d) + 3;
        }
        int numbers = SpecificationsCsv.STAT_COLUMNS.size() - 1;
        long specificationRow = INDEX + labels + (long) numbers * NUMBER + STATUS + plan.decisions().size() + numbers + 2;
        long overfittingRow = INDEX + (OverfittingCsv.HEADER.size() - 2L) * NUMBER + 3 + OverfittingCsv.HEADER.size() + 1;
        long drawRow = (NUMBER + 1L) * NullDrawsCsv.HEADER.size() + 1;
        return specifications * (specificationRow + overfittingRow) + plan.nullDraws() * drawRow + FIXED;
    }

    /** The longest label in UTF-8 bytes; of every subset of optional controls, the one with all of them is. */
    private static int longestLabel(Decision d) {
        if (d instanceof Decision.Controls c && c.allSubsets()) {
            return utf8(d.label(d.alternativeCount() - 1));
        }
        int longest = 0;
        for (long a = 0; a < d.alternativeCount(); a++) {
            longest = Math.max(longest, utf8(d.label(a)));
        }
        return longest;
    }

    private static int utf8(String text) {
        return text.getBytes(StandardCharsets.UTF_8).length;
    }
}
