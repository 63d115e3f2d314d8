package org.forkscape.run;

import java.io.IOException;
import java.io.InputStream;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.security.MessageDigest;
import java.security.NoSuchAlgorithmException;
import java.time.Instant;
import java.time.temporal.ChronoUnit;
import java.util.HexFormat;
import java.util.LinkedHashMap;
import java.util.Map;
import org.forkscape.InputException;
import org.forkscape.Version;
import org.forkscape.data.DataException;
import org.forkscape.data.ParquetParts;

/**
 * How a run was made, written under {@code provenance} in summary.json: Forkscape's version, the SHA-256
 * of the plan's and the data's bytes (FIPS 180-4, Secure Hash Standard; null for data read elsewhere, by the
 * Spark runner), the seed, the command, the start
 * in UTC, the Java version and the fitting threads (which do not change results), and for a plan with a
 * lock, whether the plan and data still match it ({@link PlanLock.Status}, null without a lock).
 */
public record Provenance(String version, String planSha256, String dataSha256, long seed, String command,
        Instant started, String java, int threads, PlanLock.Status lock) {

    /** The provenance of a run starting now, from what the door gave and what the pipeline knows. */
    public static Provenance of(RunOrigin origin, long seed, int threads) {
        String plan = sha256(origin.planBytes());
        String data = origin.dataFile() == null ? null : sha256(origin.dataFile());
        return new Provenance(Version.current(), plan, data, seed, origin.command(),
                Instant.now().truncatedTo(ChronoUnit.SECONDS), System.getProperty("java.version"), threads,
                origin.lock() == null ? null : origin.lock().check(plan, data));
    }

    public Map<String, Object> toJson() {
        Map<String, Object> m = new LinkedHashMap<>();
        m.put("version", version);
        m.put("plan_sha256", planSha256);
        m.put("data_sha256", dataSha256);
        m.put("seed", seed);
        m.put("command", command);
        m.put("started", started.toString());
        m.put("java", java);
        m.put("threads", threads);
        if (lock != null) {
            m.put("lock", lock.toJson());
        }
        return m;
    }

    /** Lower-case hex SHA-256 of the bytes. */
    public static String sha256(byte[] bytes) {
        return HexFormat.of().formatHex(digest().digest(bytes));
    }

    /**
     * Lower-case hex SHA-256 of a plan's data: of a file's bytes, read in blocks so a large data file is not
     * held twice; of a folder of Parquet part files ({@link ParquetParts}), the SHA-256 of the text that
     * {@code sha256sum} prints for its parts in their order, one line {@code HEX  NAME\n} per part (each
     * part's SHA-256 and its name in the folder), so that {@code cd FOLDER && LC_ALL=C ls *.parquet | xargs
     * sha256sum | sha256sum} gives the same digest. A part added, removed, renamed or changed changes it.
     */
    public static String sha256(Path data) {
        if (!Files.isDirectory(data)) {
            return fileSha256(data);
        }
        ParquetParts parts;
        try {
            parts = ParquetParts.of(data, data.toString());
        } catch (DataException e) {
            throw new InputException(data.toString(), "cannot record the data's SHA-256: " + e.problem());
        }
        StringBuilder listing = new StringBuilder();
        for (Path part : parts.files()) {
            listing.append(fileSha256(part)).append("  ").append(parts.name(part)).append('\n');
        }
        return sha256(listing.toString().getBytes(StandardCharsets.UTF_8));
    }

    private static String fileSha256(Path file) {
        MessageDigest digest = digest();
        byte[] block = new byte[1 << 16];
        try (InputStream in = Files.newInputStream(file)) {
            for (int n = in.read(block); n >= 0; n = in.read(block)) {
                digest.update(block, 0, n);
            }
        } catch (IOException e) {
            throw new InputException(file.toString(), "cannot read the data file to record its SHA-256: "
                    + e.getMessage());
        }
        return HexFormat.of().formatHex(digest.digest());
    }

    private static MessageDigest digest() {
        try {
            return MessageDigest.getInstance("SHA-256");
        } catch (NoSuchAlgorithmException e) {
            // every Java platform must provide SHA-256 (java.security.MessageDigest's Javadoc)
            throw new IllegalStateException(e);
        }
    }
}
