package org.forkscape.cli;

import java.io.IOException;
import java.io.PrintStream;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.Arrays;
import java.util.Map;
import java.util.Set;
import org.forkscape.demo.DemoDataGenerator;
import org.forkscape.run.AtomicFiles;

/**
 * {@code demo-data DIR}: writes the demo's data and plans into a folder. A file there that differs from
 * the demo is left alone unless {@code --replace yes} is given, so no one's own data is overwritten.
 */
final class DemoDataCommand {
    static final Set<String> OPTIONS = Set.of("replace");

    private DemoDataCommand() {
    }

    static void execute(String[] args, PrintStream out) {
        Arguments a = new Arguments(args, 1, OPTIONS);
        if (a.positional().size() != 1) {
            throw new UsageException("usage: demo-data DIR [--replace yes]");
        }
        String replace = a.has("replace") ? a.text("replace") : "no";
        if (!replace.equals("yes") && !replace.equals("no")) {
            throw new UsageException("--replace must be yes or no; found \"" + replace + "\"");
        }
        Path folder = Path.of(a.positional().get(0));
        if (Files.exists(folder) && !Files.isDirectory(folder)) {
            throw new UsageException(folder + " is a file; demo-data needs a folder to write into");
        }
        Map<String, byte[]> files = DemoDataGenerator.files();
        if (replace.equals("no")) {
            for (Map.Entry<String, byte[]> f : files.entrySet()) {
                Path target = folder.resolve(f.getKey());
                if (Files.exists(target) && !Arrays.equals(read(target), f.getValue())) {
                    throw new UsageException(target + " exists and differs from the demo; nothing was written "
                            + "(move it away, or pass --replace yes)");
                }
            }
        }
        files.forEach((name, content) -> AtomicFiles.write(folder.resolve(name), o -> o.write(content)));
        out.println("wrote " + String.join(", ", files.keySet()) + " to " + folder);
    }

    private static byte[] read(Path file) {
        try {
            return Files.readAllBytes(file);
        } catch (IOException e) {
            throw new UsageException("cannot read " + file + ": " + e.getMessage());
        }
    }
}
