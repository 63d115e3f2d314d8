package org.forkscape.cli;

import java.util.ArrayList;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.Set;
import java.util.TreeSet;

/**
 * Parses {@code --name value} and {@code --name=value} options and positional arguments against a fixed
 * set of option names. An unknown option, an option given twice or one without its value is a
 * {@link UsageException}.
 */
final class Arguments {
    private final List<String> positional = new ArrayList<>();
    private final Map<String, String> options = new HashMap<>();

    Arguments(String[] args, int from, Set<String> known) {
        for (int i = from; i < args.length; i++) {
            String a = args[i];
            if (a.startsWith("-") && a.length() > 1) {
                String name = a.substring(a.startsWith("--") ? 2 : 1);
                String value = null;
                int eq = name.indexOf('=');
                if (eq >= 0) {
                    value = name.substring(eq + 1);
                    name = name.substring(0, eq);
                }
                if (!known.contains(name) || !a.startsWith("--")) {
                    throw new UsageException("unknown option " + a.split("=", 2)[0] + "; the options are --"
                            + String.join(", --", new TreeSet<>(known)));
                }
                if (value == null) {
                    if (i + 1 >= args.length) {
                        throw new UsageException("--" + name + " needs a value");
                    }
                    value = args[++i];
                }
                if (value.isBlank()) {
                    throw new UsageException("--" + name + " needs a value");
                }
                if (options.put(name, value) != null) {
                    throw new UsageException("--" + name + " is given twice");
                }
            } else {
                positional.add(a);
            }
        }
    }

    List<String> positional() {
        return positional;
    }

    String text(String name) {
        return options.get(name);
    }

    boolean has(String name) {
        return options.containsKey(name);
    }

    long whole(String name, long fallback, long min, long max) {
        String v = options.get(name);
        if (v == null) {
            return fallback;
        }
        long value;
        try {
            value = Long.parseLong(v.trim());
        } catch (NumberFormatException e) {
            throw new UsageException("--" + name + " must be a whole number; found \"" + v + "\"");
        }
        if (value < min || value > max) {
            throw new UsageException(String.format("--%s must be between %,d and %,d; found %,d", name, min, max,
                    value));
        }
        return value;
    }
}
