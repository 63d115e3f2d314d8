package org.forkscape.web.check;

import java.nio.file.Path;
import org.forkscape.check.ReleaseCheck;

/**
 * The explore page's release-check panel: the check last run on this run (its check.json), or none, and the
 * policy the form starts from.
 *
 * @param last          the recorded check, {@code null} before the first
 * @param examplePolicy every rule with its defaults
 */
public record ReleaseCheckPanel(ReleaseCheck last, String examplePolicy) {
    public static ReleaseCheckPanel of(Path runFolder) {
        return new ReleaseCheckPanel(ReleaseCheck.recorded(runFolder).orElse(null), ReleaseCheck.EXAMPLE_POLICY);
    }
}
