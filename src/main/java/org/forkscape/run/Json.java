package org.forkscape.run;

import java.nio.file.Path;
import java.util.Map;
import tools.jackson.databind.SerializationFeature;
import tools.jackson.databind.json.JsonMapper;

/** JSON output of runs: one configured mapper, NaN written as null, files written atomically. */
public final class Json {
    public static final JsonMapper MAPPER = JsonMapper.builder().enable(SerializationFeature.INDENT_OUTPUT).build();

    private Json() {
    }

    /** A JSON-safe number: {@code null} for NaN and infinities, which JSON cannot hold. */
    public static Double number(double v) {
        return Double.isFinite(v) ? v : null;
    }

    public static void write(Path file, Map<String, Object> content) {
        byte[] bytes = MAPPER.writeValueAsBytes(content);
        AtomicFiles.write(file, out -> out.write(bytes));
    }
}
