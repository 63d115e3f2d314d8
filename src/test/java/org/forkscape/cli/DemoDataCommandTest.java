package org.forkscape.cli;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.ByteArrayOutputStream;
import java.io.IOException;
import java.io.PrintStream;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import org.forkscape.demo.DemoDataGenerator;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** {@code demo-data DIR}: writes the demo files, never overwrites someone's different file unasked. */
class DemoDataCommandTest {
    @TempDir
    Path folder;

    private final ByteArrayOutputStream out = new ByteArrayOutputStream();
    private final ByteArrayOutputStream err = new ByteArrayOutputStream();

    private int execute(String... args) {
        return CommandLine.execute(args, new PrintStream(out, true, StandardCharsets.UTF_8),
                new PrintStream(err, true, StandardCharsets.UTF_8));
    }

    private String errors() {
        return err.toString(StandardCharsets.UTF_8);
    }

    @Test
    void writesEveryDemoFileAndSaysWhere() throws IOException {
        Path target = folder.resolve("new/demo");
        assertEquals(0, execute("demo-data", target.toString()));
        for (var f : DemoDataGenerator.files().entrySet()) {
            assertArrayEquals(f.getValue(), Files.readAllBytes(target.resolve(f.getKey())), f.getKey());
        }
        assertTrue(out.toString(StandardCharsets.UTF_8).contains(DemoDataGenerator.DATA));
    }

    @Test
    void writingAgainOverIdenticalFilesIsFine() {
        assertEquals(0, execute("demo-data", folder.toString()));
        assertEquals(0, execute("demo-data", folder.toString()));
    }

    @Test
    void aDifferentFileOfTheSameNameIsKeptUnlessReplaceIsAsked() throws IOException {
        Path own = folder.resolve(DemoDataGenerator.DATA);
        Files.writeString(own, "mine\n1\n");
        assertEquals(2, execute("demo-data", folder.toString()));
        assertTrue(errors().contains(DemoDataGenerator.DATA) && errors().contains("--replace yes"), errors());
        assertEquals("mine\n1\n", Files.readString(own));
        assertTrue(Files.notExists(folder.resolve(DemoDataGenerator.PLAN)), "nothing is written when one file clashes");

        assertEquals(0, execute("demo-data", folder.toString(), "--replace", "yes"));
        assertArrayEquals(DemoDataGenerator.files().get(DemoDataGenerator.DATA), Files.readAllBytes(own));
    }

    @Test
    void badArgumentsExitWithCodeTwoAndOneLine() throws IOException {
        assertEquals(2, execute("demo-data"));
        assertTrue(errors().contains("usage: demo-data DIR"), errors());

        Path file = Files.writeString(folder.resolve("a-file.txt"), "x");
        assertEquals(2, execute("demo-data", file.toString()));
        assertTrue(errors().contains("is a file"), errors());

        assertEquals(2, execute("demo-data", folder.toString(), "--replace", "maybe"));
        assertTrue(errors().contains("--replace must be yes or no"), errors());
        assertEquals(3, errors().strip().lines().count(), "one line per failure, no stack trace");
    }

    @Test
    void usageListsTheCommand() {
        assertEquals(0, execute("help"));
        assertTrue(out.toString(StandardCharsets.UTF_8).contains("demo-data DIR"));
    }
}
