package org.forkscape.run;

import java.time.Instant;

/**
 * One analysis of the workspace: a data file and the runs of its plans.
 *
 * @param id       generated identifier, also the folder name
 * @param title    the name the user gave it
 * @param dataName the uploaded file's name, shown to the user and never used as a path
 * @param rows     data rows
 * @param columns  data columns
 * @param created  when it was created
 * @param demo     whether it is the bundled demo
 * @param archived whether the user archived it (kept whole, listed apart)
 */
public record StoredAnalysis(String id, String title, String dataName, int rows, int columns, Instant created,
        boolean demo, boolean archived) {
    /** The analysis under a new title and archive mark. */
    public StoredAnalysis labelled(String newTitle, boolean isArchived) {
        return new StoredAnalysis(id, newTitle.strip(), dataName, rows, columns, created, demo, isArchived);
    }
}
