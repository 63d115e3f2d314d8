package org.forkscape.reference;

import java.io.IOException;
import java.io.UncheckedIOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;

/**
 * Writes the measured agreement of a reference check (the largest error per quantity, or the log
 * relative errors) to {@code target/reference-reports/}, so the margins behind each tolerance can be
 * read after a build without the tests printing anything.
 */
public final class AgreementReport {
    static final Path FOLDER = Path.of("target", "reference-reports");

    private AgreementReport() {
    }

    public static void write(String file, String source, Map<String, Double> figures) {
        List<String> lines = new ArrayList<>();
        lines.add("# " + source);
        figures.forEach((what, value) -> lines.add(String.format("%-50s %.4g", what, value)));
        try {
            Files.createDirectories(FOLDER);
            Files.write(FOLDER.resolve(file), lines, StandardCharsets.UTF_8);
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
    }
}
