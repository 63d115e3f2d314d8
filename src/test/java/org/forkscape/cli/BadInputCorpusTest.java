package org.forkscape.cli;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.ByteArrayOutputStream;
import java.io.IOException;
import java.io.PrintStream;
import java.io.Writer;
import java.net.URISyntaxException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.Set;
import java.util.TreeSet;
import java.util.stream.Stream;
import org.forkscape.plan.PlanException;
import org.forkscape.plan.PlanReader;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.MethodSource;
import tools.jackson.databind.json.JsonMapper;

/**
 * Every input of {@code src/test/resources/bad-input/} is refused by the batch command with exit code 2,
 * exactly one plain line on stderr holding the fragment listed in {@code expected.tsv}, no stack trace,
 * nothing on stdout, and nothing written where the results would go. The corpus is copied to a
 * temporary folder first, so the generated million-column header and the output folders stay out of the
 * source tree.
 */
class BadInputCorpusTest {
    @TempDir
    static Path work;
    static Path corpus;

    record Case(String name, String plan, List<String> options, String fragment) {
        @Override
        public String toString() {
            return name;
        }
    }

    static Path source() {
        try {
            return Path.of(BadInputCorpusTest.class.getResource("/bad-input").toURI());
        } catch (URISyntaxException e) {
            throw new IllegalStateException(e);
        }
    }

    static List<Case> cases() throws IOException {
        List<Case> out = new ArrayList<>();
        for (String line : Files.readAllLines(source().resolve("expected.tsv"), StandardCharsets.UTF_8)) {
            if (line.isBlank() || line.startsWith("#")) {
                continue;
            }
            String[] f = line.split("\t", -1);
            assertEquals(4, f.length, line);
            List<String> options = f[2].equals("-") ? List.of() : Arrays.asList(f[2].split(" "));
            out.add(new Case(f[0], f[1], options, f[3]));
        }
        return out;
    }

    @BeforeAll
    static void copyCorpusAndWriteTheMillionColumnHeader() throws IOException {
        corpus = work.resolve("bad-input");
        Path from = source();
        try (Stream<Path> files = Files.walk(from)) {
            for (Path p : (Iterable<Path>) files::iterator) {
                Path to = corpus.resolve(from.relativize(p).toString());
                if (Files.isDirectory(p)) {
                    Files.createDirectories(to);
                } else {
                    Files.copy(p, to);
                }
            }
        }
        try (Writer w = Files.newBufferedWriter(corpus.resolve("data/million-columns.csv"), StandardCharsets.UTF_8)) {
            for (int j = 1; j <= 1_000_000; j++) {
                w.write(j == 1 ? "c1" : ",c" + j);
            }
            w.write("\n");
        }
    }

    @ParameterizedTest(name = "{0}")
    @MethodSource("cases")
    void isRefusedWithOneLineNamingTheProblemAndNothingWritten(Case c) {
        Path plan = corpus.resolve(c.plan());
        if (c.options().equals(List.of("confined"))) {
            PlanException e = assertThrows(PlanException.class, () -> new PlanReader(true).read(plan));
            assertTrue(e.getMessage().contains(c.fragment()), e.getMessage());
            return;
        }
        Path out = work.resolve("out").resolve(c.name());
        List<String> args = new ArrayList<>(List.of("run", plan.toString(), "--out", out.toString()));
        args.addAll(c.options());
        ByteArrayOutputStream stdout = new ByteArrayOutputStream();
        ByteArrayOutputStream stderr = new ByteArrayOutputStream();
        int code = CommandLine.execute(args.toArray(String[]::new), new PrintStream(stdout, true, StandardCharsets.UTF_8),
                new PrintStream(stderr, true, StandardCharsets.UTF_8));
        String err = stderr.toString(StandardCharsets.UTF_8);
        assertEquals(2, code, err);
        assertEquals("", stdout.toString(StandardCharsets.UTF_8));
        assertTrue(err.endsWith(System.lineSeparator()), err);
        String line = err.substring(0, err.length() - System.lineSeparator().length());
        assertFalse(line.contains("\n") || line.contains("\r"), "more than one line: " + err);
        assertTrue(line.startsWith("forkscape: "), line);
        assertTrue(line.contains(c.fragment()), "expected \"" + c.fragment() + "\" in: " + line);
        assertFalse(line.contains("Exception") || line.contains("\tat ") || line.contains("internal error"), line);
        assertFalse(Files.exists(out), "the output folder was created: " + out);
    }

    @Test
    void theCorpusIsLargeAndEveryPlanFileIsACase() throws IOException {
        List<Case> cases = cases();
        assertTrue(cases.size() >= 30, cases.size() + " cases");
        assertEquals(cases.size(), cases.stream().map(Case::name).distinct().count(), "case names are unique");
        Set<String> listed = new TreeSet<>(cases.stream().map(Case::plan).toList());
        Set<String> present = new TreeSet<>();
        try (Stream<Path> files = Files.list(source().resolve("plans"))) {
            files.forEach(p -> present.add("plans/" + p.getFileName()));
        }
        present.remove("plans/valid.json");
        listed.remove("plans/valid.json");
        listed.remove("plans/no-such-plan.json");
        assertEquals(present, listed, "every plan file in bad-input/plans is listed in expected.tsv");
    }

    /** The shared base of the corpus is itself sound, so each refusal comes from its own mistake. */
    @Test
    void theValidPlanBesideTheCorpusRuns() throws IOException {
        Path out = work.resolve("out").resolve("valid");
        ByteArrayOutputStream stderr = new ByteArrayOutputStream();
        int code = CommandLine.execute(new String[] {"run", corpus.resolve("plans/valid.json").toString(), "--out",
                out.toString()}, new PrintStream(new ByteArrayOutputStream(), true, StandardCharsets.UTF_8),
                new PrintStream(stderr, true, StandardCharsets.UTF_8));
        assertEquals(0, code, stderr.toString(StandardCharsets.UTF_8));
        assertEquals(17, Files.readAllLines(out.resolve("specifications.csv")).size());
        assertEquals(16, JsonMapper.builder().build().readTree(out.resolve("summary.json").toFile())
                .get("specifications").asInt());
    }
}
