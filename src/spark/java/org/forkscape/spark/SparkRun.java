package org.forkscape.spark;

import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import org.apache.spark.sql.SparkSession;
import org.forkscape.cli.CommandLine;

/**
 * The Spark runner's entry point, for {@code spark-submit --class org.forkscape.spark.SparkRun
 * forkscape-spark.jar PLAN.json --out DIR} and {@code java -jar forkscape-spark-local.jar run PLAN.json --out
 * DIR [--master local[N]]}: the batch command's {@code run}, with its options, messages and files, over data
 * read by Spark ({@link SparkData}). Its own options: {@code --master URL} (else spark-submit's, else
 * {@code local[*]}), {@code --data LOCATION} (the Parquet data where the cluster sees them, instead of the
 * plan's {@code data}) and {@code --partitions N} (spread the rows over N partitions).
 */
public final class SparkRun {
    static final String USAGE = "usage: run PLAN.json --out DIR [--master URL] [--data LOCATION] [--partitions N] "
            + "[--sample N --seed S] [--null-draws R] [--null-cluster COLUMN|rows] [--threads T] "
            + "[--max-specifications N]";

    private SparkRun() {
    }

    public static void main(String[] args) {
        System.exit(execute(args));
    }

    /** Runs the command and returns its exit code (0, or 2 for bad input, 1 for an internal error). */
    static int execute(String[] args) {
        List<String> rest = new ArrayList<>(Arrays.asList(args));
        boolean scale = !rest.isEmpty() && rest.get(0).equals("scale");
        if (!rest.isEmpty() && (scale || rest.get(0).equals("run"))) {
            rest.remove(0);
        }
        String master;
        String data;
        int partitions;
        Path plan;
        String planText;
        try {
            master = take(rest, "--master");
            data = take(rest, "--data");
            String p = take(rest, "--partitions");
            partitions = p == null ? 0 : Integer.parseInt(p);
            if (partitions < 0) {
                throw new NumberFormatException();
            }
            if (scale) {
                plan = null;
                planText = null;
            } else if (rest.isEmpty() || rest.get(0).startsWith("--")) {
                return usage("the Spark runner needs a plan file; " + USAGE);
            } else {
                plan = Path.of(rest.get(0)).toAbsolutePath();
                planText = Files.readString(plan, StandardCharsets.UTF_8);
            }
        } catch (NumberFormatException e) {
            return usage("--partitions must be a whole number of 1 or more; " + USAGE);
        } catch (IllegalArgumentException e) {
            return usage(e.getMessage());
        } catch (java.nio.file.NoSuchFileException e) {
            return usage(rest.get(0) + ": no such plan file");
        } catch (IOException e) {
            return usage(rest.get(0) + ": the plan file cannot be read (" + e.getMessage() + ")");
        }
        boolean submitted = System.getProperty("spark.master") != null;
        SparkSession.Builder builder = SparkSession.builder().appName(scale ? "forkscape scale"
                : "forkscape run " + plan.getFileName())
                .config("spark.ui.showConsoleProgress", "false");
        if (master != null) {
            builder.master(master);
        } else if (!submitted) {
            builder.master("local[*]");
        }
        SparkSession spark;
        // a session already running in this JVM (a test's) is used and left running
        boolean running = SparkSession.getActiveSession().isDefined() || SparkSession.getDefaultSession().isDefined();
        try {
            spark = builder.getOrCreate();
        } catch (RuntimeException e) {
            return usage("Spark did not start" + (master == null ? "" : " with --master " + master) + ": "
                    + e.getMessage());
        }
        if (!submitted && !running) {
            // on one machine Spark's own log is silenced: a failed task would print its Java stack trace, where the
            // command says what failed in one line; under spark-submit the cluster's log settings stay
            spark.sparkContext().setLogLevel("OFF");
        }
        try {
            if (scale) {
                return SparkScale.execute(rest, spark, partitions);
            }
            List<String> command = new ArrayList<>();
            command.add("run");
            command.addAll(rest);
            return CommandLine.run(command.toArray(new String[0]), System.out, System.err,
                    new SparkData(spark, data, partitions, planText, plan.getParent()));
        } finally {
            if (!running) {
                spark.stop();
            }
        }
    }

    private static String take(List<String> args, String option) {
        int at = args.indexOf(option);
        if (at < 0) {
            return null;
        }
        if (at + 1 >= args.size()) {
            throw new IllegalArgumentException(option + " needs a value; " + USAGE);
        }
        String value = args.get(at + 1);
        args.remove(at + 1);
        args.remove(at);
        return value;
    }

    private static int usage(String message) {
        System.err.println("forkscape: " + message);
        return 2;
    }
}
