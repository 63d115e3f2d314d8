package org.forkscape.run;

import static org.junit.jupiter.api.Assertions.assertEquals;

import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.security.MessageDigest;
import java.util.HexFormat;
import java.util.SplittableRandom;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** The hashes recorded under {@code provenance}, against a published test vector and the platform's digest. */
class ProvenanceTest {
    @TempDir
    Path dir;

    @Test
    void theHashOfAbcIsThePublishedOne() {
        // FIPS 180-2, appendix B.1 (one-block message "abc")
        assertEquals("ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad",
                Provenance.sha256("abc".getBytes(StandardCharsets.US_ASCII)));
    }

    @Test
    void aFileReadInBlocksHashesAsItsBytesDo() throws Exception {
        // longer than one read block, so the blocks are joined; java.security.MessageDigest on the whole array
        byte[] bytes = new byte[200_003];
        new SplittableRandom(11).nextBytes(bytes);
        Path file = Files.write(dir.resolve("data.csv"), bytes);
        String expected = HexFormat.of().formatHex(MessageDigest.getInstance("SHA-256").digest(bytes));
        assertEquals(expected, Provenance.sha256(file));
        assertEquals(expected, Provenance.sha256(bytes));
    }
}
