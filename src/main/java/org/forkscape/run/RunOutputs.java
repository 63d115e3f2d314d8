package org.forkscape.run;

import java.nio.file.Path;
import java.util.List;
import java.util.Map;

/**
 * The files of a finished run in its output folder: specifications.csv, summary.json and a copy of
 * the plan as given. Each is written atomically.
 */
public final class RunOutputs {
    public static final String SPECIFICATIONS = "specifications.csv";
    public static final String SUMMARY = "summary.json";
    public static final String PLAN = "plan.json";
    /** The files {@link #write} writes when it is given the plan's text. */
    public static final List<String> FILES = List.of(SPECIFICATIONS, SUMMARY, PLAN);

    private RunOutputs() {
    }

    /**
     * @param threads  threads that format specifications.csv (its bytes do not depend on them)
     * @param progress receives the rows of specifications.csv written out of its rows
     */
    public static void write(RunResult run, Path folder, String planText, Map<String, Object> sections,
            Provenance provenance, int threads, RunProgress progress) {
        SpecificationsCsv.write(run, folder.resolve(SPECIFICATIONS), threads, progress);
        Json.write(folder.resolve(SUMMARY), SummaryJson.of(run, sections, provenance));
        if (planText != null) {
            AtomicFiles.writeString(folder.resolve(PLAN), planText);
        }
    }
}
