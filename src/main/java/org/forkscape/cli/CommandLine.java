package org.forkscape.cli;

import java.io.PrintStream;
import java.io.UncheckedIOException;
import java.util.Set;
import org.forkscape.InputException;

/**
 * The batch commands. Every problem the user can cause ends with one plain line on stderr and exit
 * code 2; anything else with one line and exit code 1; never a stack trace (set FORKSCAPE_DEBUG=1 to
 * see one).
 */
public final class CommandLine {
    public static final Set<String> COMMANDS = Set.of("run", "bench", "demo-data", "help", "--help", "-h");

    private CommandLine() {
    }

    public static boolean handles(String[] args) {
        return args.length > 0 && COMMANDS.contains(args[0]);
    }

    public static int execute(String[] args, PrintStream out, PrintStream err) {
        if (args.length == 0) {
            err.println("forkscape: no command given; java -jar forkscape.jar help lists the commands");
            return 2;
        }
        try {
            switch (args[0]) {
                case "run" -> RunCommand.execute(args, out, err);
                case "bench" -> {
                    boolean quick = java.util.Arrays.asList(args).contains("--quick");
                    String[] rest = java.util.Arrays.stream(args).filter(s -> !s.equals("--quick")).toArray(String[]::new);
                    Arguments a = new Arguments(rest, 1, java.util.Set.of("out"));
                    new org.forkscape.bench.BenchmarkCommand(out, java.nio.file.Path.of(
                            a.has("out") ? a.text("out") : "target/bench"), quick).execute();
                }
                case "demo-data" -> DemoDataCommand.execute(args, out);
                default -> out.println(usage());
            }
            return 0;
        } catch (InputException e) {
            err.println("forkscape: " + oneLine(e.getMessage()));
            return 2;
        } catch (UncheckedIOException e) {
            err.println("forkscape: " + oneLine(e.getMessage()));
            return 2;
        } catch (StackOverflowError e) {
            err.println("forkscape: internal error (the input nests too deeply for this command); please report it "
                    + "with the plan that caused it");
            return 1;
        } catch (OutOfMemoryError e) {
            err.println("forkscape: out of memory; give Java more heap (java -Xmx...) or fit a --sample of the "
                    + "specifications");
            return 1;
        } catch (RuntimeException e) {
            if (System.getenv("FORKSCAPE_DEBUG") != null) {
                e.printStackTrace(err);
            }
            err.println("forkscape: internal error (" + e.getClass().getSimpleName() + ": " + oneLine(e.getMessage())
                    + "); please report it with the plan that caused it");
            return 1;
        }
    }

    /**
     * The message as one line: a column name, label or expression quoted in a message may hold line
     * breaks or other control characters, which are shown escaped so the error stays a single line.
     */
    static String oneLine(String message) {
        if (message == null) {
            return "";
        }
        StringBuilder b = new StringBuilder(message.length());
        message.codePoints().forEach(c -> {
            if (c == '\n') {
                b.append("\\n");
            } else if (c == '\r') {
                b.append("\\r");
            } else if (c == '\t') {
                b.append("\\t");
            } else if (Character.isISOControl(c) || c == 0x2028 || c == 0x2029) {
                b.append(String.format("\\u%04x", c));
            } else {
                b.appendCodePoint(c);
            }
        });
        return b.toString();
    }

    static String usage() {
        return String.join("\n",
                "usage:",
                "  java -jar forkscape.jar                      start the explorer at http://localhost:8080",
                "  java -jar forkscape.jar run PLAN.json --out DIR [--sample N --seed S] [--threads T]",
                "                                               [--max-specifications N] [--max-memory SIZE]",
                "                                               [--null-draws R [--null-method bootstrap|permute]",
                "                                                [--null-cluster COLUMN|rows] [--max-null-draws N]]",
                "                                               fit every specification, write",
                "                                               DIR/specifications.csv and DIR/summary.json",
                "                                               (with null draws also DIR/null-draws.csv)",
                "  java -jar forkscape.jar demo-data DIR [--replace yes]",
                "                                               write the demo's data and plans into DIR",
                "  java -jar forkscape.jar bench [--quick] [--out DIR]",
                "                                               time the engine against a per-specification",
                "                                               refit; figures to DIR (target/bench)");
    }
}
