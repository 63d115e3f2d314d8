package org.forkscape.run;

import java.time.Instant;

/**
 * One saved version of an analysis's plan.
 *
 * @param version      1 for the first saved, counting up
 * @param saved        when it was saved (for a workspace from before the history: plan.json's modification time)
 * @param sha256       lower-case hex SHA-256 of the plan's UTF-8 bytes, as a run's {@code provenance.plan_sha256}
 * @param restoredFrom the version it restored, or 0 when it was saved from the plan page or the API
 */
public record PlanVersion(int version, Instant saved, String sha256, int restoredFrom) {
}
