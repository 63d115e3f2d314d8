package org.forkscape.check;

import java.time.Instant;
import java.time.format.DateTimeParseException;
import tools.jackson.databind.JsonNode;

/**
 * The plan was locked before the run: summary.json's {@code provenance.lock} is present, the plan and the data
 * the run read are the locked bytes ({@code plan_matches}, {@code data_matches}), and the lock's time is
 * before the run's start.
 */
record PlanLockedRule() implements ReleaseRule {
    static final String NAME = "plan_locked";

    @Override
    public String name() {
        return NAME;
    }

    @Override
    public RuleResult evaluate(RunEvidence run) {
        String requirement = "a lock made before the run, matching the plan and the data";
        JsonNode provenance = run.summary().path("provenance");
        JsonNode lock = provenance.path("lock");
        if (!lock.isObject()) {
            return RuleResult.of(NAME, false, false, requirement, "the run's plan had no lock");
        }
        boolean plan = lock.path("plan_matches").asBoolean(false);
        boolean data = lock.path("data_matches").asBoolean(false);
        boolean before = lockedBeforeStart(lock.path("locked").asString(""), provenance.path("started").asString(""));
        String detail = "lock " + lock.path("fingerprint").asString("?") + " of " + lock.path("locked").asString("?")
                + (plan ? "" : "; the plan changed since") + (data ? "" : "; the data changed since")
                + (before ? "" : "; not before the run's start " + provenance.path("started").asString("?"));
        boolean pass = plan && data && before;
        return RuleResult.of(NAME, pass, pass, requirement, pass ? detail + ", matching" : detail);
    }

    private static boolean lockedBeforeStart(String locked, String started) {
        try {
            return !Instant.parse(locked).isAfter(Instant.parse(started));
        } catch (DateTimeParseException e) {
            // a time that cannot be read cannot show the lock came first
            return false;
        }
    }
}
