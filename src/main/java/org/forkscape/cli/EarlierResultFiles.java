package org.forkscape.cli;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.LinkOption;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import org.forkscape.InputException;
import org.forkscape.infer.InferenceSections;
import org.forkscape.run.RunOutputs;

/**
 * After a run has written its files into a folder that may hold an earlier run's, removes the result
 * files of that earlier run which this run did not write (null-draws.csv after a run without null
 * draws), so that every result file in the folder belongs to the new summary.json. Only Forkscape's own
 * result file names are touched, and only when they are files; anything else in the folder stays.
 */
final class EarlierResultFiles {
    /** Every file a batch run may write. */
    static final List<String> NAMES;

    static {
        List<String> names = new ArrayList<>(RunOutputs.FILES);
        names.addAll(InferenceSections.FILE_NAMES);
        NAMES = List.copyOf(names);
    }

    private EarlierResultFiles() {
    }

    /**
     * @param inferenceFiles the inference stage's files this run wrote ({@link InferenceSections#fileNames});
     *                       the run's own, {@link RunOutputs#FILES}, the batch command always writes
     */
    static void removeBesides(Path folder, List<String> inferenceFiles) {
        for (String name : NAMES) {
            Path file = folder.resolve(name);
            if (RunOutputs.FILES.contains(name) || inferenceFiles.contains(name)
                    || Files.isDirectory(file, LinkOption.NOFOLLOW_LINKS)) {
                continue;
            }
            try {
                Files.deleteIfExists(file);
            } catch (IOException e) {
                throw new InputException(file.toString(), "cannot remove this file of an earlier run, which the new "
                        + "summary.json does not describe (" + e.getClass().getSimpleName() + "); remove it by hand");
            }
        }
    }
}
