package org.forkscape.spark;

import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import java.util.Locale;

/**
 * The single-machine runner on the same plan and data, for {@link SparkScale}: {@code java -jar
 * forkscape.jar run} in a child JVM with the JVM's default heap, under {@code /usr/bin/time -v} for its peak
 * resident memory. It reports the seconds and the peak, or why the run did not fit.
 */
final class SingleMachineRun {
    private SingleMachineRun() {
    }

    static String measure(Path jar, Path plan, Path out) {
        Path log = out.resolveSibling(out.getFileName() + ".log");
        try {
            Files.createDirectories(out);
            ProcessBuilder b = new ProcessBuilder("/usr/bin/time", "-v", "java", "-jar", jar.toString(), "run",
                    plan.toString(), "--out", out.toString()).redirectErrorStream(true).redirectOutput(log.toFile());
            long start = System.nanoTime();
            int code = b.start().waitFor();
            double seconds = (System.nanoTime() - start) / 1e9;
            List<String> lines = Files.readAllLines(log, StandardCharsets.UTF_8);
            long kb = lines.stream().filter(l -> l.contains("Maximum resident set size")).mapToLong(
                    l -> Long.parseLong(l.replaceAll("\\D", ""))).findFirst().orElse(0);
            if (code != 0) {
                String why = lines.stream().filter(l -> l.startsWith("forkscape:") || l.contains("OutOfMemoryError"))
                        .findFirst().orElse("exit code " + code);
                return String.format(Locale.ROOT, "did not fit: %s (after %.0f s, %,d MB resident)", why.trim(),
                        seconds, kb >> 10);
            }
            return String.format(Locale.ROOT, "%.1f s, %,d MB resident at the peak", seconds, kb >> 10);
        } catch (IOException e) {
            return "not run (" + e.getMessage() + ")";
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
            return "not run (interrupted)";
        }
    }
}
