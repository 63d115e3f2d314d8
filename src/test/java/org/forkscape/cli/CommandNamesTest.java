package org.forkscape.cli;

import static org.forkscape.cli.CommandLineTest.run;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import java.util.regex.Matcher;
import java.util.regex.Pattern;
import org.forkscape.cli.CommandLineTest.Outcome;
import org.junit.jupiter.api.Test;

/** Which arguments start the server and which name a command, help and the version, called in-process. */
class CommandNamesTest {
    private static final String NL = System.lineSeparator();

    @Test
    void onlyNoArgumentsOrServerSettingsStartTheServer() {
        assertFalse(CommandLine.handles(new String[0]));
        assertFalse(CommandLine.handles(new String[] {"--server.port=9000"}));
        assertFalse(CommandLine.handles(new String[] {"--server.port=9000", "--forkscape.workspace=/tmp/w"}));
        for (String[] args : List.of(new String[] {"run"}, new String[] {"frobnicate"}, new String[] {"--version"},
                new String[] {"version"}, new String[] {"--frobnicate"}, new String[] {"-x"}, new String[] {"help"},
                new String[] {"--server.port=9000", "frobnicate"}, new String[] {"--server.port", "9000"})) {
            assertTrue(CommandLine.handles(args), String.join(" ", args));
        }
    }

    @Test
    void anUnknownCommandOrBareOptionPrintsOneLineAndTheUsageAndExitsWithTwo() {
        for (String name : List.of("frobnicate", "--frobnicate", "-x", "--debug")) {
            Outcome o = run(name);
            assertEquals(2, o.code(), name);
            assertEquals("", o.out());
            assertTrue(o.err().startsWith("forkscape: unknown command \"" + name + "\"" + NL + "usage:" + NL), o.err());
            assertTrue(o.err().contains("run PLAN.json --out DIR"), o.err());
            assertFalse(o.err().contains("Exception"), o.err());
        }
        Outcome mixed = run("--server.port=9000", "frobnicate");
        assertEquals(2, mixed.code());
        assertTrue(mixed.err().startsWith("forkscape: unknown command \"frobnicate\" after the web server's "
                + "settings (the server takes only --name=value settings; a command comes first)" + NL), mixed.err());
        Outcome after = run("--server.port=9000", "run");
        assertEquals(2, after.code());
        assertTrue(after.err().startsWith("forkscape: unknown command \"run\" after"), after.err());
    }

    @Test
    void versionPrintsTheProjectVersionFromThePom() throws IOException {
        String expected = "forkscape " + pomVersion() + NL;
        for (String name : List.of("--version", "version")) {
            Outcome o = run(name);
            assertEquals(0, o.code(), o.err());
            assertEquals(expected, o.out());
            assertEquals("", o.err());
        }
        CommandLineTest.refused(run("--version", "run"), "--version takes no arguments; found run");
    }

    @Test
    void eachCommandPrintsItsOwnUsageOnHelp() {
        for (String command : List.of("run", "verify", "bench", "demo-data")) {
            String first = "usage:" + NL + "  java -jar forkscape.jar " + command + " ";
            for (String[] args : List.of(new String[] {command, "--help"}, new String[] {command, "-h"},
                    new String[] {"help", command}, new String[] {command, "plan.json", "--help"})) {
                Outcome o = run(args);
                assertEquals(0, o.code(), o.err());
                assertEquals("", o.err());
                assertTrue(o.out().startsWith(first), o.out());
                assertEquals(1, o.out().split("java -jar").length - 1, o.out());
            }
        }
        assertTrue(run("run", "--help").out().contains("--null-draws R"));
        assertTrue(run("verify", "--help").out().contains("verify RUN_DIR"));
        assertTrue(run("bench", "--help").out().contains("--quick"));
        assertTrue(run("demo-data", "--help").out().contains("--replace yes"));
    }

    @Test
    void helpAloneListsEveryCommandAndHelpOfAnUnknownCommandIsRefused() {
        for (String name : List.of("help", "--help", "-h")) {
            Outcome o = run(name);
            assertEquals(0, o.code(), o.err());
            for (String command : List.of(" run PLAN.json", " verify RUN_DIR", " demo-data DIR", " bench [--quick]", " --version",
                    " help [COMMAND]")) {
                assertTrue(o.out().contains("java -jar forkscape.jar" + command), command + " in " + o.out());
            }
        }
        Outcome o = run("help", "frobnicate");
        assertEquals(2, o.code());
        assertTrue(o.err().startsWith("forkscape: unknown command \"frobnicate\"" + NL + "usage:"), o.err());
        CommandLineTest.refused(run("help", "run", "bench"), "help takes at most one command; found run bench");
    }

    /** The project's version as pom.xml declares it, read apart from the resource the command reads. */
    private static String pomVersion() throws IOException {
        String pom = Files.readString(Path.of("pom.xml"));
        Matcher m = Pattern.compile("</parent>.*?<version>([^<]+)</version>", Pattern.DOTALL).matcher(pom);
        assertTrue(m.find(), "no project version in pom.xml");
        return m.group(1);
    }
}
