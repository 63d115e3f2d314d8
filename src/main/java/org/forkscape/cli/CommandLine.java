package org.forkscape.cli;

import java.io.PrintStream;
import java.io.UncheckedIOException;
import java.util.Arrays;
import java.util.Optional;
import java.util.Set;
import org.forkscape.InputException;
import org.forkscape.Version;

/**
 * The batch commands, {@code help} and {@code --version}. Every problem the user can cause ends with one
 * plain line on stderr (an unknown command adds the usage) and exit code 2; anything else with one line and exit code 1; never a stack trace (set FORKSCAPE_DEBUG=1 to
 * see one). {@code verify} alone has a third outcome: exit code 3 when the recomputed results differ.
 */
public final class CommandLine {
    private static final Set<String> HELP = Set.of("help", "--help", "-h");
    private static final Set<String> VERSION = Set.of("version", "--version");

    private CommandLine() {
    }

    /**
     * Whether the arguments are for a batch command rather than for the web server. The server takes no
     * arguments or only its settings, each {@code --name=value}; anything else is a command, or a
     * mistake that {@link #execute} reports, so a typing error never starts the server.
     */
    public static boolean handles(String[] args) {
        return Arrays.stream(args).anyMatch(a -> !isServerSetting(a));
    }

    private static boolean isServerSetting(String argument) {
        return argument.startsWith("--") && argument.indexOf('=') > 2;
    }

    public static int execute(String[] args, PrintStream out, PrintStream err) {
        if (args.length == 0) {
            err.println("forkscape: no command given; java -jar forkscape.jar help lists the commands");
            return 2;
        }
        String command = args[0];
        if (isServerSetting(command)) {
            String other = Arrays.stream(args).filter(a -> !isServerSetting(a)).findFirst().orElse(command);
            return unknown(other, " after the web server's settings (the server takes only --name=value "
                    + "settings; a command comes first)", err);
        }
        if (!(CommandHelp.isCommand(command) || HELP.contains(command) || VERSION.contains(command))) {
            return unknown(command, "", err);
        }
        return guarded(err, () -> {
            if (VERSION.contains(command)) {
                if (args.length > 1) {
                    throw new UsageException(command + " takes no arguments; found " + String.join(" ",
                            Arrays.asList(args).subList(1, args.length)));
                }
                out.println("forkscape " + Version.current());
                return 0;
            }
            if (HELP.contains(command)) {
                if (args.length > 2) {
                    throw new UsageException(command + " takes at most one command; found " + String.join(" ",
                            Arrays.asList(args).subList(1, args.length)));
                }
                if (args.length == 2) {
                    Optional<String> help = CommandHelp.of(args[1]);
                    if (help.isEmpty()) {
                        return unknown(args[1], "", err);
                    }
                    out.println(help.get());
                    return 0;
                }
                out.println(CommandHelp.all());
                return 0;
            }
            if (asksForHelp(args)) {
                out.println(CommandHelp.of(command).orElseThrow());
                return 0;
            }
            switch (command) {
                case "run" -> RunCommand.execute(args, out, err);
                case "estimate" -> EstimateCommand.execute(args, out);
                case "lock" -> LockCommand.execute(args, out);
                case "report" -> ReportCommand.execute(args, out);
                case "compare" -> CompareCommand.execute(args, out);
                case "check" -> { return CheckCommand.execute(args, out); }
                case "verify" -> {
                    return VerifyCommand.execute(args, out, err);
                }
                case "bench" -> {
                    boolean quick = Arrays.asList(args).contains("--quick");
                    String[] rest = Arrays.stream(args).filter(s -> !s.equals("--quick")).toArray(String[]::new);
                    Arguments a = new Arguments(rest, 1, Set.of("out"));
                    new org.forkscape.bench.BenchmarkCommand(out, java.nio.file.Path.of(
                            a.has("out") ? a.text("out") : "target/bench"), quick).execute();
                }
                default -> DemoDataCommand.execute(args, out);
            }
            return 0;
        });
    }

    /**
     * {@code run PLAN --out DIR ...} over {@code data} (where its table is read and its variants built), with
     * the same messages and exit codes as every other command: the door of a runner that keeps the rows
     * elsewhere, such as the Spark runner.
     */
    public static int run(String[] args, PrintStream out, PrintStream err, org.forkscape.run.RunData data) {
        return guarded(err, () -> {
            RunCommand.execute(args, out, err, data);
            return 0;
        });
    }

    /** Runs a command, turning its failures into one line on {@code err} and an exit code. */
    private static int guarded(PrintStream err, java.util.function.IntSupplier command) {
        try {
            return command.getAsInt();
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

    /** {@code --help} or {@code -h} anywhere after the command asks for that command's usage. */
    private static boolean asksForHelp(String[] args) {
        return Arrays.stream(args).skip(1).anyMatch(a -> a.equals("--help") || a.equals("-h"));
    }

    private static int unknown(String command, String after, PrintStream err) {
        err.println("forkscape: unknown command " + oneLine(InputException.quoted(command)) + after);
        err.println(CommandHelp.all());
        return 2;
    }
}
