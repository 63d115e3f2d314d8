package org.forkscape.cli;

import java.nio.file.Files;
import java.nio.file.LinkOption;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import org.forkscape.check.ReleaseCheck;
import org.forkscape.infer.InferenceSections;
import org.forkscape.run.RunOutputs;

/**
 * The result files of an earlier run in a folder that a new run replaces ({@link ResultFolder}): they
 * are left behind with the old folder, so every result file in the new one belongs to the new
 * summary.json. Only Forkscape's own result file names count, and only when they are files; anything else
 * in the folder joins the new one.
 */
final class EarlierResultFiles {
    /** Every file a batch run may write. */
    static final List<String> NAMES;

    static {
        List<String> names = new ArrayList<>(RunOutputs.FILES);
        names.addAll(InferenceSections.FILE_NAMES);
        // a release check judged the earlier results; left beside new ones it would vouch for results it never saw
        names.add(ReleaseCheck.FILE);
        NAMES = List.copyOf(names);
    }

    private EarlierResultFiles() {
    }

    /** Whether an entry of a results folder is a result file of the run that wrote it. */
    static boolean isResult(Path entry) {
        return NAMES.contains(entry.getFileName().toString()) && Files.isRegularFile(entry, LinkOption.NOFOLLOW_LINKS);
    }
}
