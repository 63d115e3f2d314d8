package org.forkscape.cli;

import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.ByteArrayOutputStream;
import java.io.PrintStream;
import java.nio.charset.StandardCharsets;
import org.junit.jupiter.api.Test;

/** A phase's line on the terminal: its name at once (before anything is counted), then its own count. */
class TerminalProgressTest {
    @Test
    void aPhaseNamesItselfBeforeAndWhileItCounts() {
        ByteArrayOutputStream bytes = new ByteArrayOutputStream();
        PrintStream err = new PrintStream(bytes, true, StandardCharsets.UTF_8);
        TerminalProgress writing = new TerminalProgress(err, "writing files", "rows of specifications.csv");
        assertTrue(bytes.toString(StandardCharsets.UTF_8).contains("\rwriting files"), bytes.toString(StandardCharsets.UTF_8));
        writing.update(4_096, 9_216);
        writing.update(9_216, 9_216);
        String shown = bytes.toString(StandardCharsets.UTF_8);
        assertTrue(shown.contains("writing files: 9,216 / 9,216 rows of specifications.csv"), shown);
        writing.finish();
        assertTrue(bytes.toString(StandardCharsets.UTF_8).endsWith("\r\033[K"));
    }
}
