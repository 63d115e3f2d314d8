package org.forkscape;

import java.io.IOException;
import java.io.InputStream;
import java.io.UncheckedIOException;
import java.util.Properties;

/**
 * Forkscape's version: the Maven project version, which the build filters into application.properties
 * as {@code forkscape.version}, so the jar and the test classpath read the same value. It sits at the root
 * because the command line prints it and every run records it in its provenance.
 */
public final class Version {
    private static final String RESOURCE = "/application.properties";
    private static final String KEY = "forkscape.version";

    private Version() {
    }

    public static String current() {
        Properties properties = new Properties();
        try (InputStream in = Version.class.getResourceAsStream(RESOURCE)) {
            if (in == null) {
                throw new IllegalStateException(RESOURCE + " is not on the class path");
            }
            properties.load(in);
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
        String version = properties.getProperty(KEY);
        if (version == null || version.isBlank() || version.startsWith("@")) {
            throw new IllegalStateException(KEY + " was not filled in by the build");
        }
        return version.trim();
    }
}
