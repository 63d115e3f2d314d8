package org.forkscape.web.run;

import java.text.Normalizer;
import java.util.Locale;
import org.forkscape.run.StoredAnalysis;
import org.forkscape.run.StoredRun;

/**
 * The names a run's downloads are saved under, {@code <analysis-slug>-<run>-<file>} (for example
 * {@code outreach-and-turnout-20261202-061500-ab12cd-specifications.csv}), so that files from several
 * analyses and runs can sit in one folder and still say where they came from.
 */
final class DownloadNames {
    /** Long titles are cut at a word boundary: the run id, not the title, makes the name unique. */
    private static final int SLUG_LENGTH = 40;

    private DownloadNames() {
    }

    /** What every download of the run begins with: the analysis's slug and the run's id. */
    static String prefix(StoredAnalysis analysis, StoredRun run) {
        return slug(analysis.title()) + "-" + run.id();
    }

    static String of(StoredAnalysis analysis, StoredRun run, String file) {
        return prefix(analysis, run) + "-" + file;
    }

    /** Lower-case ASCII letters and digits joined by hyphens; accents dropped; "analysis" when nothing is left. */
    static String slug(String title) {
        String plain = Normalizer.normalize(title == null ? "" : title, Normalizer.Form.NFKD)
                .replaceAll("\\p{M}", "").toLowerCase(Locale.ROOT).replaceAll("[^a-z0-9]+", "-")
                .replaceAll("^-|-$", "");
        if (plain.length() > SLUG_LENGTH) {
            int cut = plain.lastIndexOf('-', SLUG_LENGTH);
            plain = plain.substring(0, cut > 0 ? cut : SLUG_LENGTH);
        }
        return plain.isEmpty() ? "analysis" : plain;
    }
}
