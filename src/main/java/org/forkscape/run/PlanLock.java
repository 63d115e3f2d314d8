package org.forkscape.run;

import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Instant;
import java.time.format.DateTimeParseException;
import java.time.temporal.ChronoUnit;
import java.util.LinkedHashMap;
import java.util.Locale;
import java.util.Map;
import java.util.Optional;
import java.util.regex.Pattern;
import org.forkscape.InputException;
import tools.jackson.core.JacksonException;
import tools.jackson.databind.JsonNode;

/**
 * A plan fixed before any result is seen: the SHA-256 of the plan's and the data's bytes (FIPS 180-4), the
 * time in UTC, and a fingerprint short enough to deposit with a registry or read to an editor. The
 * fingerprint is the first 16 hex digits of the SHA-256 of {@code plan_sha256 + "\n" + data_sha256 + "\n" +
 * locked + "\n"} (UTF-8), in four groups of four joined by hyphens, so that anyone holding the lock file
 * can recompute it and a changed field changes it.
 */
public record PlanLock(String planSha256, String dataSha256, Instant locked, String fingerprint) {
    /** What a lock file beside a plan ends with, in place of the plan's own {@code .json}. */
    public static final String SUFFIX = ".lock.json";
    private static final Pattern HEX64 = Pattern.compile("[0-9a-f]{64}");

    /** The lock of these plan bytes and this data file, made now. */
    public static PlanLock of(byte[] planBytes, Path dataFile) {
        return of(Provenance.sha256(planBytes), Provenance.sha256(dataFile), Instant.now().truncatedTo(
                ChronoUnit.SECONDS));
    }

    static PlanLock of(String planSha256, String dataSha256, Instant locked) {
        return new PlanLock(planSha256, dataSha256, locked, fingerprint(planSha256, dataSha256, locked));
    }

    static String fingerprint(String planSha256, String dataSha256, Instant locked) {
        String hex = Provenance.sha256((planSha256 + "\n" + dataSha256 + "\n" + locked + "\n")
                .getBytes(StandardCharsets.UTF_8));
        return hex.substring(0, 4) + "-" + hex.substring(4, 8) + "-" + hex.substring(8, 12) + "-" + hex.substring(12, 16);
    }

    /**
     * The lock file of a plan, in the plan's folder: {@code plan.json} gives {@code plan.lock.json},
     * {@code study.plan.json} gives {@code study.plan.lock.json} (only the last {@code .json} is replaced);
     * a name without {@code .json} gets {@code .lock.json} appended.
     */
    public static Path besidePlan(Path planFile) {
        String name = planFile.getFileName().toString();
        String stem = name.toLowerCase(Locale.ROOT).endsWith(".json") ? name.substring(0, name.length() - 5)
                : name;
        return planFile.resolveSibling(stem + SUFFIX);
    }

    /** The lock in a file, or empty when there is none; a file that is no lock is refused with its field. */
    public static Optional<PlanLock> readIfPresent(Path lockFile) {
        if (!Files.exists(lockFile)) {
            return Optional.empty();
        }
        JsonNode json;
        try {
            json = Json.MAPPER.readTree(Files.readAllBytes(lockFile));
        } catch (IOException | JacksonException e) {
            throw new InputException(lockFile.toString(), "cannot read the plan's lock file: " + e.getMessage());
        }
        String plan = hash(json, "plan_sha256", lockFile);
        String data = hash(json, "data_sha256", lockFile);
        Instant locked;
        try {
            locked = Instant.parse(json.path("locked").asString(""));
        } catch (DateTimeParseException e) {
            throw new InputException(lockFile + ", locked", "needs the time of the lock in UTC, such as "
                    + "2026-01-31T09:30:00Z");
        }
        PlanLock lock = of(plan, data, locked);
        if (!lock.fingerprint().equals(json.path("fingerprint").asString(""))) {
            throw new InputException(lockFile + ", fingerprint", "does not match the lock's other fields (expected "
                    + lock.fingerprint() + "); the lock file was edited");
        }
        return Optional.of(lock);
    }

    private static String hash(JsonNode json, String field, Path lockFile) {
        String value = json.path(field).asString("");
        if (!HEX64.matcher(value).matches()) {
            throw new InputException(lockFile + ", " + field, "needs a SHA-256 as 64 lower-case hex digits");
        }
        return value;
    }

    /** Whether a run's plan and data, by their SHA-256, are still the locked ones. */
    public Status check(String runPlanSha256, String runDataSha256) {
        return new Status(fingerprint, locked, planSha256.equals(runPlanSha256), dataSha256.equals(runDataSha256));
    }

    public Map<String, Object> toJson() {
        Map<String, Object> m = new LinkedHashMap<>();
        m.put("plan_sha256", planSha256);
        m.put("data_sha256", dataSha256);
        m.put("locked", locked.toString());
        m.put("fingerprint", fingerprint);
        return m;
    }

    /**
     * A run's comparison with its plan's lock, written as {@code provenance.lock}.
     *
     * @param planMatches whether the plan's bytes are those locked
     * @param dataMatches whether the data file's bytes are those locked
     */
    public record Status(String fingerprint, Instant locked, boolean planMatches, boolean dataMatches) {
        /**
         * The comparison a run recorded under {@code provenance.lock} in its summary.json, or empty when the
         * run recorded none or the entry is not one.
         */
        public static Optional<Status> recorded(JsonNode provenance) {
            JsonNode lock = provenance.path("lock");
            if (!lock.path("fingerprint").isString() || !lock.path("plan_matches").isBoolean()
                    || !lock.path("data_matches").isBoolean()) {
                return Optional.empty();
            }
            try {
                return Optional.of(new Status(lock.path("fingerprint").asString(), Instant.parse(lock.path("locked")
                        .asString("")), lock.path("plan_matches").asBoolean(), lock.path("data_matches").asBoolean()));
            } catch (DateTimeParseException e) {
                return Optional.empty();
            }
        }

        public boolean matches() {
            return planMatches && dataMatches;
        }

        /** The run's line about its lock, as the explorer shows it: the warning, or that both still match. */
        public String sentence() {
            return warning().map(w -> "Warning: " + w + ".").orElse("The plan and the data of this run are those "
                    + "locked at " + locked + " (fingerprint " + fingerprint + ").");
        }

        /** The warning a run owes its reader when the plan or data changed after the lock, or empty. */
        public Optional<String> warning() {
            if (matches()) {
                return Optional.empty();
            }
            String changed = !planMatches && !dataMatches ? "the plan and the data" : planMatches ? "the data"
                    : "the plan";
            return Optional.of(changed + (planMatches == dataMatches ? " have" : " has") + " changed since the plan "
                    + "was locked (" + locked + ", fingerprint " + fingerprint + "): these results are not those of the "
                    + "locked plan");
        }

        public Map<String, Object> toJson() {
            Map<String, Object> m = new LinkedHashMap<>();
            m.put("fingerprint", fingerprint);
            m.put("locked", locked.toString());
            m.put("plan_matches", planMatches);
            m.put("data_matches", dataMatches);
            return m;
        }
    }
}
